// What the public may read of plates: published plates only, as DTOs, with a
// site's position never finer than its precision allows. A withdrawn plate
// answers with its metadata and the reason, but no images.
import { and, desc, eq, ilike, inArray, lt, ne, or, sql, type SQL } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, kits, plates, plateVersions, reductions, sites, users, type Plate, type PlateGeometry, type Rendition } from "@/db/schema";
import { notFound } from "@/lib/errors";
import { toPublicSite, type PublicPosition } from "@/lib/sites/precision";
import { REDUCTION_FILE_OF, plateDownloadName, type PlateDownloadKind } from "./download-names";
import { LICENCE_INFO, type LicenceInfo } from "./licences";

/** Where a reduction's public files are served; the tiles folder's names follow the worker's layout. */
export function reductionFilesBase(reductionId: string): string {
  return `/iiif/reductions/${reductionId}`;
}

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
  reductionId: string;
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

function cardOf(p: Plate, v: { reductionId: string; renditions: Rendition[] }, site: CardSite): PlateCardDto {
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
    renditions: v.renditions,
    previewUrl: `${reductionFilesBase(v.reductionId)}/preview.jpg`,
    publishedAt: p.publishedAt?.toISOString() ?? null,
  };
}

/** Published plates, newest first, filtered; keyset paging on (publishedAt, slug). */
export async function listPublishedPlates(db: DbOrTx, filters: PlateFilters = {}): Promise<{ plates: PlateCardDto[]; nextCursor: string | null }> {
  const limit = Math.min(Math.max(filters.limit ?? 24, 1), 60);
  const where: SQL[] = [eq(plates.state, "published")];
  if (filters.eclipseId) where.push(eq(plates.eclipseId, filters.eclipseId));
  if (filters.featuredOnly) where.push(eq(plates.featured, true));
  if (filters.country) where.push(eq(plates.siteCountry, filters.country), ne(sites.precision, "hidden"));
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
      renditions: plateVersions.renditions,
      site: CARD_SITE_COLUMNS,
    })
    .from(plates)
    .innerJoin(plateVersions, and(eq(plateVersions.plateId, plates.id), eq(plateVersions.version, plates.currentVersion)))
    .innerJoin(bracketSets, eq(bracketSets.id, plates.bracketSetId))
    .innerJoin(sites, eq(sites.id, bracketSets.siteId))
    .where(and(...where))
    .orderBy(desc(plates.publishedAt), desc(plates.slug))
    .limit(limit + 1);
  const page = rows.slice(0, limit);
  const last = page.at(-1);
  return {
    plates: page.map((r) => cardOf(r.plate, r, r.site)),
    nextCursor: rows.length > limit && last ? `${last.plate.publishedAt?.toISOString()}|${last.plate.slug}` : null,
  };
}

/** Values for the gallery's filters, from published plates only. */
export async function listPlateFacets(db: DbOrTx): Promise<{ eclipses: string[]; countries: string[]; photographers: string[] }> {
  const rows = await db
    .selectDistinct({ eclipseId: plates.eclipseId, country: PUBLIC_COUNTRY, photographer: plates.acquiredBy })
    .from(plates)
    .innerJoin(bracketSets, eq(bracketSets.id, plates.bracketSetId))
    .innerJoin(sites, eq(sites.id, bracketSets.siteId))
    .where(eq(plates.state, "published"));
  const uniq = (xs: (string | null)[]) => [...new Set(xs.filter((x): x is string => !!x))].sort();
  return { eclipses: uniq(rows.map((r) => r.eclipseId)).reverse(), countries: uniq(rows.map((r) => r.country)), photographers: uniq(rows.map((r) => r.photographer)) };
}

/** True when a published plate shows this reduction in its current version: its files are public then. */
export async function isReductionPublic(db: DbOrTx, reductionId: string): Promise<boolean> {
  const [row] = await db
    .select({ id: plates.id })
    .from(plateVersions)
    .innerJoin(plates, and(eq(plates.id, plateVersions.plateId), eq(plates.currentVersion, plateVersions.version)))
    .where(and(eq(plateVersions.reductionId, reductionId), eq(plates.state, "published")))
    .limit(1);
  return Boolean(row);
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
  const [red] = await db.select().from(reductions).where(eq(reductions.id, v.reductionId)).limit(1);
  const [set] = await db
    .select({ siteId: bracketSets.siteId, kitId: bracketSets.kitId, ownerName: users.name })
    .from(bracketSets)
    .innerJoin(users, eq(users.id, bracketSets.ownerId))
    .where(eq(bracketSets.id, plate.bracketSetId))
    .limit(1);
  const [site] = set ? await db.select({ ...CARD_SITE_COLUMNS, kind: sites.kind }).from(sites).where(eq(sites.id, set.siteId)).limit(1) : [];
  const [kit] = set?.kitId ? await db.select().from(kits).where(eq(kits.id, set.kitId)).limit(1) : [];

  const m = (red?.measurements ?? {}) as Record<string, unknown>;
  const timings = (m.timingsMs ?? {}) as Record<string, unknown>;
  const facts = v.facts;
  const base = reductionFilesBase(v.reductionId);
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
  const params = (red?.params ?? {}) as unknown as Record<string, unknown>;
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
      pipelineVersion: red?.pipelineVersion ?? null,
      registration: String(params.registration ?? ""),
      filter: String(params.filter ?? ""),
      filterStrength: num(params.filterStrength) ?? 0.3,
      stages: Object.entries(timings).flatMap(([name, ms]) => (num(ms) === null ? [] : [{ name, ms: num(ms) as number }])),
      moonSilhouetteUtc: facts.moonSilhouetteUtc,
      referenceFrame: facts.referenceFrame,
      dynamicRangeStops: facts.dynamicRangeStops,
    },
    downloads,
    versions: versions.map((x) => ({ version: x.version, createdAt: x.createdAt.toISOString(), changeNote: x.changeNote, url: `/plates/${plate.slug}/v/${x.version}` })),
    withdrawn,
    reductionId: v.reductionId,
  };
}
