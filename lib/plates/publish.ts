// Making a plate from a finished reduction: the reduction's report and the
// pyramids' info.json are read once, and what the public pages need (sizes, the
// Sun and Moon in rendition pixels, exposures and times) is kept with the
// version. Used by the demo seed now and by the review desk's publishing.
import { and, eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, plates, plateVersions, reductions, sites, type PlateFacts, type PlateGeometry, type Rendition } from "@/db/schema";
import { AppError } from "@/lib/errors";
import type { PlateTexts } from "./desk-input";
import { findCountry } from "@/lib/geo/country";
import { bucketName, readSmallObject } from "@/lib/storage";

export interface NewPlateInput extends PlateTexts {
  reductionId: string;
  slug: string;
  renditions: Rendition[];
  featured?: boolean;
  publish: boolean;
  createdBy: string | null;
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
export function geometryFromReport(report: Record<string, unknown>, renditionWidth: number): PlateGeometry {
  const overall = (report.overall ?? {}) as Record<string, unknown>;
  const sky = (overall.sky ?? {}) as Record<string, unknown>;
  const master = (overall.masterSize ?? {}) as { width?: number };
  const k = num(master.width) ? renditionWidth / (master.width as number) : 1;
  const scalePoint = (p?: { x: number; y: number }) => (p ? { x: p.x * k, y: p.y * k } : undefined);
  const g: PlateGeometry = {};
  const sunCentre = scalePoint(point(sky.sunCentrePx) ?? point(overall.sunCentrePx));
  const sunRadius = num(sky.sunRadiusPx);
  if (sunCentre && sunRadius !== undefined) {
    g.sunCentre = sunCentre;
    g.sunRadiusPx = sunRadius * k;
  }
  const moonCentre = scalePoint(point(overall.moonCentrePx));
  const moonRadius = num(overall.moonRadiusPx);
  if (moonCentre && moonRadius !== undefined) {
    g.moonCentre = moonCentre;
    g.moonRadiusPx = moonRadius * k;
  }
  const north = num(sky.solarNorthAngleDeg);
  if (north !== undefined) g.solarNorthAngleDeg = north;
  const scale = num(sky.plateScaleArcsecPerPx);
  if (scale !== undefined) g.plateScaleArcsecPerPx = scale / k;
  return g;
}

export function factsFromReport(report: Record<string, unknown>): PlateFacts {
  const overall = (report.overall ?? {}) as Record<string, unknown>;
  const sky = (overall.sky ?? {}) as Record<string, unknown>;
  const frames = Array.isArray(report.frames) ? (report.frames as Record<string, unknown>[]) : [];
  const exposures = frames.map((f) => num((f.exposure as { seconds?: unknown } | undefined)?.seconds)).filter((x): x is number => x !== undefined);
  const times = frames
    .map((f) => ((f.sky as { midExposureUtc?: unknown } | null)?.midExposureUtc ?? f.captureTimeUtc) as unknown)
    .filter((t): t is string => typeof t === "string")
    .sort();
  const master = overall.masterSize as { width?: number; height?: number } | undefined;
  return {
    exposuresS: exposures.sort((a, b) => a - b),
    captureStartUtc: times[0] ?? null,
    captureEndUtc: times.at(-1) ?? null,
    moonSilhouetteUtc: typeof sky.moonSilhouetteUtc === "string" ? sky.moonSilhouetteUtc : null,
    referenceFrame: typeof overall.referenceFrame === "string" ? overall.referenceFrame : null,
    dynamicRangeStops: num(overall.dynamicRangeStops) ?? null,
    masterSize: master && num(master.width) && num(master.height) ? { width: master.width as number, height: master.height as number } : null,
  };
}

async function readJson(key: string): Promise<Record<string, unknown>> {
  const bytes = await readSmallObject({ bucket: bucketName("derived"), key });
  return JSON.parse(bytes.toString("utf8")) as Record<string, unknown>;
}

export interface PreparedReduction {
  setId: string;
  eclipseId: string;
  siteCountry: string | null;
  renditions: Rendition[];
  imageSizes: Partial<Record<Rendition, { width: number; height: number }>>;
  geometry: PlateGeometry;
  facts: PlateFacts;
}

/** What a plate version keeps of a finished reduction: sizes, geometry and facts read once from its files. */
export async function readReductionForPlate(db: DbOrTx, reductionId: string, renditions: Rendition[]): Promise<PreparedReduction> {
  const [red] = await db.select().from(reductions).where(eq(reductions.id, reductionId)).limit(1);
  if (!red || red.state !== "done" || !red.outputs) {
    throw new AppError("conflict", `Reduction ${reductionId} has not finished, so it cannot be shown on a plate.`);
  }
  if (renditions.length === 0) throw new AppError("invalid_input", "Choose at least one rendition to publish.", [{ field: "renditions", message: "choose at least one" }]);
  const unique = [...new Set(renditions)];
  const [set] = await db.select().from(bracketSets).where(eq(bracketSets.id, red.bracketSetId)).limit(1);
  const [site] = set ? await db.select().from(sites).where(eq(sites.id, set.siteId)).limit(1) : [];
  const report = await readJson(red.outputs.report);
  const imageSizes: Partial<Record<Rendition, { width: number; height: number }>> = {};
  for (const key of unique) {
    const info = await readJson(`${red.outputs.tiles}${key}-iiif/info.json`);
    imageSizes[key] = { width: Number(info.width), height: Number(info.height) };
  }
  const firstWidth = imageSizes[unique[0]]?.width ?? 0;
  return {
    setId: red.bracketSetId,
    eclipseId: set.eclipseId,
    siteCountry: site ? findCountry(site.latDeg, site.lonDeg) : null,
    renditions: unique,
    imageSizes,
    geometry: geometryFromReport(report, firstWidth),
    facts: factsFromReport(report),
  };
}

/** A plate (draft or published) at version 1 showing a finished reduction. */
export async function createPlateFromReduction(db: DbOrTx, input: NewPlateInput): Promise<{ id: string; slug: string }> {
  const prepared = await readReductionForPlate(db, input.reductionId, input.renditions);
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
      reductionId: input.reductionId,
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

/** The plate that shows a reduction, if any (the seed uses it to stay idempotent). */
export async function findPlateOfReduction(db: DbOrTx, reductionId: string): Promise<{ id: string; slug: string } | null> {
  const [row] = await db
    .select({ id: plates.id, slug: plates.slug })
    .from(plateVersions)
    .innerJoin(plates, and(eq(plates.id, plateVersions.plateId)))
    .where(eq(plateVersions.reductionId, reductionId))
    .limit(1);
  return row ?? null;
}
