// Demo people of the invented Kestrel Ridge Astronomical Society. Idempotent:
// people are found by e-mail and their roles are set to the listed ones.
import { randomUUID } from "node:crypto";
import { hashPassword } from "better-auth/crypto";
import { and, eq } from "drizzle-orm";
import type { Db } from "../client";
import { insertRole } from "../queries/roles";
import { accounts, users } from "../schema";
import type { Role } from "@/lib/auth/roles";

export const DEMO_PASSWORD = "kestrel-ridge-2027";

export const DEMO_PEOPLE: { name: string; email: string; roles: Role[] }[] = [
  { name: "Miriam Achterberg", email: "miriam.achterberg@kestrel-ridge.example", roles: ["member", "admin"] },
  { name: "Tomasz Wielgosz", email: "tomasz.wielgosz@kestrel-ridge.example", roles: ["member", "curator"] },
  { name: "Priya Raman-Holt", email: "priya.raman-holt@kestrel-ridge.example", roles: ["member", "editor"] },
  { name: "Oskar Lindqvist", email: "oskar.lindqvist@kestrel-ridge.example", roles: ["member"] },
  { name: "Nadia Fairweather", email: "nadia.fairweather@kestrel-ridge.example", roles: ["member"] },
];

export async function seedPeople(db: Db): Promise<void> {
  const hash = await hashPassword(DEMO_PASSWORD);
  for (const person of DEMO_PEOPLE) {
    let [user] = await db.select({ id: users.id }).from(users).where(eq(users.email, person.email)).limit(1);
    if (!user) {
      const id = randomUUID();
      await db.insert(users).values({ id, name: person.name, email: person.email, emailVerified: true });
      user = { id };
    }
    const [account] = await db
      .select({ id: accounts.id })
      .from(accounts)
      .where(and(eq(accounts.userId, user.id), eq(accounts.providerId, "credential")))
      .limit(1);
    if (!account) {
      await db.insert(accounts).values({ id: randomUUID(), accountId: user.id, providerId: "credential", userId: user.id, password: hash });
    }
    for (const role of person.roles) await insertRole(db, user.id, role, null);
  }
}
