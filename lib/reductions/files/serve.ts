// Serving the stored outputs of a reduction or a composite, for all four file
// routes: the private ones (/api/reductions/{id}/files, /api/composites/{id}/files:
// the exact files, for those who may see the reduction or composite) and the
// public ones (/iiif/reductions/{id}, /iiif/composites/{id}: what a published
// plate shows, for anyone; downloads only when its licence allows them). Which
// paths exist and which the public may have is the manifest's (manifest.ts);
// who may have them is decided here, once. Not found (no such file, or not for
// this caller) is 404; any other fault, a database outage included, stays a
// fault (500, logged by the route).
import { and, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, compositeInputs, composites, plates, plateVersions, reductions, sites, type LocationPrecision } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { findVisibleSet } from "@/lib/bracket-sets/access";
import { findComposite } from "@/lib/composites/composites";
import { AppError, notFound } from "@/lib/errors";
import { PRIVATE_NO_STORE, PUBLIC_REVALIDATE } from "@/lib/http/cache";
import { isPlateDownloadName } from "@/lib/plates/download-names";
import { LICENCE_INFO } from "@/lib/plates/licences";
import { streamPublicMaster } from "@/lib/plates/public-master";
import { bucketName, openObjectStream } from "@/lib/storage";
import { buildCompositeDownloadName, buildOutputDownloadName, findOutputContentType, findOutputEntry, findPublicOutput, type OutputEntry, type OutputSource } from "./manifest";

const NOUN = { reduction: "reduction", composite: "composite" } as const;

export interface VisibleOutputs {
  /** Key prefix of the outputs; null until it is done. */
  prefix: string | null;
  state: string;
  /** The name a private download is saved under, for one path. */
  downloadName: (path: string) => string;
  /** The reduction's bracket set (null for a composite). */
  setId: string | null;
  setName: string | null;
}

/**
 * The outputs of a reduction or composite the actor may see: a reduction exactly
 * when its bracket set is (owner and curators), a composite when findComposite
 * says so (composer, curators, its inputs' photographers). Anyone else is told
 * it was not found, like one that does not exist.
 */
export async function findVisibleOutputs(db: DbOrTx, actor: Actor | null, source: OutputSource): Promise<VisibleOutputs> {
  const what = `That ${NOUN[source.kind]}`;
  if (!/^[0-9a-f-]{36}$/i.test(source.id)) throw notFound(what);
  if (source.kind === "composite") {
    const composite = await findComposite(db, actor, source.id);
    const [row] = await db.select({ outputs: composites.outputs }).from(composites).where(eq(composites.id, composite.id)).limit(1);
    const prefix = composite.state === "done" && typeof row?.outputs?.prefix === "string" ? row.outputs.prefix : null;
    return { prefix, state: composite.state, downloadName: (path) => buildCompositeDownloadName(composite.id, path), setId: null, setName: null };
  }
  const [row] = await db.select({ setId: reductions.bracketSetId, state: reductions.state, outputs: reductions.outputs }).from(reductions).where(eq(reductions.id, source.id)).limit(1);
  if (!row) throw notFound(what);
  const { set } = await findVisibleSet(db, actor, row.setId).catch((err: unknown) => {
    // Signed out stays 401; not theirs is "not found".
    if (err instanceof AppError && err.code !== "not_found") throw err;
    throw notFound(what);
  });
  const prefix = row.state === "done" && typeof row.outputs?.prefix === "string" ? row.outputs.prefix : null;
  return { prefix, state: row.state, downloadName: (path) => buildOutputDownloadName(set.name, source.id, path), setId: row.setId, setName: set.name };
}

/**
 * Public access, remembered for a few seconds per output and kind: a plate
 * page asks for dozens of tiles at once, and each would otherwise repeat the
 * same query. Withdrawing, restoring or republishing a plate in this process
 * forgets it at once (forgetPublicAccess); other processes follow within this time.
 */
const PUBLIC_ACCESS_TTL_MS = 5_000;
interface PublicAccess {
  isPublic: boolean;
  prefix: string | null;
  /** The site's precision now (a composite's strictest input's): the public master carries the observer at it. */
  precision: LocationPrecision;
}
const publicAccess = new Map<string, PublicAccess & { until: number }>();

/**
 * Drops what this process remembers of one reduction's or composite's public
 * access, or of all (after a plate is published, withdrawn, restored or given a
 * new version, or a site's precision changes), so the change shows on the very
 * next request. (Other web processes still wait out PUBLIC_ACCESS_TTL_MS.)
 */
export function forgetPublicAccess(sourceId?: string): void {
  if (!sourceId) return publicAccess.clear();
  publicAccess.delete(`${sourceId}:download`);
  publicAccess.delete(`${sourceId}:view`);
}

const STRICTNESS: Record<LocationPrecision, number> = { exact: 0, rounded: 1, hidden: 2 };

/** Where the outputs live, and the site precision a public master follows. */
async function findPublicPlace(db: DbOrTx, source: OutputSource): Promise<{ prefix: string | null; precision: LocationPrecision }> {
  const siteColumns = { precision: sites.precision };
  if (source.kind === "reduction") {
    const [red] = await db
      .select({ outputs: reductions.outputs, ...siteColumns })
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
    .select(siteColumns)
    .from(compositeInputs)
    .innerJoin(reductions, eq(reductions.id, compositeInputs.reductionId))
    .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
    .innerJoin(sites, eq(sites.id, bracketSets.siteId))
    .where(eq(compositeInputs.compositeId, source.id));
  const precision = inputs.map((i) => i.precision).reduce<LocationPrecision>((a, b) => (STRICTNESS[b] > STRICTNESS[a] ? b : a), inputs.length ? "exact" : "hidden");
  return { prefix: typeof row?.outputs?.prefix === "string" ? row.outputs.prefix : null, precision };
}

async function findPublicAccess(db: DbOrTx, source: OutputSource, entry: OutputEntry): Promise<PublicAccess> {
  const key = `${source.id}:${entry.kind === "download" ? "download" : "view"}`;
  const hit = publicAccess.get(key);
  if (hit && hit.until > Date.now()) return hit;
  const shows = source.kind === "composite" ? eq(plateVersions.compositeId, source.id) : eq(plateVersions.reductionId, source.id);
  const published = await db
    .select({ licence: plates.licence })
    .from(plateVersions)
    .innerJoin(plates, and(eq(plates.id, plateVersions.plateId), eq(plates.currentVersion, plateVersions.version)))
    .where(and(shows, eq(plates.state, "published")));
  const isPublic = published.length > 0 && (entry.kind !== "download" || published.some((p) => LICENCE_INFO[p.licence].allowsDownload));
  const place = isPublic ? await findPublicPlace(db, source) : { prefix: null, precision: "hidden" as const };
  const found = { isPublic, ...place, until: Date.now() + PUBLIC_ACCESS_TTL_MS };
  if (publicAccess.size > 1000) publicAccess.clear();
  publicAccess.set(key, found);
  return found;
}

type Access = { access: "public"; prefix: string | null; precision: LocationPrecision } | { access: "private"; prefix: string | null; visible: VisibleOutputs };

/**
 * The one access decision. On a public route, a file a published plate shows
 * goes to anyone as the public copy (a shared cache may hand it to anyone, so
 * the owner gets it too; they have the exact master on the private route).
 * Otherwise, on either route, only those who may see the reduction or composite.
 */
async function decideAccess(db: DbOrTx, actor: Actor | null, source: OutputSource, entry: OutputEntry, route: "public" | "private"): Promise<Access> {
  if (route === "public") {
    const pub = await findPublicAccess(db, source, entry);
    if (pub.isPublic) return { access: "public", prefix: pub.prefix, precision: pub.precision };
  }
  const visible = await findVisibleOutputs(db, actor, source);
  return { access: "private", prefix: visible.prefix, visible };
}

/** True when an If-None-Match header names this entity tag (or "*"). */
function matchesEtag(ifNoneMatch: string | null, etag: string): boolean {
  if (!ifNoneMatch) return false;
  const bare = (t: string) => t.trim().replace(/^W\//, "");
  return ifNoneMatch.split(",").some((t) => t.trim() === "*" || bare(t) === bare(etag));
}

export interface ServeOutputOptions {
  /** Which files route asks: the public tile route or the private files route. */
  route: "public" | "private";
  /** Answer as an attachment (downloads always are). */
  download: boolean;
  /** On the public route: the plate download name (download-names.ts) to save the file under; any other value is ignored. */
  downloadName?: string | null;
  ifNoneMatch?: string | null;
}

/**
 * One stored output as a response. Public files are cached for 5 minutes and
 * then revalidated (an unchanged file answers 304 by its entity tag), so a
 * withdrawn plate's files leave shared caches within minutes; private files are
 * never stored ("private, no-store": they hold the exact site).
 */
export async function serveOutputFile(db: DbOrTx, actor: Actor | null, source: OutputSource, requestPath: string, options: ServeOutputOptions): Promise<Response> {
  const noun = NOUN[source.kind];
  let path: string;
  let entry: OutputEntry;
  if (options.route === "public") {
    const found = findPublicOutput(requestPath, source.kind);
    if (!found) throw notFound("That file");
    ({ path, entry } = found);
  } else {
    const found = findOutputEntry(requestPath, source.kind);
    if (!found) {
      throw new AppError(
        "invalid_input",
        `"${requestPath.slice(0, 80)}" is not one of a ${noun}'s files: expected master.fits, natural.png, structure.png, preview.jpg, preview-structure.jpg, ${source.kind === "composite" ? "contribution.jpg" : "coverage.png"}, report.json or a tile under tiles/.`,
      );
    }
    path = requestPath;
    entry = found;
  }
  const decided = await decideAccess(db, actor, source, entry, options.route).catch((err: unknown) => {
    // On the public route, signed out or not theirs answers as a file that does not exist.
    if (options.route === "public" && err instanceof AppError && ["not_found", "forbidden", "unauthenticated"].includes(err.code)) throw notFound("That file");
    throw err;
  });
  if (!decided.prefix) {
    throw options.route === "private" && decided.access === "private" ? notFound(`The files of this ${noun} (it is ${decided.visible.state})`) : notFound("That file");
  }
  const out = await openObjectStream({ bucket: bucketName("derived"), key: decided.prefix + path });
  if (!out) throw notFound(options.route === "private" ? `The file ${path} of this ${noun}` : "That file");
  const isPublic = decided.access === "public";
  const isPublicMaster = decided.access === "public" && path === "master.fits" && decided.precision !== "exact";
  const headers = new Headers({
    "content-type": findOutputContentType(path),
    "cache-control": isPublic ? PUBLIC_REVALIDATE : PRIVATE_NO_STORE,
    "x-content-type-options": "nosniff",
  });
  if (options.route === "public") headers.set("access-control-allow-origin", "*");
  if (out.etag) {
    // The public master differs from the stored one by its header, which follows the precision.
    const etag = isPublicMaster && decided.access === "public" ? `"${out.etag.replace(/"/g, "")}-${decided.precision}"` : out.etag;
    headers.set("etag", etag);
    if (matchesEtag(options.ifNoneMatch ?? null, etag)) {
      await out.body.cancel();
      return new Response(null, { status: 304, headers });
    }
  }
  if (options.download || (options.route === "public" && entry.kind === "download")) {
    const name =
      options.route === "private" && decided.access === "private"
        ? decided.visible.downloadName(path)
        : options.downloadName && isPlateDownloadName(options.downloadName, path)
          ? options.downloadName
          : `crownlight-${source.id.slice(0, 8)}-${path.replace(/^tiles\//, "").replace(/[^a-z0-9.]/gi, "-")}`;
    headers.set("content-disposition", `attachment; filename="${name}"`);
  }
  let body: ReadableStream<Uint8Array> = out.body;
  let length = out.contentLength;
  if (isPublicMaster && decided.access === "public") {
    const edited = await streamPublicMaster(body, decided.precision);
    body = edited.stream;
    if (length !== undefined) length += edited.lengthDelta;
  }
  if (length !== undefined) headers.set("content-length", String(length));
  return new Response(body, { status: 200, headers });
}
