// A curator's decision on a bracket set: the move checked against the state
// machine, the reason against the society's list, and applied by move.ts in one
// transaction (the set's state if it is still where the curator saw it, the
// decision row, the private note, the audit entry and the mail to the
// photographer).
import { eq } from "drizzle-orm";
import { z } from "zod";
import type { Db, DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { users, type ReviewReason } from "@/db/schema";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { findVisibleSet } from "@/lib/bracket-sets/access";
import { appLink } from "@/lib/email/app-link";
import { reviewDecisionMail } from "@/lib/email/templates";
import { AppError } from "@/lib/errors";
import { parseInput } from "@/lib/validation";
import { applyReviewMove } from "./move";
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
  const [owner] = await db.select({ name: users.name, email: users.email }).from(users).where(eq(users.id, set.ownerId)).limit(1);
  const society = (await findSocietySettings(db)).name;
  const mails = owner
    ? [reviewDecisionMail(society, owner.email, owner.name, { action: input.action, setName: set.name, reason: reason?.label ?? null, message, url: appLink(`/studio/sets/${set.id}`) })]
    : [];
  const { decision } = await applyReviewMove(db, { set, plan, actorId: curator.userId, reason, message, note: input.note ?? null, mails });

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
