// Invitations and disabled accounts, for admins. An invited person gets an
// account without a password and a mail with a link to choose one (better-auth's
// password-reset flow, which creates the credential on first use); a disabled
// person cannot sign in (the session hook in lib/auth/auth.ts) and loses the
// sessions they had.
import { randomUUID } from "node:crypto";
import { and, count, eq, isNull, sql } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "@/db/client";
import { insertRole } from "@/db/queries/roles";
import { sessions, userRoles, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { ROLES, type Role } from "@/lib/auth/roles";
import { AppError, notFound } from "@/lib/errors";
import { parseInput } from "@/lib/validation";

import { INVITATION_VALID_DAYS } from "./account-state";

export { INVITATION_VALID_DAYS };

export const inviteSchema = z.object({
  name: z.string().trim().min(1, { error: "give the person's name" }).max(100, { error: "must be at most 100 characters" }),
  email: z.string().trim().toLowerCase().pipe(z.email({ error: "is not an e-mail address" })),
  roles: z.array(z.enum(ROLES, { error: "is not one of the roles" })).max(ROLES.length).default([]),
});
export type InviteInput = z.infer<typeof inviteSchema>;

/** Sends the invitation link: better-auth writes the token and calls sendResetPassword (which words it as an invitation). */
export type SendInvitationLink = (email: string) => Promise<void>;

/**
 * Makes an account for `email` with the member role and the roles chosen, and
 * mails the person a link to choose their password. Refuses an address that
 * already has an account.
 */
export async function invitePerson(db: Db, actor: Actor | null, input: unknown, sendLink: SendInvitationLink): Promise<{ id: string; roles: Role[] }> {
  const admin = requirePermission(actor, "roles:grant", "inviting people");
  const { name, email, roles } = parseInput(inviteSchema, input);
  const granted = [...new Set<Role>(["member", ...roles])];
  const id = await db.transaction(async (tx) => {
    const [taken] = await tx.select({ id: users.id }).from(users).where(eq(sql`lower(${users.email})`, email)).limit(1);
    if (taken) throw new AppError("conflict", `${email} already has an account.`, [{ field: "email", message: "already has an account" }]);
    const newId = randomUUID();
    // The address is proven when the person uses the link mailed to it; until then the account has no password.
    await tx.insert(users).values({ id: newId, name, email, emailVerified: true });
    for (const role of granted) await insertRole(tx, newId, role, admin.userId);
    await recordAudit(tx, { actorId: admin.userId, action: "person.invited", subjectType: "user", subjectId: newId, detail: { email, roles: granted } });
    return newId;
  });
  await sendLink(email);
  return { id, roles: granted };
}

export const disableSchema = z.object({ disabled: z.boolean({ error: "must be yes or no" }) });

/**
 * Disables a person (they cannot sign in, and their sessions end now) or
 * enables them again. An admin cannot disable themselves, nor the last admin
 * who can still sign in.
 */
export async function setPersonDisabled(db: Db, actor: Actor | null, userId: string, input: unknown): Promise<{ disabled: boolean }> {
  const admin = requirePermission(actor, "roles:grant", "disabling people");
  const { disabled } = parseInput(disableSchema, input);
  if (disabled && userId === admin.userId) throw new AppError("conflict", "You cannot disable your own account: ask another administrator.");
  return db.transaction(async (tx) => {
    const [target] = await tx.select({ id: users.id, email: users.email, disabledAt: users.disabledAt }).from(users).where(eq(users.id, userId)).for("update").limit(1);
    if (!target) throw notFound("That person");
    if (disabled === (target.disabledAt !== null)) return { disabled };
    if (disabled) {
      // Serialized with role changes (lib/people/people.ts takes the same lock).
      await tx.execute("lock table user_roles in share row exclusive mode");
      const [{ admins }] = await tx
        .select({ admins: count() })
        .from(userRoles)
        .innerJoin(users, eq(users.id, userRoles.userId))
        .where(and(eq(userRoles.role, "admin"), isNull(users.disabledAt)));
      const [isAdmin] = await tx.select({ one: userRoles.userId }).from(userRoles).where(and(eq(userRoles.userId, userId), eq(userRoles.role, "admin"))).limit(1);
      if (isAdmin && admins <= 1) throw new AppError("conflict", "This is the last administrator who can sign in; grant the role to someone else first.");
    }
    await tx.update(users).set({ disabledAt: disabled ? new Date() : null, updatedAt: new Date() }).where(eq(users.id, userId));
    if (disabled) await tx.delete(sessions).where(eq(sessions.userId, userId));
    await recordAudit(tx, { actorId: admin.userId, action: disabled ? "person.disabled" : "person.enabled", subjectType: "user", subjectId: userId, detail: { email: target.email } });
    return { disabled };
  });
}
