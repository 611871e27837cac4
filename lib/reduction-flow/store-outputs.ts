// The last of a reduction: its finished output folder goes to S3 under the
// reduction's own prefix, and the reduction is recorded done with its
// measurements (lib/reductions/run.ts).
// Keys are fixed by file name, so a parent that runs this again after a crash
// overwrites what it had stored and leaves nothing twice.
import { readdir, readFile } from "node:fs/promises";
import path from "node:path";
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { reductions } from "@/db/schema";
import { markReductionDone } from "@/lib/reductions/run";
import type { ReductionReport } from "@/lib/reduction-runner/report";
import { findOutputContentType } from "@/lib/reductions/files/manifest";
import { bucketName, buildReductionPrefix, putObjectBytes } from "@/lib/storage";

async function listFiles(dir: string, prefix = ""): Promise<string[]> {
  const out: string[] = [];
  for (const e of await readdir(dir, { withFileTypes: true })) {
    const rel = prefix ? `${prefix}/${e.name}` : e.name;
    if (e.isDirectory()) out.push(...(await listFiles(path.join(dir, e.name), rel)));
    else out.push(rel);
  }
  return out;
}

/**
 * Uploads at once: a reduction holds about 1300 files, most of them tiles of
 * 10 to 60 kB, for which one request at a time waits mostly on the round trip.
 * Eight keep the store busy while holding at most eight files in memory (the
 * large ones, master.fits and the PNGs, are read one by one like the rest).
 */
const UPLOADS_IN_FLIGHT = 8;

/** Stores every file of `outDir` in the derived bucket under `prefix` (keys `prefix` + the file's path in the folder). */
export async function uploadReductionFolder(prefix: string, outDir: string, onProgress: (fraction: number) => void): Promise<void> {
  onProgress(0);
  const outputs = await listFiles(outDir);
  let next = 0;
  let done = 0;
  const lane = async () => {
    while (next < outputs.length) {
      const rel = outputs[next++];
      await putObjectBytes({ bucket: bucketName("derived"), key: prefix + rel }, await readFile(path.join(outDir, rel)), findOutputContentType(rel));
      if (++done % 20 === 0) onProgress(done / outputs.length);
    }
  };
  // A failed upload rejects the whole store (the lanes still running finish their file): the step is retried and overwrites.
  await Promise.all(Array.from({ length: Math.min(UPLOADS_IN_FLIGHT, outputs.length) }, lane));
}

/** Stores every file of `outDir` under the reduction's prefix and marks the reduction done. */
export async function storeReductionOutputs(db: DbOrTx, reductionId: string, outDir: string, report: ReductionReport, onProgress: (fraction: number) => void): Promise<void> {
  const [red] = await db.select({ setId: reductions.bracketSetId }).from(reductions).where(eq(reductions.id, reductionId)).limit(1);
  if (!red) throw new Error(`reduction ${reductionId} does not exist`);
  const prefix = buildReductionPrefix(red.setId, reductionId);
  await uploadReductionFolder(prefix, outDir, onProgress);
  const overall = report.overall as Record<string, unknown>;
  await markReductionDone(db, reductionId, {
    pipelineVersion: report.pipelineVersion,
    outputs: {
      prefix,
      master: `${prefix}master.fits`,
      natural: `${prefix}natural.png`,
      structure: `${prefix}structure.png`,
      preview: `${prefix}preview.jpg`,
      report: `${prefix}report.json`,
      tiles: `${prefix}tiles/`,
    },
    measurements: { ...overall, parameters: report.parameters, timingsMs: report.timingsMs },
  });
}
