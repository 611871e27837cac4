// Sending a bracket set for review: the owner moves it from gathering (or
// changes requested: a resubmission) to awaiting review once a reduction of it
// has finished, and every curator gets a mail with a link to the set. The move
// is the review state machine's "submit"; it is kept in the review history and
// the audit log like a curator's decision.
import { and, count, desc, eq, ne } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { bracketSets, frames, reductions, reviewDecisions, userRoles, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { appLink } from "@/lib/email/app-link";
import { sendStagedMail, stageMail } from "@/lib/email/outbox";
import { reviewRequestedMail } from "@/lib/email/templates";
import { AppError, forbidden } from "@/lib/errors";
import { planTransition } from "@/lib/review/state-machine";
import { findVisibleSet } from "./access";
import { toSummary } from "./bracket-sets";
import type { BracketSetSummaryDto } from "./dto";

export async function submitBracketSet(db: DbOrTx, actor: Actor | null, setId: string): Promise<BracketSetSummaryDto> {
  const { actor: a, set } = await findVisibleSet(db, actor, setId);
  if (set.ownerId !== a.userId) throw forbidden("sending another photographer's bracket set for review");
  requirePermission(a, "brackets:own");
  // Refuses, naming the state, a set already on the desk or decided.
  const plan = planTransition(set.state, "submit", "owner");
  const [finished] = await db
    .select({ id: reductions.id, pipelineVersion: reductions.pipelineVersion })
    .from(reductions)
    .where(and(eq(reductions.bracketSetId, set.id), eq(reductions.state, "done")))
    .orderBy(desc(reductions.createdAt))
    .limit(1);
  if (!finished) {
    throw new AppError("conflict", `The bracket set "${set.name}" has no finished reduction yet; start one, wait until it is done, then send the set for review.`);
  }

  const society = (await findSocietySettings(db)).name;
  const curators = await db
    .select({ name: users.name, email: users.email })
    .from(users)
    .innerJoin(userRoles, eq(userRoles.userId, users.id))
    .where(and(eq(userRoles.role, "curator"), eq(users.emailVerified, true), ne(users.id, a.userId)));
  // Curators open the set on their desk.
  const url = appLink(`/review/sets/${set.id}`);

  const { updated, outboxIds } = await db.transaction(async (tx) => {
    const [row] = await tx
      .update(bracketSets)
      .set({ state: "awaiting-review", updatedAt: new Date() })
      .where(and(eq(bracketSets.id, set.id), eq(bracketSets.ownerId, a.userId), eq(bracketSets.state, plan.from)))
      .returning();
    // Another request moved the set first: nothing is sent twice.
    if (!row) throw new AppError("conflict", `The bracket set "${set.name}" has just been sent for review.`);
    const [decision] = await tx
      .insert(reviewDecisions)
      .values({ bracketSetId: set.id, fromState: plan.from, toState: plan.to, action: "submit", decidedBy: a.userId, reductionId: finished.id, pipelineVersion: finished.pipelineVersion })
      .returning({ id: reviewDecisions.id });
    await recordAudit(tx, {
      actorId: a.userId,
      action: plan.isResubmission ? "review.resubmit" : "review.submit",
      subjectType: "bracket-set",
      subjectId: set.id,
      detail: { from: plan.from, to: plan.to, reason: null, pipelineVersion: finished.pipelineVersion, reductionId: finished.id, decisionId: decision.id },
    });
    const ids: string[] = [];
    for (const c of curators) {
      ids.push(await stageMail(tx, reviewRequestedMail(society, c.email, c.name, { name: set.name, photographerName: a.name, url, isResubmission: plan.isResubmission })));
    }
    return { updated: row, outboxIds: ids };
  });
  // Queued after the commit, so the mail job always finds its message.
  await sendStagedMail(db, outboxIds);
  const [{ n }] = await db.select({ n: count() }).from(frames).where(eq(frames.bracketSetId, set.id));
  return toSummary(updated, a, a.name, n);
}
