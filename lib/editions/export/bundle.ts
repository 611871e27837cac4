// Makes one print bundle (run by the worker's edition.export job, whose
// lifecycle is run.ts), stage by stage: the plates in print order (items.ts),
// each plate's files sized for its slot with its metadata (plate-files.ts), the
// captions, credits, proof and README (bundle-texts.ts), then metadata.json and
// the ZIP, streamed to the exports bucket (pack.ts). Progress goes to the
// export row as it goes. Nothing of the edition or its plates is changed here.
import { getEnv } from "@/lib/env";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { editionExports, editions, type ExportFileEntry } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { writeBundleTexts } from "./bundle-texts";
import { buildItemStems, loadItems } from "./items";
import { packZip, storeZip, writeManifest } from "./pack";
import { makePlateFiles, type PlatePart } from "./plate-files";

export type ExportReporter = (stage: string, fraction: number) => Promise<void>;

export interface BundleResult {
  objectKey: string;
  zipName: string;
  bytes: number;
  files: ExportFileEntry[];
  warnings: string[];
  plates: number;
}

/**
 * Makes the bundle of an export and stores it; returns what the row records.
 * Throws AppError with a message naming the plate and the fault on bad data.
 */
export async function makeBundle(db: DbOrTx, exportId: string, report: ExportReporter): Promise<BundleResult> {
  const [row] = await db.select().from(editionExports).where(eq(editionExports.id, exportId)).limit(1);
  if (!row) throw new AppError("not_found", `Export ${exportId} does not exist.`);
  const [edition] = await db.select().from(editions).where(eq(editions.id, row.editionId)).limit(1);
  if (!edition) throw new AppError("not_found", "The edition of this export is gone.");
  const items = await loadItems(db, edition.id);
  if (items.length === 0) throw new AppError("conflict", `"${edition.title}" has no plates to export.`);
  const society = await findSocietySettings(db);
  const { options } = row;
  const cmykProfilePath = getEnv().EDITION_CMYK_ICC_PROFILE || undefined;
  const stems = buildItemStems(options.fileNameTemplate, items);

  const dir = await mkdtemp(join(tmpdir(), "crownlight-edition-export-"));
  try {
    const parts: PlatePart[] = [];
    const perItem = 0.8 / items.length;
    for (const [i, it] of items.entries()) {
      const step = (what: string, within: number) => report(`Plate ${it.position} of ${items.length}: ${what}`, 0.05 + (i + within) * perItem);
      parts.push(await makePlateFiles(it, stems[i], { dir, society, cmyk: options.cmyk, greyscale: options.greyscale, cmykProfilePath }, step));
    }
    const warnings = parts.flatMap((p) => p.notes.map((note) => `Plate ${p.house.position}: ${note}.`));

    await report("Captions, credits and the proof", 0.86);
    const { files, cmykFacts } = await writeBundleTexts(dir, { edition, societyName: society.name, parts, cmyk: options.cmyk, greyscale: options.greyscale, cmykProfilePath, warnings });
    const entries = await writeManifest(dir, files, { edition, societyName: society.name, options, cmykFacts, cmykProfilePath, plates: parts.map((p) => p.meta), warnings });

    await report("Packing the ZIP", 0.9);
    const zip = await packZip(dir, files, edition);
    await report("Storing the ZIP", 0.95);
    const stored = await storeZip(zip, edition.id, exportId);
    return { ...stored, files: entries, warnings, plates: items.length };
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
