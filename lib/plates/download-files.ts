// Each download's size, read from storage, so the plate page states what a
// visitor is about to fetch. Names: download-names.ts.
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { composites, plates, reductions } from "@/db/schema";
import { bucketName, findObjectSize } from "@/lib/storage";
import { REDUCTION_FILE_OF, type PlateDownloadKind } from "./download-names";
import type { PlateSource } from "./source";
import { makeWebJpeg, webJpegKey } from "./web-jpeg";

/**
 * Sizes in bytes of a plate version's downloads, by kind; null where the file is missing. A
 * web JPEG not made yet (plates published before it existed) is made now, as its own
 * download would do on first request.
 */
export async function findPlateDownloadSizes(
  db: DbOrTx,
  plate: { slug: string; version: number; source: PlateSource },
  kinds: PlateDownloadKind[],
): Promise<Partial<Record<PlateDownloadKind, number | null>>> {
  const [row] = await db.select({ id: plates.id }).from(plates).where(eq(plates.slug, plate.slug)).limit(1);
  const [source] =
    plate.source.kind === "composite"
      ? await db.select({ outputs: composites.outputs }).from(composites).where(eq(composites.id, plate.source.id)).limit(1)
      : await db.select({ outputs: reductions.outputs }).from(reductions).where(eq(reductions.id, plate.source.id)).limit(1);
  const prefix = typeof source?.outputs?.prefix === "string" ? source.outputs.prefix : null;
  const derived = bucketName("derived");
  const entries = await Promise.all(
    kinds.map(async (kind): Promise<[PlateDownloadKind, number | null]> => {
      if (kind === "web") {
        if (!row) return [kind, null];
        const ref = { bucket: derived, key: webJpegKey(row.id, plate.version) };
        let size = await findObjectSize(ref);
        if (size === null) {
          await makeWebJpeg(db, row.id, plate.version).catch(() => undefined);
          size = await findObjectSize(ref);
        }
        return [kind, size];
      }
      return [kind, prefix ? await findObjectSize({ bucket: derived, key: `${prefix}${REDUCTION_FILE_OF[kind]}` }) : null];
    }),
  );
  return Object.fromEntries(entries);
}
