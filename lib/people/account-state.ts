// What the sign-in machinery (lib/auth/auth.ts) asks about an account: is it
// disabled, is it still waiting for its first password (an invitation), and
// who invited it. Free of lib/auth imports, so better-auth's setup can use it.
import { and, desc, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { accounts, auditLog, userRoles, users, verifications } from "@/db/schema";
import { ROLE_LABELS, type Role } from "@/lib/auth/roles";

/** How long an invitation link works (a reset link works for one hour). */
export const INVITATION_VALID_DAYS = 7;

/** True while the person has never chosen a password: the reset mail is then their invitation. */
export async function isAwaitingFirstPassword(db: DbOrTx, userId: string): Promise<boolean> {
  const [row] = await db.select({ id: accounts.id }).from(accounts).where(and(eq(accounts.userId, userId), eq(accounts.providerId, "credential"))).limit(1);
  return !row;
}

/** An invitation's link lives longer than a reset link: stretch the token better-auth just wrote. */
export async function extendInvitationToken(db: DbOrTx, token: string): Promise<void> {
  await db
    .update(verifications)
    .set({ expiresAt: new Date(Date.now() + INVITATION_VALID_DAYS * 86_400_000) })
    .where(eq(verifications.identifier, `reset-password:${token}`));
}

/** Who invited the person and the roles they hold beyond member, in words, for the invitation mail. */
export async function describeInvitation(db: DbOrTx, userId: string): Promise<{ invitedBy: string; roles: string[] }> {
  const rows = await db.select({ role: userRoles.role }).from(userRoles).where(eq(userRoles.userId, userId));
  const [by] = await db
    .select({ name: users.name })
    .from(auditLog)
    .innerJoin(users, eq(users.id, auditLog.actorId))
    .where(and(eq(auditLog.action, "person.invited"), eq(auditLog.subjectType, "user"), eq(auditLog.subjectId, userId)))
    .orderBy(desc(auditLog.id))
    .limit(1);
  return {
    invitedBy: by?.name ?? "An administrator",
    roles: rows.map((r) => r.role as Role).filter((r) => r !== "member").map((r) => ROLE_LABELS[r].toLowerCase()),
  };
}

/** For the session hook: true when the account is disabled. */
export async function isDisabled(db: DbOrTx, userId: string): Promise<boolean> {
  const [row] = await db.select({ disabledAt: users.disabledAt }).from(users).where(eq(users.id, userId)).limit(1);
  return row?.disabledAt != null;
}
