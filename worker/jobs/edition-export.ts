import { UnrecoverableError } from "bullmq";
import { eq, sql } from "drizzle-orm";
import { editionExports, jobRuns } from "@/db/schema";
import { failExport, finishExport, makeBundle } from "@/lib/editions/export/bundle";
import { AppError } from "@/lib/errors";
import { MediaError } from "@/lib/media/errors";
import { JOBS } from "@/lib/queue/jobs";
import type { JobHandler } from "../registry";

/**
 * Makes one print bundle. A bundle already done is left alone; bad data (a
 * plate withdrawn since, a rendition missing, an unreadable image) fails the
 * export at once with the reason; anything else is retried, and fails the
 * export on the last attempt. The edition changes only when the ZIP is stored.
 */
export const exportEdition: JobHandler<"edition.export"> = async ({ db, jobId, payload, report }) => {
  const [row] = await db.select({ state: editionExports.state }).from(editionExports).where(eq(editionExports.id, payload.exportId)).limit(1);
  if (!row) throw new UnrecoverableError(`export ${payload.exportId} does not exist`);
  if (row.state === "done" || row.state === "failed") return;
  await db.update(editionExports).set({ state: "running", startedAt: sql`now()`, error: null }).where(eq(editionExports.id, payload.exportId));
  const progress = async (stage: string, fraction: number) => {
    await db.update(editionExports).set({ stage, progress: fraction }).where(eq(editionExports.id, payload.exportId));
    await report(stage, fraction);
  };
  try {
    const result = await makeBundle(db, payload.exportId, progress);
    await finishExport(db, payload.exportId, result);
  } catch (err) {
    if (err instanceof AppError || err instanceof MediaError || err instanceof RangeError) {
      await failExport(db, payload.exportId, err.message);
      throw new UnrecoverableError(err.message);
    }
    const [run] = await db.select({ attempts: jobRuns.attempts }).from(jobRuns).where(eq(jobRuns.id, jobId)).limit(1);
    if ((run?.attempts ?? 0) >= JOBS["edition.export"].attempts) {
      await failExport(db, payload.exportId, `the bundle could not be made (${err instanceof Error ? err.message : String(err)})`);
    } else {
      await db.update(editionExports).set({ state: "queued", stage: "Retrying after an error" }).where(eq(editionExports.id, payload.exportId));
    }
    throw err;
  }
};
