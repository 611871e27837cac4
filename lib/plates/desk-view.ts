// What the plate desk reads: plates by state, and one plate with everything
// the editor shows (versions, finished reductions to choose from, what the
// public page will reveal of the site, reports, history). DTOs only; every
// function requires review:use.
import type { PlateTexts } from "./desk-input";
import { and, desc, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { auditLog, bracketSets, composites, plates, plateVersions, reductions, sites, users, type BracketSetState, type PlateGeometry, type PlateLicence, type PlateState, type Rendition, type WithdrawalKind } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import type { LocationPrecision } from "@/db/schema";
import { toPublicPosition, type PublicPosition } from "@/lib/sites/precision";
import { findCompositeSets, findPlateRow, joinNames, pipelineCredit, requireCurator, toPlateLicence } from "./desk";
import { countOpenReports, listPlateReports, type PlateReportDto } from "./reports";
import { plateFilesBase, sourceOfVersion } from "./source";

export interface DeskPlateRowDto {
  id: string;
  slug: string;
  title: string;
  state: PlateState;
  withdrawnKind: WithdrawalKind | null;
  setName: string;
  photographer: string;
  currentVersion: number;
  openReports: number;
  updatedAt: string;
}

export async function listDeskPlates(db: Db, actor: Actor | null, state?: PlateState): Promise<DeskPlateRowDto[]> {
  requireCurator(actor, "the plate desk");
  const rows = await db
    .select({
      id: plates.id,
      slug: plates.slug,
      title: plates.title,
      state: plates.state,
      withdrawnKind: plates.withdrawnKind,
      setName: bracketSets.name,
      photographer: users.name,
      acquiredBy: plates.acquiredBy,
      currentVersion: plates.currentVersion,
      updatedAt: plates.updatedAt,
    })
    .from(plates)
    // A composite's plate has no one set: it lists as a composite, credited as its text says.
    .leftJoin(bracketSets, eq(bracketSets.id, plates.bracketSetId))
    .leftJoin(users, eq(users.id, bracketSets.ownerId))
    .where(state ? eq(plates.state, state) : undefined)
    .orderBy(desc(plates.updatedAt))
    .limit(500);
  const open = await countOpenReports(db, actor);
  return rows.map(({ acquiredBy, ...r }) => ({
    ...r,
    setName: r.setName ?? "A composite of several sets",
    photographer: r.photographer ?? acquiredBy,
    openReports: open.get(r.id) ?? 0,
    updatedAt: r.updatedAt.toISOString(),
  }));
}

export interface LocationCheckDto {
  siteName: string;
  /** What the public page calls the site; null when it shows no label (none given, or hidden). */
  publicLabel: string | null;
  precision: LocationPrecision;
  /** What the public page shows; null when the site is hidden. */
  shown: PublicPosition | null;
  /** Set when the public page will show the exact position. */
  warning: string | null;
}

export function checkLocation(site: { name: string; publicLabel: string; latDeg: number; lonDeg: number; precision: LocationPrecision }): LocationCheckDto {
  return {
    siteName: site.name,
    publicLabel: site.precision === "hidden" ? null : site.publicLabel.trim() || null,
    precision: site.precision,
    shown: toPublicPosition(site.latDeg, site.lonDeg, site.precision),
    warning:
      site.precision === "exact"
        ? "The public page will show this site's exact position. Check with the photographer that this is wanted (a home or a private garden, say), or ask them to round or hide it in the site's settings."
        : null,
  };
}

export interface DeskPlateDto extends PlateTexts {
  id: string;
  slug: string;
  state: PlateState;
  currentVersion: number;
  publishedAt: string | null;
  withdrawn: { at: string; reason: string; kind: WithdrawalKind } | null;
  /** The set a reduction's plate shows; for a composite's plate, the composite's sets together (approved only when every one is). */
  set: { id: string; name: string; state: BracketSetState; photographer: string };
  /** Set for a composite's plate: the composite and each of its input sets. */
  composite: { id: string; title: string; sets: { id: string; name: string; state: BracketSetState; photographer: string }[] } | null;
  /** What the credit fields are prefilled with, for "use the suggestion" buttons. */
  suggestions: { acquiredBy: string; processedBy: string; licence: PlateLicence };
  versions: { version: number; renditions: Rendition[]; changeNote: string; createdAt: string; url: string }[];
  /** What a new version may show: finished reductions of the plate's set, or finished composites of its eclipse. */
  sourceKind: "reduction" | "composite";
  finishedReductions: { id: string; pipelineVersion: string | null; finishedAt: string | null; filter: string; registration: string; title?: string }[];
  /** What the public page shows of each site (one per input set of a composite). */
  locations: LocationCheckDto[];
  reports: PlateReportDto[];
  /** The chosen renditions of the current version, as the public viewer takes them (tiles only). */
  image: {
    renditions: { key: Rendition; width: number; height: number; tileSource: string }[];
    geometry: PlateGeometry;
    /** A composite's contribution map, the viewer's layer as the public page has it. */
    mapLayer: { label: string; url: string; legend: { label: string; colour: string }[] } | null;
  };
  history: { action: string; at: string; actorName: string | null; detail: Record<string, unknown> }[];
}

type SetRow = { id: string; name: string; state: BracketSetState; photographer: string; siteId: string };

/** The set a reduction's plate shows, or the sets of the composite its current version shows. */
async function findPlateSets(db: Db, plate: { bracketSetId: string | null }, compositeId: string | null): Promise<SetRow[]> {
  if (plate.bracketSetId) {
    const columns = { id: bracketSets.id, name: bracketSets.name, state: bracketSets.state, photographer: users.name, siteId: bracketSets.siteId };
    return db.select(columns).from(bracketSets).innerJoin(users, eq(users.id, bracketSets.ownerId)).where(eq(bracketSets.id, plate.bracketSetId)).limit(1);
  }
  if (!compositeId) return [];
  return (await findCompositeSets(db, compositeId)).map(({ ownerName, ownerEmail: _email, ...set }) => ({ ...set, photographer: ownerName }));
}

/** The contribution map and its legend: each input's photographer, colour and share of the light, from the composite's report. */
function describeMapLayer(base: string, measurements: Record<string, unknown> | null, sets: SetRow[]): DeskPlateDto["image"]["mapLayer"] {
  const inputs = (Array.isArray(measurements?.inputs) ? measurements.inputs : []) as { colour?: string; weightShare?: number }[];
  return {
    label: "Show where each input contributes",
    url: `${base}/contribution.jpg`,
    legend: inputs.map((input, k) => ({
      label: `${sets[k]?.photographer ?? `Input ${k + 1}`}${typeof input.weightShare === "number" ? `: ${(100 * input.weightShare).toFixed(1)} % of the light` : ""}`,
      colour: input.colour ?? "#888888",
    })),
  };
}

export async function findDeskPlate(db: Db, actor: Actor | null, plateId: string): Promise<DeskPlateDto> {
  requireCurator(actor, "the plate desk");
  const plate = await findPlateRow(db, plateId);
  const versions = await db.select().from(plateVersions).where(eq(plateVersions.plateId, plateId)).orderBy(desc(plateVersions.version));
  const current = versions.find((v) => v.version === plate.currentVersion);
  const compositeId = plate.bracketSetId ? null : (current?.compositeId ?? null);
  const sets = await findPlateSets(db, plate, compositeId);
  const siteRows = await Promise.all(
    sets.map(async (set) => (await db.select({ name: sites.name, publicLabel: sites.publicLabel, latDeg: sites.latDeg, lonDeg: sites.lonDeg, precision: sites.precision }).from(sites).where(eq(sites.id, set.siteId)).limit(1))[0]),
  );
  const [comp] = compositeId
    ? await db.select({ id: composites.id, title: composites.title, composer: users.name, measurements: composites.measurements }).from(composites).leftJoin(users, eq(users.id, composites.composedBy)).where(eq(composites.id, compositeId)).limit(1)
    : [];
  const finished = plate.bracketSetId
    ? (
        await db
          .select({ id: reductions.id, pipelineVersion: reductions.pipelineVersion, finishedAt: reductions.finishedAt, params: reductions.params })
          .from(reductions)
          .where(and(eq(reductions.bracketSetId, plate.bracketSetId), eq(reductions.state, "done")))
          .orderBy(desc(reductions.finishedAt))
      ).map((r) => ({ id: r.id, pipelineVersion: r.pipelineVersion, finishedAt: r.finishedAt?.toISOString() ?? null, filter: String(r.params.filter ?? ""), registration: String(r.params.registration ?? "") }))
    : (
        await db
          .select({ id: composites.id, title: composites.title, pipelineVersion: composites.pipelineVersion, finishedAt: composites.finishedAt, params: composites.params })
          .from(composites)
          .where(and(eq(composites.eclipseId, plate.eclipseId), eq(composites.state, "done")))
          .orderBy(desc(composites.finishedAt))
          .limit(100)
      ).map((c) => ({ id: c.id, title: c.title, pipelineVersion: c.pipelineVersion, finishedAt: c.finishedAt?.toISOString() ?? null, filter: c.params.filter, registration: "composite" }));
  const history = await db
    .select({ action: auditLog.action, at: auditLog.createdAt, actorName: users.name, detail: auditLog.detail })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .where(and(eq(auditLog.subjectType, "plate"), eq(auditLog.subjectId, plateId)))
    .orderBy(desc(auditLog.id))
    .limit(100);
  const currentSource = current ? finished.find((r) => r.id === (current.reductionId ?? current.compositeId)) : undefined;
  const settings = await findSocietySettings(db);
  const waiting = sets.find((x) => x.state !== "approved");
  const set = plate.bracketSetId && sets[0]
    ? { id: sets[0].id, name: sets[0].name, state: sets[0].state, photographer: sets[0].photographer }
    : { id: comp?.id ?? "", name: comp?.title ?? "", state: waiting?.state ?? ("approved" as BracketSetState), photographer: joinNames(sets.map((x) => x.photographer)) };
  const base = current ? plateFilesBase(sourceOfVersion(current)) : "";
  return {
    id: plate.id,
    slug: plate.slug,
    state: plate.state,
    title: plate.title,
    caption: plate.caption,
    description: plate.description,
    altText: plate.altText,
    acquiredBy: plate.acquiredBy,
    processedBy: plate.processedBy,
    licence: plate.licence,
    currentVersion: plate.currentVersion,
    publishedAt: plate.publishedAt?.toISOString() ?? null,
    withdrawn: plate.state === "withdrawn" ? { at: plate.withdrawnAt?.toISOString() ?? "", reason: plate.withdrawnReason ?? "", kind: plate.withdrawnKind ?? "temporary" } : null,
    set,
    composite: comp ? { id: comp.id, title: comp.title, sets: sets.map(({ siteId: _siteId, ...x }) => x) } : null,
    suggestions: {
      acquiredBy: set.photographer,
      // A composite's processing credit names whoever composed it first, as its draft did (desk.ts).
      processedBy: comp?.composer ? `${comp.composer} (composite), ${pipelineCredit(currentSource?.pipelineVersion ?? null)}` : pipelineCredit(currentSource?.pipelineVersion ?? null),
      licence: toPlateLicence(settings.defaultLicence),
    },
    versions: versions.map((v) => ({ version: v.version, renditions: v.renditions, changeNote: v.changeNote, createdAt: v.createdAt.toISOString(), url: `/plates/${plate.slug}/v/${v.version}` })),
    sourceKind: plate.bracketSetId ? "reduction" : "composite",
    finishedReductions: finished,
    locations: siteRows.filter((x) => x !== undefined).map(checkLocation),
    reports: await listPlateReports(db, actor, plateId),
    image: {
      renditions: (current?.renditions ?? []).flatMap((key) => {
        const size = current?.imageSizes[key];
        return size ? [{ key, width: size.width, height: size.height, tileSource: `${base}/${key}-iiif/info.json` }] : [];
      }),
      geometry: current?.geometry ?? {},
      mapLayer: comp ? describeMapLayer(base, comp.measurements, sets) : null,
    },
    history: history.map((h) => ({ action: h.action, at: h.at.toISOString(), actorName: h.actorName, detail: h.detail })),
  };
}
