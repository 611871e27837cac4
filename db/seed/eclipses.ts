// The eclipse catalogue is computed, never typed: every solar eclipse from 2000
// to 2050 from astronomy-engine's global search (lib/astro/catalogue.ts).
// Upserts keep an admin's names and featured flags.
import { sql } from "drizzle-orm";
import { listSolarEclipses } from "@/lib/astro/catalogue";
import type { DbOrTx } from "../client";
import { eclipses } from "../schema";

export const CATALOGUE_YEARS = { from: 2000, to: 2050 } as const;

/** Computes the catalogue once; later starts find it in the table and skip the search (a few seconds). */
export async function syncEclipseCatalogue(db: DbOrTx, force = false): Promise<number> {
  if (!force) {
    const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(eclipses);
    if (n > 0) return n;
  }
  const list = listSolarEclipses(CATALOGUE_YEARS.from, CATALOGUE_YEARS.to);
  const rows = list.map((e) => ({
    id: e.dateIso,
    peakAt: new Date(e.peakUtcMs),
    kind: e.kind,
    peakLatDeg: e.peakLatDeg,
    peakLonDeg: e.peakLonDeg,
  }));
  for (let i = 0; i < rows.length; i += 100) {
    await db
      .insert(eclipses)
      .values(rows.slice(i, i + 100))
      .onConflictDoUpdate({
        target: eclipses.id,
        set: { peakAt: sql`excluded.peak_at`, kind: sql`excluded.kind`, peakLatDeg: sql`excluded.peak_lat_deg`, peakLonDeg: sql`excluded.peak_lon_deg` },
      });
  }
  return rows.length;
}

/** The demo scenario's eclipse carries its expedition's name and is featured. */
export async function nameDemoEclipse(db: DbOrTx): Promise<void> {
  await db
    .update(eclipses)
    .set({ name: sql`coalesce(${eclipses.name}, 'The Kestrel Ridge expedition: Luxor, Cadiz and the Gulf of Gabes')`, featured: true })
    .where(sql`${eclipses.id} = '2027-08-02'`);
}
