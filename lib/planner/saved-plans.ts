// Members keep plans: the planner's query, saved so that it reopens as it was.
import { and, desc, eq } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { fieldPlans } from "@/db/schema";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { findKit } from "@/lib/kits/kits";
import { findOwnSite } from "@/lib/sites/sites";
import { findEclipse } from "@/lib/eclipses/eclipses";
import { strictNumber } from "@/lib/strict-number";

export const savePlanSchema = z.object({
  name: z.string().trim().min(2, { error: "needs at least 2 characters" }).max(80),
  eclipse: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { error: "expected an eclipse date" }),
  site: z.union([z.literal(""), z.uuid()]).optional(),
  kit: z.union([z.literal(""), z.uuid()]).optional(),
  lat: strictNumber(z.number().min(-90).max(90)),
  lon: strictNumber(z.number().min(-180).max(180)),
  elev: strictNumber(z.number().min(-500).max(9000).default(0)),
  isos: z.string().transform((v) => v.split(",").map(Number)).pipe(z.array(z.number().int().min(25).max(409_600)).min(1).max(6)),
});
export type SavePlanInput = z.infer<typeof savePlanSchema>;

export interface SavedPlanDto {
  id: string;
  name: string;
  eclipseId: string;
  href: string;
}

function hrefFor(p: { eclipseId: string; siteId: string | null; kitId: string | null; latDeg: number; lonDeg: number; elevationM: number; isos: number[] }): string {
  const q = new URLSearchParams({ eclipse: p.eclipseId, isos: p.isos.join(",") });
  if (p.siteId) q.set("site", p.siteId);
  else {
    q.set("lat", String(p.latDeg));
    q.set("lon", String(p.lonDeg));
    q.set("elev", String(p.elevationM));
  }
  if (p.kitId) q.set("kit", p.kitId);
  return `/planner?${q}`;
}

export async function savePlan(db: DbOrTx, actor: Actor | null, input: SavePlanInput): Promise<SavedPlanDto> {
  const a = requirePermission(actor, "studio:use", "saving plans");
  await findEclipse(db, input.eclipse);
  // Saved sites and kits must be the member's own.
  if (input.site) await findOwnSite(db, a, input.site);
  if (input.kit) await findKit(db, a, input.kit);
  const [row] = await db
    .insert(fieldPlans)
    .values({
      ownerId: a.userId,
      name: input.name,
      eclipseId: input.eclipse,
      siteId: input.site || null,
      kitId: input.kit || null,
      latDeg: input.lat,
      lonDeg: input.lon,
      elevationM: input.elev,
      isos: input.isos,
    })
    .returning();
  return { id: row.id, name: row.name, eclipseId: row.eclipseId, href: hrefFor(row) };
}

export async function listPlans(db: DbOrTx, actor: Actor | null): Promise<SavedPlanDto[]> {
  const a = requirePermission(actor, "studio:use");
  const rows = await db.select().from(fieldPlans).where(eq(fieldPlans.ownerId, a.userId)).orderBy(desc(fieldPlans.createdAt)).limit(50);
  return rows.map((r) => ({ id: r.id, name: r.name, eclipseId: r.eclipseId, href: hrefFor(r) }));
}

export async function deletePlan(db: DbOrTx, actor: Actor | null, id: string): Promise<void> {
  const a = requirePermission(actor, "studio:use");
  await db.delete(fieldPlans).where(and(eq(fieldPlans.id, id), eq(fieldPlans.ownerId, a.userId)));
}
