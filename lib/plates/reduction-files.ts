// Serving a reduction's files by URL: tiles (Deep Zoom and IIIF level 0), the
// preview and the downloads. Public when a published plate shows the reduction
// (downloads only when its licence allows them); otherwise only the people who
// may see the bracket set, and "not found" for everyone else.
import { GetObjectCommand } from "@aws-sdk/client-s3";
import { and, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { plates, plateVersions, reductions } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { notFound } from "@/lib/errors";
import { findReduction } from "@/lib/reductions/reductions";
import { bucketName, getS3, isMissingObject } from "@/lib/storage";
import { LICENCE_INFO } from "./licences";

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
 * same query. Withdrawing a plate takes effect within this time.
 */
const PUBLIC_ACCESS_TTL_MS = 5_000;
const publicAccess = new Map<string, { isPublic: boolean; until: number; prefix: string | null }>();

async function findPublicAccess(db: DbOrTx, reductionId: string, kind: ReductionFileKind): Promise<{ isPublic: boolean; prefix: string | null }> {
  const key = `${reductionId}:${kind === "download" ? "download" : "view"}`;
  const hit = publicAccess.get(key);
  if (hit && hit.until > Date.now()) return hit;
  const published = await db
    .select({ licence: plates.licence })
    .from(plateVersions)
    .innerJoin(plates, and(eq(plates.id, plateVersions.plateId), eq(plates.currentVersion, plateVersions.version)))
    .where(and(eq(plateVersions.reductionId, reductionId), eq(plates.state, "published")));
  const isPublic = published.length > 0 && (kind !== "download" || published.some((p) => LICENCE_INFO[p.licence].allowsDownload));
  const [red] = isPublic ? await db.select({ outputs: reductions.outputs }).from(reductions).where(eq(reductions.id, reductionId)).limit(1) : [];
  const entry = { isPublic, prefix: red?.outputs?.prefix ?? null, until: Date.now() + PUBLIC_ACCESS_TTL_MS };
  if (publicAccess.size > 1000) publicAccess.clear();
  publicAccess.set(key, entry);
  return entry;
}

/**
 * Drops what this process remembers of a reduction's public access. Called
 * after a plate is published, withdrawn, restored or given a new version, so
 * the change shows on the very next request instead of after the cache time.
 * (Other web processes still wait out PUBLIC_ACCESS_TTL_MS.)
 */
export function forgetPublicAccess(reductionId: string): void {
  publicAccess.delete(`${reductionId}:view`);
  publicAccess.delete(`${reductionId}:download`);
}

/** How the caller may receive it, and where its files live: public (cacheable by anyone) or private to them. */
async function decideAccess(db: DbOrTx, actor: Actor | null, reductionId: string, kind: ReductionFileKind): Promise<{ access: "public" | "private"; prefix: string | null }> {
  const pub = await findPublicAccess(db, reductionId, kind);
  if (pub.isPublic) return { access: "public", prefix: pub.prefix };
  // Not public: only for those who may see the set (findReduction says "not found" otherwise).
  await findReduction(db, actor, reductionId);
  const [red] = await db.select({ outputs: reductions.outputs }).from(reductions).where(eq(reductions.id, reductionId)).limit(1);
  return { access: "private", prefix: red?.outputs?.prefix ?? null };
}

export async function serveReductionFile(db: DbOrTx, actor: Actor | null, reductionId: string, path: string, asDownload: boolean): Promise<Response> {
  const kind = classifyReductionPath(path);
  if (!kind || !/^[0-9a-f-]{36}$/i.test(reductionId)) throw notFound("That file");
  const { access, prefix } = await decideAccess(db, actor, reductionId, kind).catch(() => {
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
  const headers = new Headers({
    "content-type": TYPES.find(([re]) => re.test(path))?.[1] ?? "application/octet-stream",
    // A reduction's files never change: its outputs live under its own id.
    "cache-control": access === "public" ? "public, max-age=31536000, immutable" : "private, max-age=31536000, immutable",
    "access-control-allow-origin": "*",
    "x-content-type-options": "nosniff",
  });
  if (out.ContentLength !== undefined) headers.set("content-length", String(out.ContentLength));
  if (asDownload || kind === "download") {
    headers.set("content-disposition", `attachment; filename="crownlight-${reductionId.slice(0, 8)}-${path.replace(/[^a-z0-9.]/gi, "-")}"`);
  }
  const body = out.Body?.transformToWebStream();
  return new Response(body ?? null, { status: 200, headers });
}
