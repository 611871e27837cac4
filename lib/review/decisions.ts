// A curator's decision on a bracket set, in one transaction: the move checked
// against the state machine and applied only if the set is still where the
// curator saw it (two curators deciding at once: one wins, the other is told),
// the decision row, the private note, the audit entry and the mail to the
// photographer. The mail is queued after the commit so the job finds it.
import { and, desc, eq, isNotNull } from "drizzle-orm";
import { z } from "zod";
import type { Db, DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { bracketSets, curatorNotes, reductions, reviewDecisions, users, type ReviewReason } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { findVisibleSet } from "@/lib/bracket-sets/access";
import { appLink } from "@/lib/email/app-link";
import { sendStagedMail, stageMail } from "@/lib/email/outbox";
import { reviewDecisionMail } from "@/lib/email/templates";
import { AppError } from "@/lib/errors";
import { parseInput } from "@/lib/validation";
import { CURATOR_ACTIONS, planTransition, type CuratorAction, type ReviewState } from "./state-machine";

const optionalText = (max: number) =>
  z
    .string()
    .trim()
    .max(max, { error: `must be at most ${max} characters` })
    .optional()
    .transform((s) => (s ? s : undefined));

export const decisionSchema = z.object({
  action: z.enum(CURATOR_ACTIONS, { error: `expected one of ${CURATOR_ACTIONS.join(", ")}` }),
  reasonCode: optionalText(80),
  message: optionalText(4000),
  note: optionalText(4000),
});
export interface DecisionInput {
  action: CuratorAction;
  reasonCode?: string;
  /** To the photographer, with the mail and on their set's page. */
  message?: string;
  /** Private to curators. */
  note?: string;
}

export interface DecisionDto {
  id: string;
  setId: string;
  action: CuratorAction;
  fromState: ReviewState;
  toState: ReviewState;
  reasonCode: string | null;
  reasonLabel: string | null;
  pipelineVersion: string | null;
  decidedAt: string;
}

/** The reasons a curator may give for an action, from the society's settings. */
export async function reasonsFor(db: DbOrTx, action: CuratorAction): Promise<ReviewReason[]> {
  const s = await findSocietySettings(db);
  return action === "request-changes" ? s.changeReasons : action === "reject" ? s.rejectionReasons : [];
}

/** The set's latest finished reduction: the one the curator's decision rests on. */
async function latestFinishedReduction(db: DbOrTx, setId: string): Promise<{ id: string; pipelineVersion: string | null } | null> {
  const [row] = await db
    .select({ id: reductions.id, pipelineVersion: reductions.pipelineVersion })
    .from(reductions)
    .where(and(eq(reductions.bracketSetId, setId), eq(reductions.state, "done"), isNotNull(reductions.finishedAt)))
    .orderBy(desc(reductions.finishedAt))
    .limit(1);
  if (row) return row;
  // Reductions written without a finish time (older rows) still count.
  const [any] = await db
    .select({ id: reductions.id, pipelineVersion: reductions.pipelineVersion })
    .from(reductions)
    .where(and(eq(reductions.bracketSetId, setId), eq(reductions.state, "done")))
    .orderBy(desc(reductions.createdAt))
    .limit(1);
  return any ?? null;
}

export async function decide(db: Db, actor: Actor | null, setId: string, raw: DecisionInput): Promise<DecisionDto> {
  const curator = requirePermission(actor, "review:use", "decisions on bracket sets");
  const input = parseInput(decisionSchema, raw);
  const { set } = await findVisibleSet(db, curator, setId);
  if (set.ownerId === curator.userId) {
    throw new AppError("forbidden", `"${set.name}" is your own bracket set: another curator has to decide on it.`);
  }
  const plan = planTransition(set.state, input.action, "curator", input);

  // Only the actions that take a reason keep one; it must be on the society's list.
  const reasons = await reasonsFor(db, input.action);
  let reason: ReviewReason | null = null;
  if (reasons.length) {
    reason = reasons.find((r) => r.code === input.reasonCode) ?? null;
    if (!reason) {
      const message = `expected one of ${reasons.map((r) => r.code).join(", ")} (received ${JSON.stringify(input.reasonCode ?? "")})`;
      throw new AppError("invalid_input", `reasonCode: ${message}`, [{ field: "reasonCode", message }]);
    }
  }
  // A message goes to the photographer; reopening tells them only that the set is back on the desk.
  const message = input.action === "reopen" ? null : (input.message ?? null);
  const reduction = await latestFinishedReduction(db, set.id);
  const [owner] = await db.select({ name: users.name, email: users.email }).from(users).where(eq(users.id, set.ownerId)).limit(1);
  const society = (await findSocietySettings(db)).name;

  const { decision, outboxId } = await db.transaction(async (tx) => {
    const [moved] = await tx
      .update(bracketSets)
      .set({ state: plan.to, updatedAt: new Date() })
      .where(and(eq(bracketSets.id, set.id), eq(bracketSets.state, plan.from)))
      .returning({ id: bracketSets.id });
    if (!moved) {
      throw new AppError("conflict", `"${set.name}" is no longer ${plan.from.replace("-", " ")}: someone decided on it a moment ago. Reload the page to see the decision.`);
    }
    const [row] = await tx
      .insert(reviewDecisions)
      .values({
        bracketSetId: set.id,
        fromState: plan.from,
        toState: plan.to,
        action: plan.action,
        reasonCode: reason?.code ?? null,
        reasonLabel: reason?.label ?? null,
        messageToPhotographer: message,
        decidedBy: curator.userId,
        reductionId: reduction?.id ?? null,
        pipelineVersion: reduction?.pipelineVersion ?? null,
      })
      .returning();
    let noteId: string | null = null;
    if (input.note) {
      const [note] = await tx.insert(curatorNotes).values({ bracketSetId: set.id, authorId: curator.userId, decisionId: row.id, body: input.note }).returning({ id: curatorNotes.id });
      noteId = note.id;
    }
    await recordAudit(tx, {
      actorId: curator.userId,
      action: `review.${plan.action}`,
      subjectType: "bracket-set",
      subjectId: set.id,
      // The private note's text stays with the curators; the log points to it.
      detail: { from: plan.from, to: plan.to, reasonCode: reason?.code ?? null, reason: reason?.label ?? null, pipelineVersion: reduction?.pipelineVersion ?? null, reductionId: reduction?.id ?? null, decisionId: row.id, noteId },
    });
    let id: string | null = null;
    if (owner) {
      const mail = reviewDecisionMail(society, owner.email, owner.name, {
        action: input.action,
        setName: set.name,
        reason: reason?.label ?? null,
        message,
        url: appLink(`/studio/sets/${set.id}`),
      });
      id = await stageMail(tx, mail);
    }
    return { decision: row, outboxId: id };
  });
  if (outboxId) await sendStagedMail(db, [outboxId]);

  return {
    id: decision.id,
    setId: set.id,
    action: input.action,
    fromState: decision.fromState,
    toState: decision.toState,
    reasonCode: decision.reasonCode,
    reasonLabel: decision.reasonLabel,
    pipelineVersion: decision.pipelineVersion,
    decidedAt: decision.createdAt.toISOString(),
  };
}
