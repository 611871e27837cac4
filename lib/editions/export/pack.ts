// The last stages of a print bundle: metadata.json (every file with its size
// and SHA-256, every plate's record, the options and warnings), the ZIP written
// to the bundle's folder, and the ZIP streamed to the exports bucket.
import { createHash } from "node:crypto";
import { createReadStream, createWriteStream } from "node:fs";
import { stat, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { pipeline } from "node:stream/promises";
import type { Readable } from "node:stream";
import { ZipFile } from "yazl";
import type { Edition, EditionExport, ExportFileEntry } from "@/db/schema";
import { bucketName, putObjectFile } from "@/lib/storage";
import { safePart } from "../file-names";
import type { BundleFile } from "./bundle-texts";
import { describeCmykProfile, type ProfileFacts } from "./printer-notes";

export const METADATA_FILE = "metadata.json";

async function sha256File(path: string): Promise<string> {
  const hash = createHash("sha256");
  await pipeline(createReadStream(path), hash);
  return hash.digest("hex");
}

export interface ManifestInput {
  edition: Pick<Edition, "id" | "title" | "kind" | "issueLabel" | "embargoDate">;
  societyName: string;
  options: EditionExport["options"];
  cmykFacts: ProfileFacts | null;
  cmykProfilePath: string | undefined;
  plates: Record<string, unknown>[];
  warnings: string[];
}

/** Writes metadata.json into `dir`; returns each listed file's name and size, as the export row records them. */
export async function writeManifest(dir: string, files: BundleFile[], input: ManifestInput): Promise<ExportFileEntry[]> {
  const { edition, options, cmykFacts } = input;
  const entries: (ExportFileEntry & { kind: string; position: number | null; sha256: string })[] = [];
  for (const f of files) entries.push({ name: f.name, kind: f.kind, position: f.position, bytes: (await stat(f.path)).size, sha256: await sha256File(f.path) });
  const metadataJson = {
    format: "crownlight-edition-bundle/1",
    generatedAt: new Date().toISOString(),
    society: input.societyName,
    edition: { id: edition.id, title: edition.title, kind: edition.kind, issueLabel: edition.issueLabel, embargoDate: edition.embargoDate },
    options: {
      ...options,
      cmykProfile: options.cmyk ? (cmykFacts?.description ?? "unnamed profile") : null,
      cmykProfileAbout: options.cmyk ? describeCmykProfile(cmykFacts, Boolean(input.cmykProfilePath)) : null,
      greyscaleProfile: options.greyscale ? "none embedded (16-bit grey, sRGB tone curve)" : null,
    },
    files: entries,
    plates: input.plates,
    warnings: input.warnings,
  };
  await writeFile(join(dir, METADATA_FILE), JSON.stringify(metadataJson, null, 2), "utf8");
  return entries.map((f) => ({ name: f.name, bytes: f.bytes }));
}

/** Packs the files and metadata.json into one ZIP in `dir`, named after the edition. */
export async function packZip(dir: string, files: BundleFile[], edition: Pick<Edition, "title" | "issueLabel">): Promise<{ zipPath: string; zipName: string }> {
  const zipStem = safePart(`${edition.title}${edition.issueLabel ? `_${edition.issueLabel}` : ""}_print-bundle`) || "print-bundle";
  const zipName = `${zipStem.slice(0, 80)}.zip`;
  const zipPath = join(dir, "bundle.zip");
  const zip = new ZipFile();
  // yazl reports a file it cannot read (or one that changed size) as "error" on the ZipFile, which
  // nothing else listens to: passed to the output stream, it fails the pipeline below, not the worker.
  zip.on("error", (err: Error) => (zip.outputStream as unknown as Readable).destroy(err));
  // Images and the PDF are compressed already: stored as they are, only the texts are deflated.
  for (const f of files) zip.addFile(f.path, f.name, { compress: /\.(txt|json)$/.test(f.name) });
  zip.addFile(join(dir, METADATA_FILE), METADATA_FILE);
  zip.end();
  await pipeline(zip.outputStream, createWriteStream(zipPath));
  return { zipPath, zipName };
}

/** Stores the ZIP in the exports bucket under the export's key; returns the key and its size. */
export async function storeZip(zip: { zipPath: string; zipName: string }, editionId: string, exportId: string): Promise<{ objectKey: string; zipName: string; bytes: number }> {
  const objectKey = `editions/${editionId}/exports/${exportId}/${zip.zipName}`;
  const bytes = await putObjectFile({ bucket: bucketName("exports"), key: objectKey }, zip.zipPath, "application/zip");
  return { objectKey, zipName: zip.zipName, bytes };
}
