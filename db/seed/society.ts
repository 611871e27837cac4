import type { Db } from "../client";
import { societySettings } from "../schema";

// Inserted once; an admin's later edits are never overwritten by a re-seed.
export async function seedSociety(db: Db): Promise<void> {
  await db
    .insert(societySettings)
    .values({
      id: 1,
      name: "Kestrel Ridge Astronomical Society",
      shortName: "Kestrel Ridge AS",
      defaultLicence: "CC-BY-4.0",
      defaultCreditLine: "Kestrel Ridge Astronomical Society, eclipse section",
    })
    .onConflictDoNothing();
}
