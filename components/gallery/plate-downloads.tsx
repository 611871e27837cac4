import { getDb } from "@/db/client";
import { formatBytes } from "@/lib/format/bytes";
import { findPlateDownloadSizes } from "@/lib/plates/download-files";
import type { PlateDownloadDto } from "@/lib/plates/public";
import type { PlateSource } from "@/lib/plates/source";

const FORMAT_WORDS: Record<string, string> = { "image/jpeg": "JPEG", "image/png": "PNG", "application/fits": "FITS" };

/** Each download with the name it is saved under and its size, read from storage when the page is made. */
export async function PlateDownloads({ plate }: { plate: { slug: string; version: number; source: PlateSource; downloads: PlateDownloadDto[] } }) {
  const sizes = await findPlateDownloadSizes(
    getDb(),
    plate,
    plate.downloads.map((d) => d.kind),
  );
  return (
    <ul className="flex flex-col gap-3 text-sm" aria-label="Files to download">
      {plate.downloads.map((d) => {
        const bytes = sizes[d.kind];
        return (
          <li key={d.url} className="flex min-w-0 flex-col gap-0.5 sm:flex-row sm:items-baseline sm:gap-3">
            <a href={d.url} download={d.fileName} className="font-medium underline">
              {d.label}
            </a>
            <span className="text-ink-muted" data-testid="download-facts">
              {FORMAT_WORDS[d.format] ?? d.format}, {bytes === null || bytes === undefined ? "size not known yet" : formatBytes(bytes)}
              <span className="mx-1.5" aria-hidden="true">
                ·
              </span>
              <span className="break-all font-mono text-xs">{d.fileName}</span>
            </span>
          </li>
        );
      })}
    </ul>
  );
}
