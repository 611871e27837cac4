import { and, eq, inArray } from "drizzle-orm";
import { isRole, type Role } from "@/lib/auth/roles";
import type { DbOrTx } from "../client";
import { userRoles } from "../schema";

export async function findRolesOfUser(db: DbOrTx, userId: string): Promise<Role[]> {
  const rows = await db.select({ role: userRoles.role }).from(userRoles).where(eq(userRoles.userId, userId));
  return rows.map((r) => r.role).filter(isRole);
}

export async function findRolesOfUsers(db: DbOrTx, userIds: string[]): Promise<Map<string, Role[]>> {
  const map = new Map<string, Role[]>();
  if (userIds.length === 0) return map;
  const rows = await db
    .select({ userId: userRoles.userId, role: userRoles.role })
    .from(userRoles)
    .where(inArray(userRoles.userId, userIds));
  for (const r of rows) map.set(r.userId, [...(map.get(r.userId) ?? []), r.role]);
  return map;
}

/** Returns true when the role was newly granted. */
export async function insertRole(db: DbOrTx, userId: string, role: Role, grantedBy: string | null): Promise<boolean> {
  const res = await db.insert(userRoles).values({ userId, role, grantedBy }).onConflictDoNothing().returning({ role: userRoles.role });
  return res.length > 0;
}

/** Returns true when the role was held and is now revoked. */
export async function deleteRole(db: DbOrTx, userId: string, role: Role): Promise<boolean> {
  const res = await db
    .delete(userRoles)
    .where(and(eq(userRoles.userId, userId), eq(userRoles.role, role)))
    .returning({ role: userRoles.role });
  return res.length > 0;
}
