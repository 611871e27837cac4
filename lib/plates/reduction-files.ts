// Serving a reduction's files by URL: tiles (Deep Zoom and IIIF level 0), the
// preview and the downloads. Public when a published plate shows the reduction
// (downloads only when its licence allows them); otherwise only the people who
// may see the bracket set, and "not found" for everyone else.
import { GetObjectCommand } from "@aws-sdk/client-s3";
import { and, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, plates, plateVersions, reductions, sites, type LocationPrecision } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { notFound } from "@/lib/errors";
import { findReduction } from "@/lib/reductions/reductions";
import { bucketName, getS3, isMissingObject } from "@/lib/storage";
import { PRIVATE_NO_STORE, PUBLIC_REVALIDATE } from "@/lib/http/cache";
import { isPlateDownloadName } from "./download-names";
import { LICENCE_INFO } from "./licences";
import { streamPublicMaster } from "./public-master";

const TILE = /^(natural|structure)(\.dzi|_files\/\d{1,2}\/\d{1,4}_\d{1,4}\.jpg|-iiif\/info\.json|-iiif\/(full|\d{1,6},\d{1,6},\d{1,6},\d{1,6})\/(max|\d{1,6},\d{0,6})\/0\/default\.jpg)$/;
const PREVIEW = "preview.jpg";
const DOWNLOADS = new Set(["natural.png", "structure.png", "master.fits"]);

const TYPES: [RegExp, string][] = [
  [/\.dzi$/, "application/xml"],
  [/\.json$/, "application/json"],
  [/\.jpg$/, "image/jpeg"],
  [/\.png$/, "image/png"],
  [/\.fits$/, "application/fits"],
];

export type ReductionFileKind = "tile" | "preview" | "download";

/** The kind of a requested path, or null when it names nothing we serve. */
export function classifyReductionPath(path: string): ReductionFileKind | null {
  if (path.includes("..") || path.includes("//")) return null;
  if (TILE.test(path)) return "tile";
  if (path === PREVIEW) return "preview";
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

async function findPublicAccess(db: DbOrTx, reductionId: string, kind: ReductionFileKind): Promise<PublicAccess> {
  const key = `${reductionId}:${kind === "download" ? "download" : "view"}`;
  const hit = publicAccess.get(key);
  if (hit && hit.until > Date.now()) return hit;
  const published = await db
    .select({ licence: plates.licence })
    .from(plateVersions)
    .innerJoin(plates, and(eq(plates.id, plateVersions.plateId), eq(plates.currentVersion, plateVersions.version)))
    .where(and(eq(plateVersions.reductionId, reductionId), eq(plates.state, "published")));
  const isPublic = published.length > 0 && (kind !== "download" || published.some((p) => LICENCE_INFO[p.licence].allowsDownload));
  const [red] = isPublic
    ? await db
        .select({ outputs: reductions.outputs, precision: sites.precision })
        .from(reductions)
        .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
        .innerJoin(sites, eq(sites.id, bracketSets.siteId))
        .where(eq(reductions.id, reductionId))
        .limit(1)
    : [];
  // Unknown precision counts as hidden: never more than the photographer chose.
  const entry = { isPublic, prefix: red?.outputs?.prefix ?? null, precision: red?.precision ?? ("hidden" as const), until: Date.now() + PUBLIC_ACCESS_TTL_MS };
  if (publicAccess.size > 1000) publicAccess.clear();
  publicAccess.set(key, entry);
  return entry;
}

/** How the caller may receive it, and where its files live: public (cacheable by anyone) or private to them. */
async function decideAccess(db: DbOrTx, actor: Actor | null, reductionId: string, kind: ReductionFileKind): Promise<{ access: "public" | "private"; prefix: string | null; precision: LocationPrecision }> {
  const pub = await findPublicAccess(db, reductionId, kind);
  // A public URL always answers with the public copy, whoever asks: a cache may
  // hand it to anyone. The owner and curators get the exact master from the
  // reduction page's files route.
  if (pub.isPublic) return { access: "public", prefix: pub.prefix, precision: pub.precision };
  // Not public: only for those who may see the set (findReduction says "not found" otherwise).
  await findReduction(db, actor, reductionId);
  const [red] = await db.select({ outputs: reductions.outputs }).from(reductions).where(eq(reductions.id, reductionId)).limit(1);
  return { access: "private", prefix: red?.outputs?.prefix ?? null, precision: "exact" };
}

/** True when an If-None-Match header names this entity tag (or "*"). */
function matchesEtag(ifNoneMatch: string | null, etag: string): boolean {
  if (!ifNoneMatch) return false;
  const bare = (t: string) => t.trim().replace(/^W\//, "");
  return ifNoneMatch.split(",").some((t) => t.trim() === "*" || bare(t) === bare(etag));
}

/**
 * Serves one file. `downloadName`, when it follows the plate download pattern for this very
 * file (download-names.ts), becomes the saved file's name; any other value is ignored.
 * Public files are cached for 5 minutes and then revalidated (an unchanged file
 * answers 304 by its entity tag), so a withdrawn plate's files leave shared
 * caches within minutes instead of a year; private files are never stored.
 */
export async function serveReductionFile(
  db: DbOrTx,
  actor: Actor | null,
  reductionId: string,
  path: string,
  asDownload: boolean,
  downloadName?: string | null,
  ifNoneMatch: string | null = null,
): Promise<Response> {
  const kind = classifyReductionPath(path);
  if (!kind || !/^[0-9a-f-]{36}$/i.test(reductionId)) throw notFound("That file");
  const { access, prefix, precision } = await decideAccess(db, actor, reductionId, kind).catch(() => {
    throw notFound("That file");
  });
  if (!prefix) throw notFound("That file");
  const key = kind === "tile" ? `${prefix}tiles/${path}` : `${prefix}${path}`;
  let out;
  try {
    out = await getS3().send(new GetObjectCommand({ Bucket: bucketName("derived"), Key: key }));
  } catch (err) {
    if (isMissingObject(err)) throw notFound("That file");
    throw err;
  }
  const isPublicMaster = access === "public" && path === "master.fits" && precision !== "exact";
  const headers = new Headers({
    "content-type": TYPES.find(([re]) => re.test(path))?.[1] ?? "application/octet-stream",
    "cache-control": access === "public" ? PUBLIC_REVALIDATE : PRIVATE_NO_STORE,
    "access-control-allow-origin": "*",
    "x-content-type-options": "nosniff",
  });
  if (out.ETag) {
    // The public master differs from the stored one by its header, which follows the precision.
    const etag = isPublicMaster ? `"${out.ETag.replace(/"/g, "")}-${precision}"` : out.ETag;
    headers.set("etag", etag);
    if (matchesEtag(ifNoneMatch, etag)) {
      await out.Body?.transformToWebStream().cancel();
      return new Response(null, { status: 304, headers });
    }
  }
  if (asDownload || kind === "download") {
    const name = downloadName && isPlateDownloadName(downloadName, path) ? downloadName : `crownlight-${reductionId.slice(0, 8)}-${path.replace(/[^a-z0-9.]/gi, "-")}`;
    headers.set("content-disposition", `attachment; filename="${name}"`);
  }
  let body = out.Body?.transformToWebStream() ?? null;
  let length = out.ContentLength;
  if (isPublicMaster && body) {
    const edited = await streamPublicMaster(body as ReadableStream<Uint8Array>, precision);
    body = edited.stream;
    if (length !== undefined) length += edited.lengthDelta;
  }
  if (length !== undefined) headers.set("content-length", String(length));
  return new Response(body, { status: 200, headers });
}
