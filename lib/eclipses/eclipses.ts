// The computed eclipse catalogue: read by everyone, named and featured by admins.
import { and, asc, desc, eq, gte, lt, sql } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { eclipses, type Eclipse } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { notFound } from "@/lib/errors";

export interface EclipseDto {
  id: string;
  peakAt: string;
  kind: Eclipse["kind"];
  peakLatDeg: number | null;
  peakLonDeg: number | null;
  name: string | null;
  featured: boolean;
}

const toDto = (e: Eclipse): EclipseDto => ({
  id: e.id,
  peakAt: e.peakAt.toISOString(),
  kind: e.kind,
  peakLatDeg: e.peakLatDeg,
  peakLonDeg: e.peakLonDeg,
  name: e.name,
  featured: e.featured,
});

/** Featured first, then upcoming in date order, then past ones most recent first. */
export async function listEclipses(db: DbOrTx, now = new Date()): Promise<{ featured: EclipseDto[]; upcoming: EclipseDto[]; past: EclipseDto[] }> {
  const [featured, upcoming, past] = await Promise.all([
    db.select().from(eclipses).where(eq(eclipses.featured, true)).orderBy(asc(eclipses.peakAt)),
    db.select().from(eclipses).where(gte(eclipses.peakAt, now)).orderBy(asc(eclipses.peakAt)),
    db.select().from(eclipses).where(lt(eclipses.peakAt, now)).orderBy(desc(eclipses.peakAt)),
  ]);
  return { featured: featured.map(toDto), upcoming: upcoming.map(toDto), past: past.map(toDto) };
}

export async function findEclipse(db: DbOrTx, id: string): Promise<EclipseDto> {
  const [row] = await db.select().from(eclipses).where(eq(eclipses.id, id)).limit(1);
  if (!row) throw notFound("That eclipse");
  return toDto(row);
}

/** The next total (or hybrid) eclipse after now, else the next of any kind: the planner's default. */
export async function findNextCentralEclipse(db: DbOrTx, now = new Date()): Promise<EclipseDto | null> {
  const [row] = await db
    .select()
    .from(eclipses)
    .where(and(gte(eclipses.peakAt, now), sql`${eclipses.kind} in ('total', 'hybrid')`))
    .orderBy(asc(eclipses.peakAt))
    .limit(1);
  return row ? toDto(row) : null;
}

export const eclipseEditSchema = z.object({
  id: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { error: "expected an eclipse date like 2027-08-02" }),
  name: z.string().trim().max(120, { error: "must be at most 120 characters" }).transform((v) => (v === "" ? null : v)),
  featured: z
    .union([z.literal("on"), z.literal("true"), z.literal("false"), z.boolean()])
    .optional()
    .transform((v) => v === true || v === "on" || v === "true"),
});
export type EclipseEdit = z.infer<typeof eclipseEditSchema>;

export async function editEclipse(db: DbOrTx, actor: Actor | null, input: EclipseEdit): Promise<EclipseDto> {
  const admin = requirePermission(actor, "eclipses:edit", "naming or featuring eclipses");
  const before = await findEclipse(db, input.id);
  const [row] = await db.update(eclipses).set({ name: input.name, featured: input.featured }).where(eq(eclipses.id, input.id)).returning();
  await recordAudit(db, {
    actorId: admin.userId,
    action: "eclipse.edited",
    subjectType: "eclipse",
    subjectId: input.id,
    detail: { from: { name: before.name, featured: before.featured }, to: { name: input.name, featured: input.featured } },
  });
  return toDto(row);
}
