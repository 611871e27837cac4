// The computed eclipse catalogue: read by everyone, named and featured by admins.
import { and, asc, desc, eq, gte, lt, sql } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { eclipses, type Eclipse } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { AppError, notFound, type FieldProblem } from "@/lib/errors";
import { fieldProblems } from "@/lib/validation";
import { formatDate } from "@/lib/format/dates";

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

/**
 * The whole catalogue's names and featured flags from one form: `name:<id>`
 * and `featured:<id>` for every id listed in `ids` (comma-separated). Checks
 * every row before writing any; writes the rows that changed, each with its
 * audit entry, in one transaction. Returns the ids that changed.
 */
export async function editEclipseCatalogue(db: DbOrTx, actor: Actor | null, form: Record<string, unknown>): Promise<string[]> {
  const admin = requirePermission(actor, "eclipses:edit", "naming or featuring eclipses");
  const ids = String(form.ids ?? "").split(",").filter(Boolean);
  const problems: FieldProblem[] = [];
  const edits: EclipseEdit[] = [];
  for (const id of ids) {
    const raw = { id, name: form[`name:${id}`] ?? "", featured: form[`featured:${id}`] };
    const parsed = eclipseEditSchema.safeParse(raw);
    if (parsed.success) edits.push(parsed.data);
    else problems.push(...fieldProblems(parsed.error, raw).map((p) => ({ ...p, field: `${p.field}:${id}`, message: `${formatDate(id) || id}: ${p.message}` })));
  }
  if (problems.length) throw new AppError("invalid_input", `Nothing was saved: ${problems.map((p) => p.message).join("; ")}.`, problems);
  return db.transaction(async (tx) => {
    const changed: string[] = [];
    for (const edit of edits) {
      const before = await findEclipse(tx, edit.id);
      if (before.name === edit.name && before.featured === edit.featured) continue;
      await tx.update(eclipses).set({ name: edit.name, featured: edit.featured }).where(eq(eclipses.id, edit.id));
      await recordAudit(tx, {
        actorId: admin.userId,
        action: "eclipse.edited",
        subjectType: "eclipse",
        subjectId: edit.id,
        detail: { from: { name: before.name, featured: before.featured }, to: { name: edit.name, featured: edit.featured } },
      });
      changed.push(edit.id);
    }
    return changed;
  });
}
