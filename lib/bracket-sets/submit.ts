// Sending a bracket set for review: the owner moves it from gathering (or
// changes requested: a resubmission) to awaiting review once a reduction of it
// has finished, and every curator gets a mail with a link to the set. The move
// is the review state machine's "submit", applied by lib/review/move.ts like a
// curator's decision, so it is kept in the review history and the audit log.
import { and, count, eq, ne } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { frames, userRoles, users } from "@/db/schema";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { appLink } from "@/lib/email/app-link";
import { reviewRequestedMail } from "@/lib/email/templates";
import { forbidden } from "@/lib/errors";
import { applyReviewMove } from "@/lib/review/move";
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

  const society = (await findSocietySettings(db)).name;
  const curators = await db
    .select({ name: users.name, email: users.email })
    .from(users)
    .innerJoin(userRoles, eq(userRoles.userId, users.id))
    .where(and(eq(userRoles.role, "curator"), eq(users.emailVerified, true), ne(users.id, a.userId)));
  // Curators open the set on their desk.
  const url = appLink(`/review/sets/${set.id}`);
  const mails = curators.map((c) => reviewRequestedMail(society, c.email, c.name, { name: set.name, photographerName: a.name, url, isResubmission: plan.isResubmission }));

  const moved = await applyReviewMove(db, { set, plan, actorId: a.userId, mails });
  const [{ n }] = await db.select({ n: count() }).from(frames).where(eq(frames.bracketSetId, set.id));
  return toSummary(moved.set, a, a.name, n);
}
