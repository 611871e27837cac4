// People and their roles, for admins. Every function takes the actor and
// checks it; responses are DTOs, never rows.
import { and, asc, count, eq, exists, ilike, isNotNull, isNull, or, type SQL } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "@/db/client";
import { deleteRole, findRolesOfUser, findRolesOfUsers, insertRole } from "@/db/queries/roles";
import { userRoles, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { ROLES, type Role } from "@/lib/auth/roles";
import { AppError, notFound } from "@/lib/errors";
import { strictNumber } from "@/lib/strict-number";

export interface PersonDto {
  id: string;
  name: string;
  email: string;
  emailVerified: boolean;
  roles: Role[];
  joinedAt: string;
  /** When an admin disabled the account; null while it may sign in. */
  disabledAt: string | null;
}

export interface PeoplePage {
  people: PersonDto[];
  total: number;
  page: number;
  pageSize: number;
}

export const peopleQuerySchema = z.object({
  q: z.string().trim().max(100).optional().default(""),
  page: strictNumber(z.number().int().min(1).max(10_000).optional().default(1)),
  pageSize: strictNumber(z.number().int().min(5).max(100).optional().default(20)),
  /** Only people holding this role; empty for everyone. */
  role: z.preprocess((v) => (v === "" ? undefined : v), z.enum(ROLES, { error: "is not one of the roles" }).optional()),
  /** Only people who may sign in, or only those disabled. */
  status: z.preprocess((v) => (v === "" ? undefined : v), z.enum(["active", "disabled"], { error: "must be active or disabled" }).optional()),
});
export type PeopleQuery = z.infer<typeof peopleQuerySchema>;

export async function listPeople(db: Db, actor: Actor | null, query: PeopleQuery): Promise<PeoplePage> {
  requirePermission(actor, "people:list", "listing people");
  const pattern = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
  const conditions: SQL[] = [];
  if (query.q) conditions.push(or(ilike(users.name, pattern), ilike(users.email, pattern))!);
  if (query.role) conditions.push(exists(db.select({ one: userRoles.userId }).from(userRoles).where(and(eq(userRoles.userId, users.id), eq(userRoles.role, query.role)))));
  if (query.status === "disabled") conditions.push(isNotNull(users.disabledAt));
  if (query.status === "active") conditions.push(isNull(users.disabledAt));
  const where = conditions.length ? and(...conditions) : undefined;
  const [{ total }] = await db.select({ total: count() }).from(users).where(where);
  const rows = await db
    .select({ id: users.id, name: users.name, email: users.email, emailVerified: users.emailVerified, createdAt: users.createdAt, disabledAt: users.disabledAt })
    .from(users)
    .where(where)
    .orderBy(asc(users.name), asc(users.id))
    .limit(query.pageSize)
    .offset((query.page - 1) * query.pageSize);
  const roles = await findRolesOfUsers(
    db,
    rows.map((r) => r.id),
  );
  return {
    people: rows.map((r) => ({
      id: r.id,
      name: r.name,
      email: r.email,
      emailVerified: r.emailVerified,
      roles: sortRoles(roles.get(r.id) ?? []),
      joinedAt: r.createdAt.toISOString(),
      disabledAt: r.disabledAt?.toISOString() ?? null,
    })),
    total,
    page: query.page,
    pageSize: query.pageSize,
  };
}

function sortRoles(roles: Role[]): Role[] {
  return [...roles].sort((a, b) => ROLES.indexOf(a) - ROLES.indexOf(b));
}

export const roleChangeSchema = z.object({
  role: z.enum(ROLES, { error: `expected one of ${ROLES.join(", ")}` }),
  grant: z.boolean({ error: "expected true (grant) or false (revoke)" }),
});
export type RoleChange = z.infer<typeof roleChangeSchema>;

/**
 * Grants or revokes one role; writes the audit log. Refuses an admin who
 * revokes their own admin role (another admin must), and the last admin.
 */
export async function changeRole(db: Db, actor: Actor | null, userId: string, change: RoleChange): Promise<Role[]> {
  const admin = requirePermission(actor, "roles:grant", "changing roles");
  if (!change.grant && change.role === "admin" && userId === admin.userId) {
    throw new AppError("conflict", "You cannot revoke your own administrator role: ask another administrator to do it.");
  }
  return db.transaction(async (tx) => {
    const [target] = await tx.select({ id: users.id, email: users.email }).from(users).where(eq(users.id, userId)).limit(1);
    if (!target) throw notFound("That person");
    if (!change.grant && change.role === "admin") {
      // Serialize concurrent revocations so two admins cannot remove each other.
      await tx.execute("lock table user_roles in share row exclusive mode");
      const [{ admins }] = await tx.select({ admins: count() }).from(userRoles).where(eq(userRoles.role, "admin"));
      const held = (await findRolesOfUser(tx, userId)).includes("admin");
      if (held && admins <= 1) throw new AppError("conflict", "This is the last administrator; grant the role to someone else first.");
    }
    const changed = change.grant ? await insertRole(tx, userId, change.role, admin.userId) : await deleteRole(tx, userId, change.role);
    if (changed) {
      await recordAudit(tx, {
        actorId: admin.userId,
        action: change.grant ? "role.granted" : "role.revoked",
        subjectType: "user",
        subjectId: userId,
        detail: { role: change.role, email: target.email },
      });
    }
    return sortRoles(await findRolesOfUser(tx, userId));
  });
}
