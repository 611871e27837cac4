// A reduction's lifecycle in the worker: every state its row takes while its
// job runs (running, queued again for a retry, done, failed) is written here,
// and the person who started it is told the outcome. The reduction itself is
// computed as a stepped flow (lib/reduction-flow), which calls these; the job's
// handler only calls runReductionJob.
import { UnrecoverableError, WaitingChildrenError, type Job } from "bullmq";
import { and, eq, inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { bracketSets, reductions, users, type Reduction } from "@/db/schema";
import { appLink } from "@/lib/email/app-link";
import { sendStagedMail, stageMail } from "@/lib/email/outbox";
import { reductionFailedMail, reductionFinishedMail } from "@/lib/email/templates";
import { isFailedForGood, type BasicJobContext } from "@/lib/queue/job-context";
import { deleteReductionWork } from "@/lib/reduction-flow/work-store";

/** States in which a reduction has not ended: only these may end. */
const OPEN_STATES = ["queued", "running"] as const;

/**
 * The reduction.run job. A reduction already done is left alone (a repeated job
 * changes nothing but the mail, sent once); `runFlow` computes it (a parent taken
 * again after a crash resumes at the step it had reached). A fault that will be
 * retried shows the reduction queued with its reason; the flow records a failure
 * for good itself (failReduction). Originals are only read.
 */
export async function runReductionJob<C extends BasicJobContext<{ reductionId: string }>>(ctx: C, runFlow: (ctx: C) => Promise<unknown>): Promise<void> {
  const { db, payload } = ctx;
  const [red] = await db.select({ id: reductions.id, state: reductions.state }).from(reductions).where(eq(reductions.id, payload.reductionId)).limit(1);
  if (!red) throw new UnrecoverableError(`reduction ${payload.reductionId} does not exist`);
  if (red.state === "done") return notifyReductionOutcome(db, red.id);
  try {
    await runFlow(ctx);
  } catch (err) {
    // Waiting for parts is not a fault.
    if (!(err instanceof WaitingChildrenError) && !(err instanceof UnrecoverableError) && !ctx.isFinalAttempt) {
      await db.update(reductions).set({ state: "queued", error: (err as Error).message }).where(eq(reductions.id, red.id));
    }
    throw err;
  }
  // Outside the flow: a fault in queueing the mail must not put a finished reduction back in the queue.
  await notifyReductionOutcome(db, red.id);
}

/** The run has its inputs and starts computing. */
export async function markReductionRunning(db: DbOrTx, reductionId: string): Promise<void> {
  await db.update(reductions).set({ state: "running", startedAt: sql`now()`, error: null, progress: 0 }).where(eq(reductions.id, reductionId));
}

/** What a finished reduction records besides its state. */
export type ReductionRecord = Pick<Reduction, "pipelineVersion" | "outputs" | "measurements">;

/** The outputs are stored: the reduction is done. */
export async function markReductionDone(db: DbOrTx, reductionId: string, record: ReductionRecord): Promise<void> {
  await db
    .update(reductions)
    .set({
      ...record,
      state: "done",
      stage: "done",
      // A retry that recovered leaves no fault behind.
      error: null,
      progress: 1,
      stageFramesDone: null,
      stageFramesTotal: null,
      finishedAt: sql`now()`,
    })
    .where(eq(reductions.id, reductionId));
}

/**
 * Ends a reduction that has not ended as failed for good with its reason (in
 * people's words), deletes the pieces its parts handed each other and tells the
 * person who started it. A reduction already done or failed stays as it is.
 */
export async function failReduction(db: DbOrTx, reductionId: string, reason: string): Promise<void> {
  const [failed] = await db
    .update(reductions)
    .set({ state: "failed", error: reason, finishedAt: sql`now()` })
    .where(and(eq(reductions.id, reductionId), inArray(reductions.state, OPEN_STATES)))
    .returning({ id: reductions.id });
  if (!failed) return;
  await notifyReductionOutcome(db, reductionId);
  await deleteReductionWork(reductionId).catch(() => undefined);
}

/**
 * For a reduction.run job the queue has given up on, from the worker's "failed"
 * event. BullMQ fails a job that stalled more often than allowed without calling
 * its handler, so the flow's own failure path never ran: the reduction is ended
 * here, unless it has ended already. `heldFailed`: BullMQ itself holds the job as
 * failed (the mirrors' settle read it there, the event having been lost), so it is
 * final whatever its attempts say.
 */
export async function failReductionGivenUp(db: DbOrTx, job: Pick<Job, "data" | "attemptsMade" | "opts">, err: Error, heldFailed = false): Promise<void> {
  const isStalled = /stalled more than allowable limit/.test(err.message);
  if (!isStalled && !heldFailed && !isFailedForGood(job, err)) return;
  const words = isStalled ? "the worker processes running it stopped responding more than once (killed, or out of memory); start the reduction again" : err.message;
  await failReduction(db, (job.data as { reductionId: string }).reductionId, words);
}

/**
 * Tells the person who started the reduction that it finished or failed for
 * good, with a link to it: the photographer for their own runs (link to the
 * studio), the curator for a re-reduction started on the review desk (link to
 * the set on the desk; the photographer is not written to about curators'
 * trials). Runs without a known starter go to the set's owner. One outbox
 * message per reduction: a repeated job, or a crash between the state change
 * and this call, sends it once.
 */
export async function notifyReductionOutcome(db: DbOrTx, reductionId: string): Promise<void> {
  const [row] = await db
    .select({ state: reductions.state, error: reductions.error, setId: bracketSets.id, setName: bracketSets.name, ownerId: bracketSets.ownerId, requestedBy: reductions.requestedBy })
    .from(reductions)
    .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
    .where(eq(reductions.id, reductionId))
    .limit(1);
  if (!row || (row.state !== "done" && row.state !== "failed")) return;
  const byCurator = row.requestedBy !== null && row.requestedBy !== row.ownerId;
  const [to] = await db
    .select({ name: users.name, email: users.email })
    .from(users)
    .where(eq(users.id, byCurator ? row.requestedBy! : row.ownerId))
    .limit(1);
  if (!to) return;
  const society = (await findSocietySettings(db)).name;
  const url = appLink(byCurator ? `/review/sets/${row.setId}#reductions-h` : `/studio/reductions/${reductionId}`);
  const outcome = { setName: row.setName, url, isReReduction: byCurator };
  const draft =
    row.state === "done"
      ? reductionFinishedMail(society, to.email, to.name, outcome)
      : reductionFailedMail(society, to.email, to.name, { ...outcome, reason: row.error ?? "no reason was recorded" });
  await sendStagedMail(db, [await stageMail(db, { id: `reduction-outcome-${reductionId}`, ...draft })]);
}
