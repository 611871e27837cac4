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
  creditLineTemplate: s.creditLineTemplate,
  changeReasons: s.changeReasons,
  rejectionReasons: s.rejectionReasons,
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
    const changed = await updateSocietySettings(db, actor, { ...pick(before), defaultLicence: "CC-BY-SA-4.0" });
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
      parseInput(settingsSchema, {
        name: "K",
        shortName: "Kestrel",
        defaultLicence: "WTFPL",
        defaultCreditLine: "KRAS",
        creditLineTemplate: "{photographer} / {society}",
        changeReasons: "Clock offset doubtful\n\nclock offset doubtful",
        rejectionReasons: "\n  \n",
      });
      throw new Error("accepted");
    } catch (err) {
      expect(err).toBeInstanceOf(AppError);
      const fields = (err as AppError).fields.map((f) => f.field).sort();
      expect(fields).toEqual(["changeReasons", "creditLineTemplate", "defaultLicence", "name", "rejectionReasons"]);
      expect((err as AppError).fields.find((f) => f.field === "creditLineTemplate")?.message).toContain("{photographer}");
    }
  });

  it("keeps reason lists as codes and labels, one reason a line", () => {
    const input = parseInput(settingsSchema, {
      name: "Kestrel Ridge Astronomical Society",
      shortName: "Kestrel Ridge",
      defaultLicence: "CC-BY-4.0",
      defaultCreditLine: "KRAS",
      creditLineTemplate: "{acquiredBy} / {society}",
      changeReasons: " Exposure times missing or wrong \r\n\nClock offset doubtful",
      rejectionReasons: "Not the Sun",
    });
    expect(input.changeReasons).toEqual([
      { code: "exposure-times-missing-or-wrong", label: "Exposure times missing or wrong" },
      { code: "clock-offset-doubtful", label: "Clock offset doubtful" },
    ]);
    expect(input.rejectionReasons).toEqual([{ code: "not-the-sun", label: "Not the Sun" }]);
  });
});
