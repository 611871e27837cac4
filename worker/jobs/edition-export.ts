import { UnrecoverableError } from "bullmq";
import { and, eq, inArray, sql } from "drizzle-orm";
import { editionExports } from "@/db/schema";
import { failExport, finishExport, makeBundle } from "@/lib/editions/export/bundle";
import { AppError } from "@/lib/errors";
import { MediaError } from "@/lib/media/errors";
import type { JobHandler } from "@/lib/queue/job-context";

/**
 * Makes one print bundle. A bundle already done is left alone; bad data (a
 * plate withdrawn since, a rendition missing, an unreadable image) fails the
 * export at once with the reason; anything else is retried, and fails the
 * export on the last attempt. The edition changes only when the ZIP is stored.
 */
export const exportEdition: JobHandler<"edition.export"> = async ({ db, payload, report, isFinalAttempt }) => {
  const [row] = await db.select({ state: editionExports.state }).from(editionExports).where(eq(editionExports.id, payload.exportId)).limit(1);
  if (!row) throw new UnrecoverableError(`export ${payload.exportId} does not exist`);
  // Only an export still under way is taken: a finished or failed one, or one another run took meanwhile, is left alone.
  const [taken] = await db
    .update(editionExports)
    .set({ state: "running", startedAt: sql`now()`, error: null })
    .where(and(eq(editionExports.id, payload.exportId), inArray(editionExports.state, ["queued", "running"])))
    .returning({ id: editionExports.id });
  if (!taken) return;
  const progress = async (stage: string, fraction: number) => {
    await db.update(editionExports).set({ stage, progress: fraction }).where(and(eq(editionExports.id, payload.exportId), eq(editionExports.state, "running")));
    await report(stage, fraction);
  };
  let result: Awaited<ReturnType<typeof makeBundle>>;
  try {
    result = await makeBundle(db, payload.exportId, progress);
  } catch (err) {
    // Bad data (a plate withdrawn since, a rendition missing or unreadable, a template that cannot be followed): no retry.
    if (err instanceof AppError || err instanceof MediaError) {
      await failExport(db, payload.exportId, err.message);
      throw new UnrecoverableError(err.message);
    }
    if (isFinalAttempt) {
      await failExport(db, payload.exportId, `the bundle could not be made (${err instanceof Error ? err.message : String(err)})`);
    } else {
      await db
        .update(editionExports)
        .set({ state: "queued", stage: "Retrying after an error" })
        .where(and(eq(editionExports.id, payload.exportId), eq(editionExports.state, "running")));
    }
    throw err;
  }
  await finishExport(db, payload.exportId, result);
};
