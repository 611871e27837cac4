import { eq } from "drizzle-orm";
import type { DbOrTx } from "../client";
import { DEFAULT_CHANGE_REASONS, DEFAULT_REJECTION_REASONS, societySettings, type SocietySettings } from "../schema";

/** Shown until an admin or the seed writes the society's own settings. */
export const FALLBACK_SETTINGS: SocietySettings = {
  id: 1,
  name: "Crownlight",
  shortName: "Crownlight",
  defaultLicence: "CC-BY-4.0",
  defaultCreditLine: "Crownlight",
  creditLineTemplate: "{acquiredBy} / {society}; processing: {processedBy}",
  changeReasons: DEFAULT_CHANGE_REASONS,
  rejectionReasons: DEFAULT_REJECTION_REASONS,
  siteTextLicenceName: "CC BY 4.0",
  siteTextLicenceUrl: "https://creativecommons.org/licenses/by/4.0/",
  updatedAt: new Date(0),
};

export async function findSocietySettings(db: DbOrTx): Promise<SocietySettings> {
  const [row] = await db.select().from(societySettings).where(eq(societySettings.id, 1)).limit(1);
  return row ?? FALLBACK_SETTINGS;
}
