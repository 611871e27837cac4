// Serving the files of what a plate shows, by URL: a reduction's under
// /iiif/reductions/{id}, a composite's under /iiif/composites/{id}, both in one
// layout: tiles (Deep Zoom and IIIF level 0), the preview and the downloads, and
// for a composite its contribution map. Public when a published plate shows it
// in its current version (downloads only when its licence allows them);
// otherwise only the people who may see it, and "not found" for everyone else.
import { and, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, compositeInputs, composites, plates, plateVersions, reductions, sites, type LocationPrecision } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { findComposite } from "@/lib/composites/composites";
import { AppError, notFound } from "@/lib/errors";
import { findReduction } from "@/lib/reductions/reductions";
import { bucketName, openObjectStream } from "@/lib/storage";
import { PRIVATE_NO_STORE, PUBLIC_REVALIDATE } from "@/lib/http/cache";
import { isPlateDownloadName } from "./download-names";
import { LICENCE_INFO } from "./licences";
import { streamPublicMaster } from "./public-master";
import type { PlateSource } from "./source";

const TILE = /^(natural|structure)(\.dzi|_files\/\d{1,2}\/\d{1,4}_\d{1,4}\.jpg|-iiif\/info\.json|-iiif\/(full|\d{1,6},\d{1,6},\d{1,6},\d{1,6})\/(max|\d{1,6},\d{0,6})\/0\/default\.jpg)$/;
const PREVIEW = "preview.jpg";
/** A composite's map of which input gives the light where: the public viewer's layer. */
const CONTRIBUTION = "contribution.jpg";
const DOWNLOADS = new Set(["natural.png", "structure.png", "master.fits"]);

const TYPES: [RegExp, string][] = [
  [/\.dzi$/, "application/xml"],
  [/\.json$/, "application/json"],
  [/\.jpg$/, "image/jpeg"],
  [/\.png$/, "image/png"],
  [/\.fits$/, "application/fits"],
];

export type ReductionFileKind = "tile" | "preview" | "download";

/** The kind of a requested path, or null when it names nothing we serve (the contribution map only for a composite). */
export function classifyReductionPath(path: string, source: PlateSource["kind"] = "reduction"): ReductionFileKind | null {
  if (path.includes("..") || path.includes("//")) return null;
  if (TILE.test(path)) return "tile";
  if (path === PREVIEW || (source === "composite" && path === CONTRIBUTION)) return "preview";
  if (DOWNLOADS.has(path)) return "download";
  return null;
}

/**
 * Public access, remembered for a few seconds per reduction and kind: a plate
 * page asks for dozens of tiles at once, and each would otherwise repeat the
 * same query. Withdrawing, restoring or republishing a plate in this process
 * forgets it at once (forgetPublicAccess); other processes follow within this time.
 */
const PUBLIC_ACCESS_TTL_MS = 5_000;
interface PublicAccess {
  isPublic: boolean;
  prefix: string | null;
  /** The site's precision now: the public master carries the observer at this precision. */
  precision: LocationPrecision;
}
const publicAccess = new Map<string, PublicAccess & { until: number }>();

/**
 * Drops what this process remembers of one reduction's public access, or of all
 * (after a plate is published, withdrawn, restored or given a new version, or a
 * site's precision changes), so the change shows on the very next request.
 * (Other web processes still wait out PUBLIC_ACCESS_TTL_MS.)
 */
export function forgetPublicAccess(reductionId?: string): void {
  if (!reductionId) return publicAccess.clear();
  publicAccess.delete(`${reductionId}:download`);
  publicAccess.delete(`${reductionId}:view`);
}

const STRICTNESS: Record<LocationPrecision, number> = { exact: 0, rounded: 1, hidden: 2 };

/** Where a source's files live, and the site precision its public master follows: a composite's strictest input's. */
async function findFilesPlace(db: DbOrTx, source: PlateSource): Promise<{ prefix: string | null; precision: LocationPrecision }> {
  if (source.kind === "reduction") {
    const [red] = await db
      .select({ outputs: reductions.outputs, precision: sites.precision })
      .from(reductions)
      .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
      .innerJoin(sites, eq(sites.id, bracketSets.siteId))
      .where(eq(reductions.id, source.id))
      .limit(1);
    // Unknown precision counts as hidden: never more than the photographer chose.
    return { prefix: red?.outputs?.prefix ?? null, precision: red?.precision ?? "hidden" };
  }
  const [row] = await db.select({ outputs: composites.outputs }).from(composites).where(eq(composites.id, source.id)).limit(1);
  const inputs = await db
    .select({ precision: sites.precision })
    .from(compositeInputs)
    .innerJoin(reductions, eq(reductions.id, compositeInputs.reductionId))
    .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
    .innerJoin(sites, eq(sites.id, bracketSets.siteId))
    .where(eq(compositeInputs.compositeId, source.id));
  const precision = inputs.length ? inputs.map((i) => i.precision).reduce((a, b) => (STRICTNESS[b] > STRICTNESS[a] ? b : a)) : "hidden";
  return { prefix: typeof row?.outputs?.prefix === "string" ? row.outputs.prefix : null, precision };
}

async function findPublicAccess(db: DbOrTx, source: PlateSource, kind: ReductionFileKind): Promise<PublicAccess> {
  const key = `${source.id}:${kind === "download" ? "download" : "view"}`;
  const hit = publicAccess.get(key);
  if (hit && hit.until > Date.now()) return hit;
  const shows = source.kind === "composite" ? eq(plateVersions.compositeId, source.id) : eq(plateVersions.reductionId, source.id);
  const published = await db
    .select({ licence: plates.licence })
    .from(plateVersions)
    .innerJoin(plates, and(eq(plates.id, plateVersions.plateId), eq(plates.currentVersion, plateVersions.version)))
    .where(and(shows, eq(plates.state, "published")));
  const isPublic = published.length > 0 && (kind !== "download" || published.some((p) => LICENCE_INFO[p.licence].allowsDownload));
  const place = isPublic ? await findFilesPlace(db, source) : { prefix: null, precision: "hidden" as const };
  const entry = { isPublic, ...place, until: Date.now() + PUBLIC_ACCESS_TTL_MS };
  if (publicAccess.size > 1000) publicAccess.clear();
  publicAccess.set(key, entry);
  return entry;
}

/** How the caller may receive it, and where its files live: public (cacheable by anyone) or private to them. */
async function decideAccess(db: DbOrTx, actor: Actor | null, source: PlateSource, kind: ReductionFileKind): Promise<{ access: "public" | "private"; prefix: string | null; precision: LocationPrecision }> {
  const pub = await findPublicAccess(db, source, kind);
  // A public URL always answers with the public copy, whoever asks: a cache may
  // hand it to anyone. The owner and curators get the exact master from the
  // reduction's or composite's own page and files route.
  if (pub.isPublic) return { access: "public", prefix: pub.prefix, precision: pub.precision };
  // Not public: only for those who may see it (findReduction and findComposite say "not found" otherwise).
  if (source.kind === "composite") await findComposite(db, actor, source.id);
  else await findReduction(db, actor, source.id);
  const { prefix } = await findFilesPlace(db, source);
  return { access: "private", prefix, precision: "exact" };
}

/** True when an If-None-Match header names this entity tag (or "*"). */
function matchesEtag(ifNoneMatch: string | null, etag: string): boolean {
  if (!ifNoneMatch) return false;
  const bare = (t: string) => t.trim().replace(/^W\//, "");
  return ifNoneMatch.split(",").some((t) => t.trim() === "*" || bare(t) === bare(etag));
}

/**
 * Serves one file of a reduction or a composite. `downloadName`, when it follows the plate download pattern for this very
 * file (download-names.ts), becomes the saved file's name; any other value is ignored.
 * Public files are cached for 5 minutes and then revalidated (an unchanged file
 * answers 304 by its entity tag), so a withdrawn plate's files leave shared
 * caches within minutes instead of a year; private files are never stored.
 * Not found (no such file, or not for this caller) is 404; any other fault, a
 * database outage included, stays a fault (500, logged by the route).
 */
export async function servePlateSourceFile(
  db: DbOrTx,
  actor: Actor | null,
  source: PlateSource,
  path: string,
  asDownload: boolean,
  downloadName?: string | null,
  ifNoneMatch: string | null = null,
): Promise<Response> {
  const kind = classifyReductionPath(path, source.kind);
  if (!kind || !/^[0-9a-f-]{36}$/i.test(source.id)) throw notFound("That file");
  const { access, prefix, precision } = await decideAccess(db, actor, source, kind).catch((err: unknown) => {
    // Signed out, or not theirs: the same answer as a file that does not exist.
    if (err instanceof AppError && ["not_found", "forbidden", "unauthenticated"].includes(err.code)) throw notFound("That file");
    throw err;
  });
  if (!prefix) throw notFound("That file");
  const key = kind === "tile" ? `${prefix}tiles/${path}` : `${prefix}${path}`;
  const out = await openObjectStream({ bucket: bucketName("derived"), key });
  if (!out) throw notFound("That file");
  const isPublicMaster = access === "public" && path === "master.fits" && precision !== "exact";
  const headers = new Headers({
    "content-type": TYPES.find(([re]) => re.test(path))?.[1] ?? "application/octet-stream",
    "cache-control": access === "public" ? PUBLIC_REVALIDATE : PRIVATE_NO_STORE,
    "access-control-allow-origin": "*",
    "x-content-type-options": "nosniff",
  });
  if (out.etag) {
    // The public master differs from the stored one by its header, which follows the precision.
    const etag = isPublicMaster ? `"${out.etag.replace(/"/g, "")}-${precision}"` : out.etag;
    headers.set("etag", etag);
    if (matchesEtag(ifNoneMatch, etag)) {
      await out.body.cancel();
      return new Response(null, { status: 304, headers });
    }
  }
  if (asDownload || kind === "download") {
    const name = downloadName && isPlateDownloadName(downloadName, path) ? downloadName : `crownlight-${source.id.slice(0, 8)}-${path.replace(/[^a-z0-9.]/gi, "-")}`;
    headers.set("content-disposition", `attachment; filename="${name}"`);
  }
  let body: ReadableStream<Uint8Array> = out.body;
  let length = out.contentLength;
  if (isPublicMaster) {
    const edited = await streamPublicMaster(body, precision);
    body = edited.stream;
    if (length !== undefined) length += edited.lengthDelta;
  }
  if (length !== undefined) headers.set("content-length", String(length));
  return new Response(body, { status: 200, headers });
}
