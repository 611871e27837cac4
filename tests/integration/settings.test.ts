import { randomUUID } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { auditLog, type SocietySettings } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { AppError } from "@/lib/errors";
import { settingsSchema, updateSocietySettings, type SettingsInput } from "@/lib/society/settings";
import { parseInput } from "@/lib/validation";
import { requireTestDatabase } from "../support/env";

requireTestDatabase();
const db = getDb();
afterAll(closeDb);

const admin: Actor = { userId: randomUUID(), email: "a@settings-test.example", name: "A", roles: ["admin"] };
const editor: Actor = { userId: randomUUID(), email: "e@settings-test.example", name: "E", roles: ["member", "editor"] };

const pick = (s: SocietySettings): SettingsInput => ({
  name: s.name,
  shortName: s.shortName,
  defaultLicence: s.defaultLicence as SettingsInput["defaultLicence"],
  defaultCreditLine: s.defaultCreditLine,
});

describe("society settings", () => {
  it("refuses anyone without the settings permission and changes nothing", async () => {
    const before = await findSocietySettings(db);
    await expect(
      updateSocietySettings(db, editor, { ...pick(before), name: "Hijacked Society", defaultLicence: "CC0-1.0" }),
    ).rejects.toMatchObject({ code: "forbidden" });
    expect((await findSocietySettings(db)).name).toBe(before.name);
  });

  it("saves only what changed and audits each field with its old and new value", async () => {
    const before = await findSocietySettings(db);
    // The actor id must exist for the audit foreign key; null actors are allowed, unknown ids are not.
    const actor = { ...admin, userId: (await db.query.users.findFirst())!.id };
    const changed = await updateSocietySettings(db, actor, {
      name: before.name,
      shortName: before.shortName,
      defaultLicence: "CC-BY-SA-4.0",
      defaultCreditLine: before.defaultCreditLine,
    });
    expect(changed).toEqual(["defaultLicence"]);
    const [entry] = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, "settings.changed"), eq(auditLog.actorId, actor.userId)));
    expect(entry.detail).toEqual({ defaultLicence: { from: before.defaultLicence, to: "CC-BY-SA-4.0" } });
    expect(await updateSocietySettings(db, actor, { ...pick(before), defaultLicence: "CC-BY-SA-4.0" })).toEqual([]);
    await updateSocietySettings(db, actor, pick(before));
  });

  it("names the field and the fault for bad form input", () => {
    try {
      parseInput(settingsSchema, { name: "K", shortName: "Kestrel", defaultLicence: "WTFPL", defaultCreditLine: "KRAS" });
      throw new Error("accepted");
    } catch (err) {
      expect(err).toBeInstanceOf(AppError);
      const fields = (err as AppError).fields.map((f) => f.field).sort();
      expect(fields).toEqual(["defaultLicence", "name"]);
    }
  });
});
