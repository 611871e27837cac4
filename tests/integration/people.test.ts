import { randomUUID } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { insertRole } from "@/db/queries/roles";
import { auditLog, userRoles, users } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { AppError } from "@/lib/errors";
import { changeRole, listPeople } from "@/lib/people/people";
import { requireTestDatabase } from "../support/env";

requireTestDatabase();
const db = getDb();
const tag = randomUUID().slice(0, 8);

async function makePerson(name: string, roles: Actor["roles"]): Promise<Actor> {
  const id = randomUUID();
  const email = `${name.toLowerCase().replace(/\s+/g, ".")}.${tag}@people-test.example`;
  await db.insert(users).values({ id, name: `${name} ${tag}`, email, emailVerified: true });
  for (const r of roles) await insertRole(db, id, r, null);
  return { userId: id, email, name, roles };
}

let admin: Actor;
let member: Actor;

beforeAll(async () => {
  admin = await makePerson("Ada Admin", ["member", "admin"]);
  member = await makePerson("Milo Member", ["member"]);
  for (let i = 0; i < 7; i++) await makePerson(`Pager ${i}`, ["member"]);
});
afterAll(closeDb);

const code = async (p: Promise<unknown>) => {
  try {
    await p;
    return "ok";
  } catch (e) {
    return e instanceof AppError ? e.code : String(e);
  }
};

describe("listing people", () => {
  it("refuses a visitor and a member", async () => {
    expect(await code(listPeople(db, null, { q: "", page: 1, pageSize: 20 }))).toBe("unauthenticated");
    expect(await code(listPeople(db, member, { q: "", page: 1, pageSize: 20 }))).toBe("forbidden");
  });

  it("searches by name or e-mail, case-insensitively, and returns DTOs only", async () => {
    const page = await listPeople(db, admin, { q: `milo member ${tag}`, page: 1, pageSize: 20 });
    expect(page.total).toBe(1);
    expect(Object.keys(page.people[0]).sort()).toEqual(["disabledAt", "email", "emailVerified", "id", "joinedAt", "name", "roles"]);
    const byMail = await listPeople(db, admin, { q: `@PEOPLE-TEST.example`, page: 1, pageSize: 100 });
    expect(byMail.people.map((p) => p.email)).toContain(member.email);
  });

  it("treats % and _ in the search as plain characters", async () => {
    const page = await listPeople(db, admin, { q: "%", page: 1, pageSize: 20 });
    expect(page.total).toBe(0);
  });

  it("pages through the results without overlap", async () => {
    const q = `pager`;
    const first = await listPeople(db, admin, { q, page: 1, pageSize: 5 });
    const second = await listPeople(db, admin, { q, page: 2, pageSize: 5 });
    expect(first.people).toHaveLength(5);
    const ids = new Set([...first.people, ...second.people].map((p) => p.id));
    expect(ids.size).toBe(first.people.length + second.people.length);
    expect(first.total).toBeGreaterThanOrEqual(7);
  });
});

describe("changing roles", () => {
  it("grants a role, writes the audit log, and revokes it again", async () => {
    const roles = await changeRole(db, admin, member.userId, { role: "curator", grant: true });
    expect(roles).toEqual(["member", "curator"]);
    const entries = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.subjectId, member.userId), eq(auditLog.action, "role.granted")));
    expect(entries).toHaveLength(1);
    expect(entries[0].actorId).toBe(admin.userId);
    expect(entries[0].detail).toMatchObject({ role: "curator" });

    expect(await changeRole(db, admin, member.userId, { role: "curator", grant: false })).toEqual(["member"]);
  });

  it("writes no audit entry when nothing changes", async () => {
    await changeRole(db, admin, member.userId, { role: "member", grant: true });
    const entries = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.subjectId, member.userId), eq(auditLog.action, "role.granted")));
    expect(entries).toHaveLength(1);
  });

  it("refuses a member who tries to grant themself admin", async () => {
    expect(await code(changeRole(db, member, member.userId, { role: "admin", grant: true }))).toBe("forbidden");
    const held = await db.select().from(userRoles).where(and(eq(userRoles.userId, member.userId), eq(userRoles.role, "admin")));
    expect(held).toHaveLength(0);
  });

  it("answers not found for an unknown person", async () => {
    expect(await code(changeRole(db, admin, randomUUID(), { role: "editor", grant: true }))).toBe("not_found");
  });

  it("never removes the last administrator", async () => {
    // Make our admin the only one for this check, then put the others back.
    const others = await db.select().from(userRoles).where(eq(userRoles.role, "admin"));
    const removed = others.filter((r) => r.userId !== admin.userId);
    for (const r of removed) await db.delete(userRoles).where(and(eq(userRoles.userId, r.userId), eq(userRoles.role, "admin")));
    try {
      expect(await code(changeRole(db, admin, admin.userId, { role: "admin", grant: false }))).toBe("conflict");
    } finally {
      for (const r of removed) await insertRole(db, r.userId, "admin", r.grantedBy);
    }
  });
});
