// The society's settings, edited by admins. Every change is audited with the
// fields that changed.
import { sql } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { societySettings } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";

/** Licences a plate may carry; the society picks its default among them. */
export const LICENCES = {
  "CC-BY-4.0": "Creative Commons Attribution 4.0",
  "CC-BY-SA-4.0": "Creative Commons Attribution-ShareAlike 4.0",
  "CC-BY-NC-4.0": "Creative Commons Attribution-NonCommercial 4.0",
  "CC-BY-NC-SA-4.0": "Creative Commons Attribution-NonCommercial-ShareAlike 4.0",
  "CC0-1.0": "Creative Commons Zero (public domain dedication)",
  "all-rights-reserved": "All rights reserved",
} as const;
export type LicenceId = keyof typeof LICENCES;

const text = (max: number) => z.string().trim().min(2, { error: "needs at least 2 characters" }).max(max, { error: `must be at most ${max} characters` });

export const settingsSchema = z.object({
  name: text(120),
  shortName: text(40),
  defaultLicence: z.enum(Object.keys(LICENCES) as [LicenceId, ...LicenceId[]], { error: "expected one of the listed licences" }),
  defaultCreditLine: text(200),
});
export type SettingsInput = z.infer<typeof settingsSchema>;

export async function updateSocietySettings(db: Db, actor: Actor | null, input: SettingsInput): Promise<string[]> {
  const admin = requirePermission(actor, "settings:edit", "changing the society's settings");
  return db.transaction(async (tx) => {
    const before = await findSocietySettings(tx);
    const changed = (Object.keys(input) as (keyof SettingsInput)[]).filter((k) => before[k] !== input[k]);
    if (changed.length === 0) return [];
    await tx
      .insert(societySettings)
      .values({ id: 1, ...input })
      .onConflictDoUpdate({ target: societySettings.id, set: { ...input, updatedAt: sql`now()` } });
    await recordAudit(tx, {
      actorId: admin.userId,
      action: "settings.changed",
      subjectType: "society",
      subjectId: "1",
      detail: Object.fromEntries(changed.map((k) => [k, { from: before[k], to: input[k] }])),
    });
    return changed;
  });
}
