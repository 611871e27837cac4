// Starting and reading composites. A photographer composes their own finished
// reductions; a curator may compose any members' (several observers' sets). Every
// input must be a finished reduction with a helioprojective WCS (registered on
// the Sun with the site and times), and all of one eclipse. Each start makes a
// new composite; none overwrites another.
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { bracketSets, compositeInputs, composites, reductions, users, type Composite, type CompositeParamsRecord } from "@/db/schema";
import { requireSignedIn, type Actor } from "@/lib/auth/actor";
import { can } from "@/lib/auth/permissions";
import { AppError, forbidden, notFound } from "@/lib/errors";
import { enqueue } from "@/lib/queue/enqueue";
import { parseInput } from "@/lib/validation";

/** Inputs a composite takes: two at least; six keeps one run within a worker's memory at 24 megapixels each. */
export const COMPOSITE_INPUTS = { min: 2, max: 6 } as const;

export const compositeRequestSchema = z.object({
  title: z.string().trim().min(1).max(120),
  reductionIds: z.array(z.uuid()).min(COMPOSITE_INPUTS.min).max(COMPOSITE_INPUTS.max),
  scaleArcsecPerPx: z.number().positive().max(3600).optional(),
  refine: z.boolean().default(true),
  filter: z.enum(["mgn", "nrgf"]).default("mgn"),
});
export type CompositeRequest = z.input<typeof compositeRequestSchema>;

/** A finished reduction as the composite's chooser lists it: whose, which set, its plate scale and field. */
export interface ComposableReduction {
  reductionId: string;
  bracketSetId: string;
  setName: string;
  eclipseId: string;
  photographer: string;
  finishedAt: string | null;
  plateScaleArcsecPerPx: number;
  /** Radius of the largest circle about the Sun in the master, and its farthest corner, solar radii. */
  fieldR: { inner: number; outer: number };
}

export interface CompositeDto {
  id: string;
  eclipseId: string;
  title: string;
  params: CompositeParamsRecord;
  state: Composite["state"];
  stage: string | null;
  progress: number;
  error: string | null;
  composedBy: string | null;
  inputs: { reductionId: string; setName: string; photographer: string }[];
  measurements: Record<string, unknown> | null;
  createdAt: string;
  finishedAt: string | null;
}

interface SkyFigures {
  plateScaleArcsecPerPx?: number;
  sunRadiusPx?: number;
  sunCentrePx?: { x: number; y: number };
}

/** The plate scale and field of a finished reduction, from its measurements; null without a WCS (not registered on the Sun with site and times). */
export function describeComposable(measurements: Record<string, unknown> | null): Pick<ComposableReduction, "plateScaleArcsecPerPx" | "fieldR"> | null {
  const sky = (measurements?.sky ?? null) as SkyFigures | null;
  const size = (measurements?.masterSize ?? null) as { width?: number; height?: number } | null;
  if (!sky || !(typeof sky.plateScaleArcsecPerPx === "number" && sky.plateScaleArcsecPerPx > 0) || !(typeof sky.sunRadiusPx === "number" && sky.sunRadiusPx > 0)) return null;
  if (!sky.sunCentrePx || !size?.width || !size.height) return null;
  const { x, y } = sky.sunCentrePx;
  const r = sky.sunRadiusPx;
  const inner = Math.max(0, Math.min(x + 0.5, y + 0.5, size.width - 0.5 - x, size.height - 0.5 - y)) / r;
  const outer = Math.hypot(Math.max(x + 0.5, size.width - 0.5 - x), Math.max(y + 0.5, size.height - 0.5 - y)) / r;
  return { plateScaleArcsecPerPx: sky.plateScaleArcsecPerPx, fieldR: { inner: Number(inner.toFixed(2)), outer: Number(outer.toFixed(2)) } };
}

/** The actor, when they may compose at all: members (their own reductions) and curators (anyone's). */
function requireComposer(actor: Actor | null): Actor {
  const a = requireSignedIn(actor);
  if (!can(a.roles, "brackets:own") && !can(a.roles, "review:use")) throw forbidden("composing reductions");
  return a;
}

/**
 * Finished reductions the actor may compose, newest first, with a WCS: a
 * member's own; for a curator every member's. Reductions without a WCS are
 * left out (the page says why such a reduction does not appear).
 */
export async function listComposableReductions(db: DbOrTx, actor: Actor | null): Promise<ComposableReduction[]> {
  const a = requireComposer(actor);
  const mineOnly = !can(a.roles, "review:use");
  const rows = await db
    .select({ id: reductions.id, setId: bracketSets.id, setName: bracketSets.name, eclipseId: bracketSets.eclipseId, photographer: users.name, finishedAt: reductions.finishedAt, measurements: reductions.measurements })
    .from(reductions)
    .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
    .innerJoin(users, eq(users.id, bracketSets.ownerId))
    .where(mineOnly ? and(eq(reductions.state, "done"), eq(bracketSets.ownerId, a.userId)) : eq(reductions.state, "done"))
    .orderBy(desc(reductions.finishedAt))
    .limit(500);
  return rows.flatMap((r) => {
    const figures = describeComposable(r.measurements ?? null);
    if (!figures) return [];
    return [{ reductionId: r.id, bracketSetId: r.setId, setName: r.setName, eclipseId: r.eclipseId, photographer: r.photographer, finishedAt: r.finishedAt?.toISOString() ?? null, ...figures }];
  });
}

async function loadInputs(db: DbOrTx, compositeIds: string[]): Promise<Map<string, CompositeDto["inputs"]>> {
  const out = new Map<string, CompositeDto["inputs"]>();
  if (compositeIds.length === 0) return out;
  const rows = await db
    .select({ compositeId: compositeInputs.compositeId, reductionId: compositeInputs.reductionId, setName: bracketSets.name, photographer: users.name })
    .from(compositeInputs)
    .innerJoin(reductions, eq(reductions.id, compositeInputs.reductionId))
    .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
    .innerJoin(users, eq(users.id, bracketSets.ownerId))
    .where(inArray(compositeInputs.compositeId, compositeIds))
    .orderBy(asc(compositeInputs.position));
  for (const r of rows) {
    const list = out.get(r.compositeId) ?? [];
    list.push({ reductionId: r.reductionId, setName: r.setName, photographer: r.photographer });
    out.set(r.compositeId, list);
  }
  return out;
}

function toDto(c: Composite, inputs: CompositeDto["inputs"], composer: string | null): CompositeDto {
  return {
    id: c.id, eclipseId: c.eclipseId, title: c.title, params: c.params, state: c.state, stage: c.stage, progress: c.progress, error: c.error,
    composedBy: composer, inputs, measurements: c.measurements ?? null, createdAt: c.createdAt.toISOString(), finishedAt: c.finishedAt?.toISOString() ?? null,
  };
}

/** Starts a composite of the chosen reductions, in the order given (the finest becomes the reference whatever its place). */
export async function startComposite(db: DbOrTx, actor: Actor | null, request: CompositeRequest): Promise<CompositeDto> {
  const a = requireComposer(actor);
  const input = parseInput(compositeRequestSchema, request);
  if (new Set(input.reductionIds).size !== input.reductionIds.length) {
    throw new AppError("invalid_input", "A reduction is chosen twice; choose each once.", [{ field: "reductionIds", message: "a reduction is chosen twice" }]);
  }
  const isCurator = can(a.roles, "review:use");
  const rows = await db
    .select({ id: reductions.id, state: reductions.state, measurements: reductions.measurements, ownerId: bracketSets.ownerId, setName: bracketSets.name, eclipseId: bracketSets.eclipseId })
    .from(reductions)
    .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
    .where(inArray(reductions.id, input.reductionIds));
  const byId = new Map(rows.map((r) => [r.id, r]));
  // Every choice is found first, so that what is said of one never depends on another that is not the actor's.
  for (const id of input.reductionIds) {
    const r = byId.get(id);
    // Another member's reduction is not found for a member, exactly like one that does not exist.
    if (!r || (!isCurator && r.ownerId !== a.userId)) throw notFound("A chosen reduction");
  }
  for (const id of input.reductionIds) {
    const r = byId.get(id)!;
    if (r.state !== "done") throw new AppError("invalid_input", `The reduction of "${r.setName}" has not finished; compose finished reductions only.`, [{ field: "reductionIds", message: "a reduction has not finished" }]);
    if (!describeComposable(r.measurements ?? null)) {
      throw new AppError("invalid_input", `The reduction of "${r.setName}" has no sky coordinates: reduce it registered on the Sun, with its site and the frames' capture times, to compose it.`, [{ field: "reductionIds", message: "a reduction has no sky coordinates" }]);
    }
  }
  const eclipsesChosen = [...new Set(input.reductionIds.map((id) => byId.get(id)!.eclipseId))];
  if (eclipsesChosen.length > 1) {
    throw new AppError("invalid_input", `The chosen reductions are of ${eclipsesChosen.length} eclipses (${eclipsesChosen.join(", ")}); a composite is of one eclipse.`, [{ field: "reductionIds", message: "reductions of several eclipses" }]);
  }
  const params: CompositeParamsRecord = { refine: input.refine, filter: input.filter, ...(input.scaleArcsecPerPx ? { scaleArcsecPerPx: input.scaleArcsecPerPx } : {}) };
  const [row] = await db.insert(composites).values({ eclipseId: eclipsesChosen[0], composedBy: a.userId, title: input.title, params }).returning();
  await db.insert(compositeInputs).values(input.reductionIds.map((reductionId, position) => ({ compositeId: row.id, position, reductionId })));
  await enqueue(db, "composite.run", { compositeId: row.id });
  return (await findComposite(db, a, row.id));
}

/**
 * A composite, for whoever may see it: the one who composed it, a curator, and
 * the photographer of any of its inputs (their data is in it). Anyone else is
 * told it was not found.
 */
export async function findComposite(db: DbOrTx, actor: Actor | null, compositeId: string): Promise<CompositeDto> {
  const a = requireSignedIn(actor);
  if (!z.uuid().safeParse(compositeId).success) throw notFound("That composite");
  const [row] = await db.select().from(composites).where(eq(composites.id, compositeId)).limit(1);
  if (!row) throw notFound("That composite");
  const inputs = (await loadInputs(db, [row.id])).get(row.id) ?? [];
  if (row.composedBy !== a.userId && !can(a.roles, "review:use")) {
    const owners = await db
      .select({ ownerId: bracketSets.ownerId })
      .from(compositeInputs)
      .innerJoin(reductions, eq(reductions.id, compositeInputs.reductionId))
      .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
      .where(eq(compositeInputs.compositeId, row.id));
    if (!owners.some((o) => o.ownerId === a.userId)) throw notFound("That composite");
  }
  const [composer] = row.composedBy ? await db.select({ name: users.name }).from(users).where(eq(users.id, row.composedBy)).limit(1) : [];
  return toDto(row, inputs, composer?.name ?? null);
}

/** Composites the actor composed, newest first (a curator: every composite). */
export async function listComposites(db: DbOrTx, actor: Actor | null): Promise<CompositeDto[]> {
  const a = requireComposer(actor);
  const query = db.select().from(composites);
  // A curator sees every composite; anyone else their own.
  const scoped = can(a.roles, "review:use") ? query : query.where(eq(composites.composedBy, a.userId));
  const rows = await scoped.orderBy(desc(composites.createdAt)).limit(200);
  const inputs = await loadInputs(db, rows.map((r) => r.id));
  const composerIds = [...new Set(rows.map((r) => r.composedBy).filter((id): id is string => id !== null))];
  const names = new Map((composerIds.length ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, composerIds)) : []).map((u) => [u.id, u.name]));
  return rows.map((r) => toDto(r, inputs.get(r.id) ?? [], r.composedBy ? names.get(r.composedBy) ?? null : null));
}
