// A composite's run in the worker: its lifecycle (running, done, failed, or
// queued again for a retry) lives here, the handler only calls it. The inputs'
// masters are read from where their reductions stored them; the composite is
// made on a thread of its own (lib/composite-runner/run-in-thread.ts) and its
// folder stored under its own prefix. Keys are fixed by file name, so a run
// repeated after a crash overwrites what it stored and leaves nothing twice.
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { asc, eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, compositeInputs, composites, reductions } from "@/db/schema";
import { isCompositeInputError, runCompositeInThread } from "@/lib/composite-runner";
import { getEnv } from "@/lib/env";
import type { JobAttempt } from "@/lib/queue/job-context";
import { compositeFilesBase } from "@/lib/reductions/files/manifest";
import { uploadReductionFolder } from "@/lib/reduction-flow/store-outputs";
import { bucketName, buildCompositePrefix, downloadObjectToFile, toSafeFileName } from "@/lib/storage";

/** A fault a retry cannot mend (a missing input, a master the composite refuses): the composite has failed. */
export class CompositeRefusedError extends Error {
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = "CompositeRefusedError";
  }
}

/** Progress is written at most this often (a composite reports many small steps). */
const PROGRESS_EVERY_MS = 1000;

export async function runCompositeJob(db: DbOrTx, compositeId: string, attempt: Pick<JobAttempt, "isFinalAttempt">): Promise<"done" | "already-done"> {
  const [row] = await db.select().from(composites).where(eq(composites.id, compositeId)).limit(1);
  if (!row) throw new CompositeRefusedError(`composite ${compositeId} does not exist`);
  if (row.state === "done") return "already-done";
  const scratch = await mkdtemp(join(tmpdir(), "crownlight-composite-"));
  try {
    await db.update(composites).set({ state: "running", stage: "read", progress: 0, startedAt: sql`coalesce(${composites.startedAt}, now())` }).where(eq(composites.id, compositeId));
    const inputs = await db
      .select({ position: compositeInputs.position, state: reductions.state, outputs: reductions.outputs, setName: bracketSets.name })
      .from(compositeInputs)
      .innerJoin(reductions, eq(reductions.id, compositeInputs.reductionId))
      .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
      .where(eq(compositeInputs.compositeId, compositeId))
      .orderBy(asc(compositeInputs.position));
    const files: string[] = [];
    for (const input of inputs) {
      const key = input.outputs?.master;
      if (input.state !== "done" || !key) throw new CompositeRefusedError(`the reduction of "${input.setName}" has no master to compose`);
      // The set's name says which input is which in the composite's report and header.
      const file = join(scratch, `${input.position + 1}-${toSafeFileName(input.setName)}.fits`);
      await downloadObjectToFile({ bucket: bucketName("derived"), key }, file);
      files.push(file);
    }
    let lastWrite = 0;
    const { outDir, report } = await runCompositeInThread({
      files, outDir: join(scratch, "out"), scaleArcsecPerPx: row.params.scaleArcsecPerPx, refine: row.params.refine, filter: row.params.filter,
      // The pyramids' info.json name the public tile route, as a reduction's do: a plate of the composite serves them there.
      iiifBaseUrl: `${getEnv().APP_URL.replace(/\/+$/, "")}${compositeFilesBase(compositeId)}`,
      onProgress: (stage, fraction) => {
        const now = Date.now();
        if (now - lastWrite < PROGRESS_EVERY_MS && fraction < 1) return;
        lastWrite = now;
        void db.update(composites).set({ stage, progress: Math.min(0.95, fraction) }).where(eq(composites.id, compositeId)).catch(() => undefined);
      },
    });
    await db.update(composites).set({ stage: "store", progress: 0.95 }).where(eq(composites.id, compositeId));
    const prefix = buildCompositePrefix(compositeId);
    await uploadReductionFolder(prefix, outDir, () => undefined);
    await db
      .update(composites)
      .set({
        state: "done", stage: "done", progress: 1, error: null, finishedAt: sql`now()`, pipelineVersion: report.creator,
        outputs: {
          prefix, master: `${prefix}master.fits`, natural: `${prefix}natural.png`, structure: `${prefix}structure.png`, preview: `${prefix}preview.jpg`,
          previewStructure: `${prefix}preview-structure.jpg`, contribution: `${prefix}contribution.jpg`, report: `${prefix}report.json`, tiles: `${prefix}tiles/`,
        },
        measurements: report as unknown as Record<string, unknown>,
      })
      .where(eq(composites.id, compositeId));
    return "done";
  } catch (error) {
    const refused = error instanceof CompositeRefusedError || isCompositeInputError(error);
    const message = error instanceof Error ? error.message : String(error);
    // A refusal fails at once; any other fault shows the composite queued with its reason until the last attempt.
    const state = refused || attempt.isFinalAttempt ? "failed" : "queued";
    await db.update(composites).set({ state, error: message, ...(state === "failed" ? { finishedAt: sql`now()` } : {}) }).where(eq(composites.id, compositeId));
    throw refused && !(error instanceof CompositeRefusedError) ? new CompositeRefusedError(message, { cause: error }) : error;
  } finally {
    await rm(scratch, { recursive: true, force: true });
  }
}
