// Making a plate from a finished reduction or composite: its report and the
// pyramids' info.json are read once, and what the public pages need (sizes, the
// Sun and Moon in rendition pixels, exposures and times) is kept with the
// version. Used by the demo seed and by the review desk's publishing.
import { and, asc, eq, or, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, compositeInputs, composites, plates, plateVersions, reductions, sites, type PlateFacts, type PlateGeometry, type Rendition } from "@/db/schema";
import { AppError } from "@/lib/errors";
import type { PlateTexts } from "./desk-input";
import { findCountry } from "@/lib/geo/country";
import { bucketName, readSmallObject } from "@/lib/storage";
import { parseReport } from "@/lib/reductions/report-schema";
import type { PlateSource } from "./source";

export interface NewPlateTexts extends PlateTexts {
  slug: string;
  renditions: Rendition[];
  featured?: boolean;
  publish: boolean;
  createdBy: string | null;
}

export interface NewPlateInput extends NewPlateTexts {
  reductionId: string;
}

export interface NewCompositePlateInput extends NewPlateTexts {
  compositeId: string;
}

const num = (v: unknown): number | undefined => (typeof v === "number" && Number.isFinite(v) ? v : undefined);
const point = (v: unknown): { x: number; y: number } | undefined => {
  const p = v as { x?: unknown; y?: unknown } | null;
  return p && num(p.x) !== undefined && num(p.y) !== undefined ? { x: p.x as number, y: p.y as number } : undefined;
};

/** Lower-case words joined by hyphens, at most 80 characters: safe in a URL. */
export function slugify(text: string): string {
  return (
    text
      .normalize("NFKD")
      .replace(/[\u0300-\u036f]/g, "")
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-+|-+$/g, "")
      .slice(0, 80)
      .replace(/-+$/g, "") || "plate"
  );
}

/**
 * Geometry in a rendition's pixels from the report's master pixels: the
 * renditions may be smaller than the master (a reduction's output size), so
 * positions and radii scale by the width ratio; plate scale grows by it.
 */
export function geometryFromReport(input: unknown, renditionWidth: number): PlateGeometry {
  const { overall } = parseReport(input);
  const sky = overall.sky;
  const width = overall.masterSize?.width;
  const k = width ? renditionWidth / width : 1;
  const scalePoint = (p: { x: number | null; y: number | null } | null | undefined) => (p && p.x !== null && p.y !== null ? { x: p.x * k, y: p.y * k } : undefined);
  const g: PlateGeometry = {};
  const sunCentre = scalePoint(sky?.sunCentrePx) ?? scalePoint(overall.sunCentrePx);
  const sunRadius = sky?.sunRadiusPx;
  if (sunCentre && typeof sunRadius === "number") {
    g.sunCentre = sunCentre;
    g.sunRadiusPx = sunRadius * k;
  }
  const moonCentre = scalePoint(overall.moonCentrePx);
  if (moonCentre && typeof overall.moonRadiusPx === "number") {
    g.moonCentre = moonCentre;
    g.moonRadiusPx = overall.moonRadiusPx * k;
  }
  if (typeof sky?.solarNorthAngleDeg === "number") g.solarNorthAngleDeg = sky.solarNorthAngleDeg;
  if (typeof sky?.plateScaleArcsecPerPx === "number") g.plateScaleArcsecPerPx = sky.plateScaleArcsecPerPx / k;
  return g;
}

export function factsFromReport(input: unknown): PlateFacts {
  const { frames, overall } = parseReport(input);
  const exposures = frames.map((f) => f.exposure?.seconds).filter((x): x is number => typeof x === "number" && Number.isFinite(x));
  const times = frames
    .map((f) => f.sky?.midExposureUtc ?? f.captureTimeUtc)
    .filter((t): t is string => typeof t === "string")
    .sort();
  const master = overall.masterSize;
  return {
    exposuresS: exposures.sort((a, b) => a - b),
    captureStartUtc: times[0] ?? null,
    captureEndUtc: times.at(-1) ?? null,
    moonSilhouetteUtc: overall.sky?.moonSilhouetteUtc ?? null,
    referenceFrame: overall.referenceFrame,
    dynamicRangeStops: overall.dynamicRangeStops,
    masterSize: master ? { width: master.width, height: master.height } : null,
  };
}

async function readJson(key: string): Promise<Record<string, unknown>> {
  const bytes = await readSmallObject({ bucket: bucketName("derived"), key });
  return JSON.parse(bytes.toString("utf8")) as Record<string, unknown>;
}

export interface PreparedSource {
  source: PlateSource;
  /** The bracket set of a reduction; null for a composite (its sets are its inputs'). */
  setId: string | null;
  eclipseId: string;
  siteCountry: string | null;
  renditions: Rendition[];
  imageSizes: Partial<Record<Rendition, { width: number; height: number }>>;
  geometry: PlateGeometry;
  facts: PlateFacts;
}

/** What a plate version keeps of a finished reduction: sizes, geometry and facts read once from its files. */
export async function readReductionForPlate(db: DbOrTx, reductionId: string, renditions: Rendition[]): Promise<PreparedSource> {
  const [red] = await db.select().from(reductions).where(eq(reductions.id, reductionId)).limit(1);
  if (!red || red.state !== "done" || !red.outputs) {
    throw new AppError("conflict", `Reduction ${reductionId} has not finished, so it cannot be shown on a plate.`);
  }
  if (renditions.length === 0) throw new AppError("invalid_input", "Choose at least one rendition to publish.", [{ field: "renditions", message: "choose at least one" }]);
  const unique = [...new Set(renditions)];
  const [set] = await db.select().from(bracketSets).where(eq(bracketSets.id, red.bracketSetId)).limit(1);
  const [site] = set ? await db.select().from(sites).where(eq(sites.id, set.siteId)).limit(1) : [];
  const report = await readJson(red.outputs.report);
  const imageSizes = await readImageSizes(red.outputs.tiles, unique);
  const firstWidth = imageSizes[unique[0]]?.width ?? 0;
  return {
    source: { kind: "reduction", id: reductionId },
    setId: red.bracketSetId,
    eclipseId: set.eclipseId,
    siteCountry: site ? findCountry(site.latDeg, site.lonDeg) : null,
    renditions: unique,
    imageSizes,
    geometry: geometryFromReport(report, firstWidth),
    facts: factsFromReport(report),
  };
}

/**
 * Geometry of a composite in a rendition's pixels, from its report's grid: the
 * grid is helioprojective and north-up, centred on the Sun; the Moon shown is
 * the disk every input's Moon covers.
 */
export function geometryFromCompositeReport(report: Record<string, unknown>, renditionWidth: number): PlateGeometry {
  const grid = (report.grid ?? {}) as Record<string, unknown>;
  const k = num(grid.width) ? renditionWidth / (grid.width as number) : 1;
  const g: PlateGeometry = {};
  const sun = point(grid.sunCentre);
  const sunRadius = num(grid.sunRadiusPx);
  if (sun && sunRadius !== undefined) {
    g.sunCentre = { x: sun.x * k, y: sun.y * k };
    g.sunRadiusPx = sunRadius * k;
  }
  const moon = (report.moonCover ?? null) as { x?: unknown; y?: unknown; radiusPx?: unknown } | null;
  const moonCentre = point(moon);
  if (moonCentre && num(moon?.radiusPx) !== undefined) {
    g.moonCentre = { x: moonCentre.x * k, y: moonCentre.y * k };
    g.moonRadiusPx = (moon!.radiusPx as number) * k;
  }
  g.solarNorthAngleDeg = num(grid.solarNorthDeg) ?? 0;
  const scale = num(grid.scaleArcsecPerPx);
  if (scale !== undefined) g.plateScaleArcsecPerPx = scale / k;
  return g;
}

/** A composite's facts: its inputs' exposures and times together (the page lists each input too). */
export function factsFromCompositeReport(report: Record<string, unknown>, inputReports: Record<string, unknown>[]): PlateFacts {
  const inputs = Array.isArray(report.inputs) ? (report.inputs as Record<string, unknown>[]) : [];
  const times = inputs.map((i) => i.dateAvgUtc).filter((t): t is string => typeof t === "string").sort();
  const inputFacts = inputReports.map((r) => factsFromReport(r));
  const starts = [...inputFacts.map((f) => f.captureStartUtc), ...times].filter((t): t is string => !!t).sort();
  const ends = [...inputFacts.map((f) => f.captureEndUtc), ...times].filter((t): t is string => !!t).sort();
  const grid = (report.grid ?? {}) as { width?: unknown; height?: unknown };
  return {
    exposuresS: [...new Set(inputFacts.flatMap((f) => f.exposuresS))].sort((a, b) => a - b),
    captureStartUtc: starts[0] ?? null,
    captureEndUtc: ends.at(-1) ?? null,
    moonSilhouetteUtc: null,
    referenceFrame: null,
    dynamicRangeStops: num(report.dynamicRangeStops) ?? null,
    masterSize: num(grid.width) && num(grid.height) ? { width: grid.width as number, height: grid.height as number } : null,
    inputs: inputFacts.map((f) => ({ exposuresS: f.exposuresS, captureStartUtc: f.captureStartUtc, captureEndUtc: f.captureEndUtc })),
  };
}

async function readImageSizes(tilesPrefix: string, renditions: Rendition[]): Promise<Partial<Record<Rendition, { width: number; height: number }>>> {
  const imageSizes: Partial<Record<Rendition, { width: number; height: number }>> = {};
  for (const key of renditions) {
    const info = await readJson(`${tilesPrefix}${key}-iiif/info.json`);
    imageSizes[key] = { width: Number(info.width), height: Number(info.height) };
  }
  return imageSizes;
}

/** What a plate version keeps of a finished composite: sizes, geometry and facts read once from its files and its inputs'. */
export async function readCompositeForPlate(db: DbOrTx, compositeId: string, renditions: Rendition[]): Promise<PreparedSource> {
  const [row] = await db.select().from(composites).where(eq(composites.id, compositeId)).limit(1);
  if (!row || row.state !== "done" || !row.outputs?.prefix) {
    throw new AppError("conflict", `Composite ${compositeId} has not finished, so it cannot be shown on a plate.`);
  }
  if (renditions.length === 0) throw new AppError("invalid_input", "Choose at least one rendition to publish.", [{ field: "renditions", message: "choose at least one" }]);
  const unique = [...new Set(renditions)];
  const inputs = await db
    .select({ outputs: reductions.outputs })
    .from(compositeInputs)
    .innerJoin(reductions, eq(reductions.id, compositeInputs.reductionId))
    .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
    .innerJoin(sites, eq(sites.id, bracketSets.siteId))
    .where(eq(compositeInputs.compositeId, compositeId))
    .orderBy(asc(compositeInputs.position));
  const report = await readJson(`${row.outputs.prefix}report.json`);
  const inputReports = await Promise.all(inputs.map((i) => (i.outputs?.report ? readJson(i.outputs.report).catch(() => ({})) : Promise.resolve({}))));
  const imageSizes = await readImageSizes(`${row.outputs.prefix}tiles/`, unique);
  return {
    source: { kind: "composite", id: compositeId },
    setId: null,
    eclipseId: row.eclipseId,
    // No one country: a composite may span sites and countries, and each input's site is shown at its own precision on the page.
    siteCountry: null,
    renditions: unique,
    imageSizes,
    geometry: geometryFromCompositeReport(report, imageSizes[unique[0]]?.width ?? 0),
    facts: factsFromCompositeReport(report, inputReports),
  };
}

/** A plate (draft or published) at version 1 showing what was prepared. */
async function insertPlate(db: DbOrTx, prepared: PreparedSource, input: NewPlateTexts): Promise<{ id: string; slug: string }> {
  return db.transaction(async (tx) => {
    const [plate] = await tx
      .insert(plates)
      .values({
        slug: input.slug,
        bracketSetId: prepared.setId,
        eclipseId: prepared.eclipseId,
        state: input.publish ? "published" : "draft",
        title: input.title,
        caption: input.caption,
        description: input.description,
        altText: input.altText,
        acquiredBy: input.acquiredBy,
        processedBy: input.processedBy,
        licence: input.licence,
        siteCountry: prepared.siteCountry,
        featured: input.featured ?? false,
        publishedAt: input.publish ? sql`now()` : null,
        createdBy: input.createdBy,
      })
      .returning({ id: plates.id, slug: plates.slug });
    await tx.insert(plateVersions).values({
      plateId: plate.id,
      version: 1,
      ...versionSource(prepared.source),
      renditions: prepared.renditions,
      imageSizes: prepared.imageSizes,
      geometry: prepared.geometry,
      facts: prepared.facts,
      changeNote: "First version",
      createdBy: input.createdBy,
    });
    return plate;
  });
}

/** The version row's columns for a source: exactly one id set. */
export function versionSource(source: PlateSource): { reductionId: string | null; compositeId: string | null } {
  return source.kind === "composite" ? { reductionId: null, compositeId: source.id } : { reductionId: source.id, compositeId: null };
}

/** A plate (draft or published) at version 1 showing a finished reduction. */
export async function createPlateFromReduction(db: DbOrTx, input: NewPlateInput): Promise<{ id: string; slug: string }> {
  return insertPlate(db, await readReductionForPlate(db, input.reductionId, input.renditions), input);
}

/** A plate (draft or published) at version 1 showing a finished composite. */
export async function createPlateFromComposite(db: DbOrTx, input: NewCompositePlateInput): Promise<{ id: string; slug: string }> {
  return insertPlate(db, await readCompositeForPlate(db, input.compositeId, input.renditions), input);
}

/** The plate that shows a reduction or a composite, if any (the seed uses it to stay idempotent; the composite's page links it). */
export async function findPlateOfSource(db: DbOrTx, sourceId: string): Promise<{ id: string; slug: string; state: string } | null> {
  const [row] = await db
    .select({ id: plates.id, slug: plates.slug, state: plates.state })
    .from(plateVersions)
    .innerJoin(plates, and(eq(plates.id, plateVersions.plateId)))
    .where(or(eq(plateVersions.reductionId, sourceId), eq(plateVersions.compositeId, sourceId)))
    .limit(1);
  return row ?? null;
}

/** The plate that shows a reduction, if any (the seed uses it to stay idempotent). */
export const findPlateOfReduction = findPlateOfSource;
