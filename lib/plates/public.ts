// What the public may read of plates: published plates only, as DTOs, with a
// site's position never finer than its precision allows. A withdrawn plate
// answers with its metadata and the reason, but no images. A composite's plate
// lists each input (photographer, instrument, site at its precision, what the
// composite took from it) instead of one set's site and kit.
import { and, asc, desc, eq, ilike, inArray, isNull, lt, ne, or, sql, type SQL } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, compositeInputs, composites, kits, plates, plateVersions, reductions, sites, users, type Plate, type PlateFacts, type PlateGeometry, type Rendition } from "@/db/schema";
import { notFound } from "@/lib/errors";
import { toPublicSite, type PublicPosition } from "@/lib/sites/precision";
import { REDUCTION_FILE_OF, plateDownloadName, type PlateDownloadKind } from "./download-names";
import { LICENCE_INFO, type LicenceInfo } from "./licences";
import { plateFilesBase, sourceOfVersion, type PlateSource } from "./source";


export interface PlateCardDto {
  slug: string;
  title: string;
  caption: string;
  altText: string;
  eclipseId: string;
  /** Null for a hidden site. */
  siteCountry: string | null;
  /** The site's public label (never its private name); null when it has none or is hidden. */
  siteLabel: string | null;
  /** At the site's precision; null when the observer keeps it private. */
  sitePosition: PublicPosition | null;
  photographer: string;
  /** True for a composite's plate: several kits or observers, no one site. */
  isComposite: boolean;
  renditions: Rendition[];
  previewUrl: string;
  publishedAt: string | null;
}

export interface PublicRenditionDto {
  key: Rendition;
  width: number;
  height: number;
  iiifInfoUrl: string;
  dziUrl: string;
}

export interface PlateDownloadDto {
  kind: PlateDownloadKind;
  label: string;
  url: string;
  format: string;
  /** The name the file is saved under (lib/plates/download-files.ts). */
  fileName: string;
}

export interface PlateVersionLinkDto {
  version: number;
  createdAt: string;
  changeNote: string;
  url: string;
}

/** One input of a composite's plate, as the public reads it: no set names, the site at its precision. */
export interface PublicCompositeInputDto {
  photographer: string;
  site: { label: string | null; kind: string; position: PublicPosition | null };
  kit: { name: string; camera: string; focalMm: number; fNumber: number } | null;
  captureSpan: { start: string; end: string } | null;
  exposuresS: number[];
  pipelineVersion: string | null;
  /** From the composite's report: where this input reaches, how fine it is, how it was matched, and its share of the light. */
  plateScaleArcsecPerPx: number | null;
  fieldR: { inner: number; outer: number } | null;
  factors: number[];
  refinementArcsec: number | null;
  isReference: boolean;
  weightShare: number | null;
  /** The colour this input has in the contribution map. */
  colour: string | null;
}

export interface PublicCompositeDto {
  composedBy: string | null;
  inputs: PublicCompositeInputDto[];
  /** The map of which input gives the light where, the viewer's layer. */
  contributionUrl: string;
  scaleArcsecPerPx: number | null;
}

export interface PublicPlateDto extends PlateCardDto {
  version: number;
  isCurrentVersion: boolean;
  description: string;
  acquiredBy: string;
  processedBy: string;
  licence: LicenceInfo;
  site: { label: string | null; kind: string; position: PublicPosition | null };
  kit: { name: string; camera: string; focalMm: number; fNumber: number } | null;
  exposuresS: number[];
  captureSpan: { start: string; end: string } | null;
  renditionFiles: PublicRenditionDto[];
  geometry: PlateGeometry;
  disclosure: {
    pipelineVersion: string | null;
    registration: string;
    filter: string;
    filterStrength: number;
    stages: { name: string; ms: number }[];
    moonSilhouetteUtc: string | null;
    referenceFrame: string | null;
    dynamicRangeStops: number | null;
  };
  downloads: PlateDownloadDto[];
  versions: PlateVersionLinkDto[];
  withdrawn: { at: string; reason: string; kind: "temporary" | "permanent" } | null;
  /** What the version shows: a reduction of one set, or a composite (then `composite` lists its inputs). */
  source: PlateSource;
  composite: PublicCompositeDto | null;
}

export interface PlateFilters {
  featuredOnly?: boolean;
  eclipseId?: string;
  country?: string;
  photographer?: string;
  rendition?: Rendition;
  q?: string;
  /** The publishedAt|slug of the last card of the previous page. */
  cursor?: string;
  limit?: number;
}

type CardSite = { publicLabel: string; latDeg: number; lonDeg: number; precision: "exact" | "rounded" | "hidden" } | null | undefined;

/** Only these columns of a site ever reach a public query: never its private name. */
const CARD_SITE_COLUMNS = { publicLabel: sites.publicLabel, latDeg: sites.latDeg, lonDeg: sites.lonDeg, precision: sites.precision };

/** A plate's country, unless its site is hidden: the filters and facets never reveal it either. */
const PUBLIC_COUNTRY = sql<string | null>`case when ${sites.precision} = 'hidden' then null else ${plates.siteCountry} end`;

function cardOf(p: Plate, v: { reductionId: string | null; compositeId: string | null; renditions: Rendition[] }, site: CardSite): PlateCardDto {
  const shown = site ? toPublicSite(site, p.siteCountry) : { label: null, country: null, position: null };
  return {
    slug: p.slug,
    title: p.title,
    caption: p.caption,
    altText: p.altText,
    eclipseId: p.eclipseId,
    siteCountry: shown.country,
    siteLabel: shown.label,
    sitePosition: shown.position,
    photographer: p.acquiredBy,
    isComposite: v.compositeId !== null,
    renditions: v.renditions,
    previewUrl: `${plateFilesBase(sourceOfVersion(v))}/preview.jpg`,
    publishedAt: p.publishedAt?.toISOString() ?? null,
  };
}

/** Published plates, newest first, filtered; keyset paging on (publishedAt, slug). */
export async function listPublishedPlates(db: DbOrTx, filters: PlateFilters = {}): Promise<{ plates: PlateCardDto[]; nextCursor: string | null }> {
  const limit = Math.min(Math.max(filters.limit ?? 24, 1), 60);
  const where: SQL[] = [eq(plates.state, "published")];
  if (filters.eclipseId) where.push(eq(plates.eclipseId, filters.eclipseId));
  if (filters.featuredOnly) where.push(eq(plates.featured, true));
  // A composite's plate has a country only when every input's site shows it (lib/plates/publish.ts).
  if (filters.country) where.push(eq(plates.siteCountry, filters.country), or(isNull(plates.bracketSetId), ne(sites.precision, "hidden")) as SQL);
  if (filters.photographer) where.push(eq(plates.acquiredBy, filters.photographer));
  if (filters.rendition) where.push(sql`${plateVersions.renditions} @> ${JSON.stringify([filters.rendition])}::jsonb`);
  if (filters.q?.trim()) {
    const like = `%${filters.q.trim().replace(/[%_\\]/g, (c) => `\\${c}`)}%`;
    where.push(or(ilike(plates.title, like), ilike(plates.caption, like), ilike(plates.description, like), ilike(plates.acquiredBy, like)) as SQL);
  }
  if (filters.cursor) {
    const [at, slug] = filters.cursor.split("|");
    const when = new Date(at);
    if (!Number.isNaN(when.getTime()) && slug) {
      where.push(or(lt(plates.publishedAt, when), and(eq(plates.publishedAt, when), lt(plates.slug, slug))) as SQL);
    }
  }
  const rows = await db
    .select({
      plate: plates,
      reductionId: plateVersions.reductionId,
      compositeId: plateVersions.compositeId,
      renditions: plateVersions.renditions,
      site: CARD_SITE_COLUMNS,
    })
    .from(plates)
    .innerJoin(plateVersions, and(eq(plateVersions.plateId, plates.id), eq(plateVersions.version, plates.currentVersion)))
    // A composite's plate has no one set or site: its card names none.
    .leftJoin(bracketSets, eq(bracketSets.id, plates.bracketSetId))
    .leftJoin(sites, eq(sites.id, bracketSets.siteId))
    .where(and(...where))
    .orderBy(desc(plates.publishedAt), desc(plates.slug))
    .limit(limit + 1);
  const page = rows.slice(0, limit);
  const last = page.at(-1);
  return {
    plates: page.map((r) => cardOf(r.plate, r, r.site?.precision ? r.site : null)),
    nextCursor: rows.length > limit && last ? `${last.plate.publishedAt?.toISOString()}|${last.plate.slug}` : null,
  };
}

/** Values for the gallery's filters, from published plates only. */
export async function listPlateFacets(db: DbOrTx): Promise<{ eclipses: string[]; countries: string[]; photographers: string[] }> {
  const rows = await db
    .selectDistinct({ eclipseId: plates.eclipseId, country: PUBLIC_COUNTRY, photographer: plates.acquiredBy })
    .from(plates)
    .leftJoin(bracketSets, eq(bracketSets.id, plates.bracketSetId))
    .leftJoin(sites, eq(sites.id, bracketSets.siteId))
    .where(eq(plates.state, "published"));
  const uniq = (xs: (string | null)[]) => [...new Set(xs.filter((x): x is string => !!x))].sort();
  return { eclipses: uniq(rows.map((r) => r.eclipseId)).reverse(), countries: uniq(rows.map((r) => r.country)), photographers: uniq(rows.map((r) => r.photographer)) };
}

const num = (v: unknown): number | null => (typeof v === "number" && Number.isFinite(v) ? v : null);

/**
 * One plate by its slug (and a version, for permanent links). Drafts are not
 * found; a withdrawn plate comes back with `withdrawn` set and no files.
 */
export async function findPublicPlate(db: DbOrTx, slug: string, version?: number): Promise<PublicPlateDto> {
  const [plate] = await db
    .select()
    .from(plates)
    .where(and(eq(plates.slug, slug), inArray(plates.state, ["published", "withdrawn"])))
    .limit(1);
  if (!plate) throw notFound("That plate");
  const versions = await db.select().from(plateVersions).where(eq(plateVersions.plateId, plate.id)).orderBy(desc(plateVersions.version));
  const v = versions.find((x) => x.version === (version ?? plate.currentVersion));
  if (!v) throw notFound(`Version ${version} of that plate`);
  const source = sourceOfVersion(v);
  const [red] = v.reductionId ? await db.select().from(reductions).where(eq(reductions.id, v.reductionId)).limit(1) : [];
  const [comp] = v.compositeId ? await db.select().from(composites).where(eq(composites.id, v.compositeId)).limit(1) : [];
  const [set] = plate.bracketSetId
    ? await db
        .select({ siteId: bracketSets.siteId, kitId: bracketSets.kitId, ownerName: users.name })
        .from(bracketSets)
        .innerJoin(users, eq(users.id, bracketSets.ownerId))
        .where(eq(bracketSets.id, plate.bracketSetId))
        .limit(1)
    : [];
  const [site] = set ? await db.select({ ...CARD_SITE_COLUMNS, kind: sites.kind }).from(sites).where(eq(sites.id, set.siteId)).limit(1) : [];
  const [kit] = set?.kitId ? await db.select().from(kits).where(eq(kits.id, set.kitId)).limit(1) : [];

  const m = (red?.measurements ?? comp?.measurements ?? {}) as Record<string, unknown>;
  const timings = (m.timingsMs ?? {}) as Record<string, unknown>;
  const facts = v.facts;
  const base = plateFilesBase(source);
  const withdrawn = plate.state === "withdrawn" ? { at: plate.withdrawnAt?.toISOString() ?? "", reason: plate.withdrawnReason ?? "", kind: plate.withdrawnKind ?? "permanent" } : null;
  const licence = LICENCE_INFO[plate.licence];
  const renditionFiles: PublicRenditionDto[] = withdrawn
    ? []
    : v.renditions.flatMap((key) => {
        const size = v.imageSizes[key];
        return size ? [{ key, width: size.width, height: size.height, iiifInfoUrl: `${base}/${key}-iiif/info.json`, dziUrl: `${base}/${key}.dzi` }] : [];
      });
  const downloads: PlateDownloadDto[] = withdrawn
    ? []
    : [
        // Credits and licence are embedded in this file's XMP (lib/plates/web-jpeg.ts).
        {
          kind: "web" as const,
          label: "Web JPEG",
          url: `/api/plates/${encodeURIComponent(plate.slug)}/web-jpeg?version=${v.version}`,
          format: "image/jpeg",
          fileName: plateDownloadName(plate.slug, v.version, "web"),
        },
        ...(licence.allowsDownload
          ? [
              ...v.renditions.map((key) => ({ kind: key, label: `${key === "natural" ? "Natural" : "Structure"} rendition, 16-bit PNG`, format: "image/png" })),
              { kind: "master" as const, label: "Master, FITS", format: "application/fits" },
            ].map((d) => {
              const fileName = plateDownloadName(plate.slug, v.version, d.kind);
              return { ...d, fileName, url: `${base}/${REDUCTION_FILE_OF[d.kind]}?name=${fileName}` };
            })
          : []),
      ];
  const params = (red?.params ?? comp?.params ?? {}) as unknown as Record<string, unknown>;
  const card = cardOf(plate, v, site);
  return {
    ...card,
    version: v.version,
    isCurrentVersion: v.version === plate.currentVersion,
    description: plate.description,
    acquiredBy: plate.acquiredBy,
    processedBy: plate.processedBy,
    licence,
    site: { label: card.siteLabel, kind: site?.kind ?? "fixed", position: card.sitePosition },
    kit: kit ? { name: kit.name, camera: kit.camera, focalMm: kit.focalMm, fNumber: kit.fNumber } : null,
    exposuresS: facts.exposuresS,
    captureSpan: facts.captureStartUtc && facts.captureEndUtc ? { start: facts.captureStartUtc, end: facts.captureEndUtc } : null,
    renditionFiles,
    geometry: withdrawn ? {} : v.geometry,
    disclosure: {
      pipelineVersion: red?.pipelineVersion ?? comp?.pipelineVersion ?? null,
      registration: comp ? "composite" : String(params.registration ?? ""),
      filter: String(params.filter ?? ""),
      filterStrength: num(params.filterStrength) ?? 0.3,
      // A composite's steps are described in words on its page (and each input was reduced by the stages above).
      stages: comp ? [] : Object.entries(timings).flatMap(([name, ms]) => (num(ms) === null ? [] : [{ name, ms: num(ms) as number }])),
      moonSilhouetteUtc: facts.moonSilhouetteUtc,
      referenceFrame: facts.referenceFrame,
      dynamicRangeStops: facts.dynamicRangeStops,
    },
    downloads,
    versions: versions.map((x) => ({ version: x.version, createdAt: x.createdAt.toISOString(), changeNote: x.changeNote, url: `/plates/${plate.slug}/v/${x.version}` })),
    withdrawn,
    source,
    composite: comp ? await describeComposite(db, comp, base, facts.inputs ?? []) : null,
  };
}

interface InputFigures {
  isReference?: boolean;
  scaleArcsecPerPx?: number;
  fieldR?: { inner: number; outer: number };
  factors?: number[];
  refinement?: { lonArcsec: number; latArcsec: number; applied: boolean };
  weightShare?: number;
  colour?: string;
}

/** A composite's inputs for its public plate: each photographer, instrument and site (at its precision), with the composite's figures for it. */
async function describeComposite(db: DbOrTx, comp: typeof composites.$inferSelect, base: string, inputFacts: NonNullable<PlateFacts["inputs"]>): Promise<PublicCompositeDto> {
  const rows = await db
    .select({
      position: compositeInputs.position,
      photographer: users.name,
      site: { ...CARD_SITE_COLUMNS, kind: sites.kind },
      kit: { name: kits.name, camera: kits.camera, focalMm: kits.focalMm, fNumber: kits.fNumber },
      kitId: kits.id,
      pipelineVersion: reductions.pipelineVersion,
    })
    .from(compositeInputs)
    .innerJoin(reductions, eq(reductions.id, compositeInputs.reductionId))
    .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
    .innerJoin(users, eq(users.id, bracketSets.ownerId))
    .innerJoin(sites, eq(sites.id, bracketSets.siteId))
    .leftJoin(kits, eq(kits.id, bracketSets.kitId))
    .where(eq(compositeInputs.compositeId, comp.id))
    .orderBy(asc(compositeInputs.position));
  const report = (comp.measurements ?? {}) as { inputs?: InputFigures[]; grid?: { scaleArcsecPerPx?: number } };
  const [composer] = comp.composedBy ? await db.select({ name: users.name }).from(users).where(eq(users.id, comp.composedBy)).limit(1) : [];
  return {
    composedBy: composer?.name ?? null,
    contributionUrl: `${base}/contribution.jpg`,
    scaleArcsecPerPx: num(report.grid?.scaleArcsecPerPx),
    inputs: rows.map((r) => {
      const figures = report.inputs?.[r.position] ?? {};
      const shown = toPublicSite(r.site, null);
      const facts = inputFacts[r.position];
      const refinement = figures.refinement?.applied ? Math.hypot(figures.refinement.lonArcsec, figures.refinement.latArcsec) : null;
      return {
        photographer: r.photographer,
        site: { label: shown.label, kind: r.site.kind, position: shown.position },
        kit: r.kitId ? r.kit : null,
        captureSpan: facts?.captureStartUtc && facts.captureEndUtc ? { start: facts.captureStartUtc, end: facts.captureEndUtc } : null,
        exposuresS: facts?.exposuresS ?? [],
        pipelineVersion: r.pipelineVersion,
        plateScaleArcsecPerPx: num(figures.scaleArcsecPerPx),
        fieldR: figures.fieldR ?? null,
        factors: figures.factors ?? [],
        refinementArcsec: refinement,
        isReference: figures.isReference ?? false,
        weightShare: num(figures.weightShare),
        colour: figures.colour ?? null,
      };
    }),
  };
}
