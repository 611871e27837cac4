// One move of a bracket set's review, the photographer's submission and a
// curator's decision alike, in one transaction: the set's state changes only if
// it is still where the mover saw it (two moves at once: one wins, the other is
// told), then the decision row naming the reduction decided on, the private
// note, the audit entry and the mail. The mail is sent after the commit, so its
// job always finds the message. Which moves exist and who may make them is
// state-machine.ts's; the callers check the actor and write the mail.
import { and, desc, eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, curatorNotes, reductions, reviewDecisions, type BracketSet, type ReviewDecision, type ReviewReason } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { sendStagedMail, stageMail, type MailDraft } from "@/lib/email/outbox";
import { AppError } from "@/lib/errors";
import type { PlannedTransition } from "./state-machine";

export interface DecidedReduction {
  id: string;
  pipelineVersion: string | null;
}

/**
 * The reduction a move is decided on: the set's latest finished reduction, that
 * is the done reduction that finished last (one without a finish time, from
 * before those were kept, counts after every timed one, newest created first).
 * The one rule for submissions and decisions, so both record the same reduction.
 */
export async function findDecidedReduction(db: DbOrTx, setId: string): Promise<DecidedReduction | null> {
  const [row] = await db
    .select({ id: reductions.id, pipelineVersion: reductions.pipelineVersion })
    .from(reductions)
    .where(and(eq(reductions.bracketSetId, setId), eq(reductions.state, "done")))
    .orderBy(sql`${reductions.finishedAt} desc nulls last`, desc(reductions.createdAt), desc(reductions.id))
    .limit(1);
  return row ?? null;
}

export interface ReviewMove {
  set: Pick<BracketSet, "id" | "name">;
  plan: PlannedTransition;
  /** Who moves: the photographer submitting, or the curator deciding. */
  actorId: string;
  /** The reason chosen from the society's list, for the moves that take one. */
  reason?: ReviewReason | null;
  /** To the photographer, kept with the decision. */
  message?: string | null;
  /** Private to curators. */
  note?: string | null;
  /** The mail the move sends (curators for a submission, the photographer for a decision). */
  mails: MailDraft[];
}

export interface ReviewMoveResult {
  set: BracketSet;
  decision: ReviewDecision;
  reduction: DecidedReduction | null;
}

/** Applies a planned move; refuses a submission of a set without a finished reduction, and a move another one overtook. */
export async function applyReviewMove(db: DbOrTx, move: ReviewMove): Promise<ReviewMoveResult> {
  const { set, plan, actorId, reason = null, message = null, note = null } = move;
  const { result, mailIds } = await db.transaction(async (tx) => {
    const reduction = await findDecidedReduction(tx, set.id);
    if (!reduction && plan.action === "submit") {
      throw new AppError("conflict", `The bracket set "${set.name}" has no finished reduction yet; start one, wait until it is done, then send the set for review.`);
    }
    const [moved] = await tx
      .update(bracketSets)
      .set({ state: plan.to, updatedAt: new Date() })
      .where(and(eq(bracketSets.id, set.id), eq(bracketSets.state, plan.from)))
      .returning();
    if (!moved) {
      throw new AppError(
        "conflict",
        plan.action === "submit"
          ? `The bracket set "${set.name}" has just been sent for review.`
          : `"${set.name}" is no longer ${plan.from.replace("-", " ")}: someone decided on it a moment ago. Reload the page to see the decision.`,
      );
    }
    const [decision] = await tx
      .insert(reviewDecisions)
      .values({
        bracketSetId: set.id,
        fromState: plan.from,
        toState: plan.to,
        action: plan.action,
        reasonCode: reason?.code ?? null,
        reasonLabel: reason?.label ?? null,
        messageToPhotographer: message,
        decidedBy: actorId,
        reductionId: reduction?.id ?? null,
        pipelineVersion: reduction?.pipelineVersion ?? null,
      })
      .returning();
    let noteId: string | null = null;
    if (note) {
      const [row] = await tx.insert(curatorNotes).values({ bracketSetId: set.id, authorId: actorId, decisionId: decision.id, body: note }).returning({ id: curatorNotes.id });
      noteId = row.id;
    }
    await recordAudit(tx, {
      actorId,
      action: plan.isResubmission ? "review.resubmit" : `review.${plan.action}`,
      subjectType: "bracket-set",
      subjectId: set.id,
      // The private note's text stays with the curators; the log points to it.
      detail: { from: plan.from, to: plan.to, reasonCode: reason?.code ?? null, reason: reason?.label ?? null, pipelineVersion: reduction?.pipelineVersion ?? null, reductionId: reduction?.id ?? null, decisionId: decision.id, noteId },
    });
    const ids: string[] = [];
    for (const mail of move.mails) ids.push(await stageMail(tx, mail));
    return { result: { set: moved, decision, reduction }, mailIds: ids };
  });
  await sendStagedMail(db, mailIds);
  return result;
}
