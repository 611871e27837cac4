// The society's settings, edited by admins. Every change is audited with the
// fields that changed.
import { sql } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { societySettings, type ReviewReason } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { checkCreditTemplate } from "@/lib/review/credit-line";

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

/** A stable code for a reason's wording: decisions keep both, so rewording a reason later changes no history. */
export function reasonCode(label: string): string {
  return label
    .toLowerCase()
    .normalize("NFKD")
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 60);
}

/** One reason a line, from a textarea: blank lines dropped, 1 to 20 reasons, each 3 to 120 characters, no two alike. */
const reasonList = z
  .string()
  .transform((s) => s.split(/\r?\n/).map((l) => l.trim()).filter(Boolean))
  .pipe(
    z
      .array(z.string().min(3, { error: "each reason needs at least 3 characters" }).max(120, { error: "each reason must be at most 120 characters" }))
      .min(1, { error: "needs at least one reason" })
      .max(20, { error: "must list at most 20 reasons" })
      .refine((l) => new Set(l.map(reasonCode)).size === l.length, { error: "lists the same reason twice" }),
  )
  .transform((l): ReviewReason[] => l.map((label) => ({ code: reasonCode(label), label })));

export const settingsSchema = z.object({
  name: text(120),
  shortName: text(40),
  defaultLicence: z.enum(Object.keys(LICENCES) as [LicenceId, ...LicenceId[]], { error: "expected one of the listed licences" }),
  defaultCreditLine: text(200),
  creditLineTemplate: text(200).superRefine((t, ctx) => {
    for (const problem of checkCreditTemplate(t)) ctx.addIssue({ code: "custom", message: problem });
  }),
  changeReasons: reasonList,
  rejectionReasons: reasonList,
});
export type SettingsInput = z.infer<typeof settingsSchema>;

export async function updateSocietySettings(db: Db, actor: Actor | null, input: SettingsInput): Promise<string[]> {
  const admin = requirePermission(actor, "settings:edit", "changing the society's settings");
  return db.transaction(async (tx) => {
    const before = await findSocietySettings(tx);
    // A reason kept by its wording keeps its code, so the desk's history and filters still match it.
    const keepCodes = (list: ReviewReason[], old: ReviewReason[]) =>
      list.map((r) => ({ ...r, code: old.find((o) => o.label.toLowerCase() === r.label.toLowerCase())?.code ?? r.code }));
    input = { ...input, changeReasons: keepCodes(input.changeReasons, before.changeReasons), rejectionReasons: keepCodes(input.rejectionReasons, before.rejectionReasons) };
    const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);
    const changed = (Object.keys(input) as (keyof SettingsInput)[]).filter((k) => !same(before[k], input[k]));
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
