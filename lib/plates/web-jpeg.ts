// The web-size JPEG of a plate version with its credits inside: XMP dc:creator,
// dc:rights, dc:description (the caption), photoshop:Credit, the licence URI as
// xmpRights:WebStatement and the alt text as Iptc4xmpCore:AltTextAccessibility
// (IPTC Photo Metadata 2021.1). Made from the natural rendition's preview, or
// from natural.png at 2048 px when no preview exists, and stored at
// plates/{plateId}/v{n}/web.jpg in the derived bucket. ExifTool writes the
// metadata because sharp's withMetadata cannot write arbitrary XMP fields.
import { plateCreditLine } from "./credit";
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { and, eq } from "drizzle-orm";
import { ExifTool, type WriteTags } from "exiftool-vendored";
import type { DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { composites, plates, plateVersions, reductions, type PlateLicence } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { createSharp } from "@/lib/media/sharp-setup";
import { bucketName, isMissingObject, putObjectBytes, readSmallObject } from "@/lib/storage";
import { plateDownloadName } from "./download-names";
import { LICENCE_INFO } from "./licences";
import { PUBLIC_REVALIDATE } from "@/lib/http/cache";

/** Long side of the JPEG made from natural.png when the reduction has no preview. */
export const WEB_JPEG_LONG_SIDE_PX = 2048;
const MAX_SOURCE_BYTES = 256 * 1024 ** 2;

export function webJpegKey(plateId: string, version: number): string {
  return `plates/${plateId}/v${version}/web.jpg`;
}

export interface WebJpegCredits {
  title: string;
  caption: string;
  altText: string;
  acquiredBy: string;
  processedBy: string;
  licence: PlateLicence;
  societyName: string;
  /** The society's credit line for this plate (lib/plates/credit.ts); without it, a plain one. */
  creditLine?: string;
}

/** The credit line written into the file: who acquired, who processed, for whom. */
export function webJpegCreditLine(c: Pick<WebJpegCredits, "acquiredBy" | "processedBy" | "societyName">): string {
  return `Data: ${c.acquiredBy}; processing: ${c.processedBy}; ${c.societyName}`;
}

/** The XMP tags, by ExifTool's group-qualified names. */
export function buildWebJpegTags(c: WebJpegCredits): Record<string, string | string[]> {
  const licence = LICENCE_INFO[c.licence];
  const rights =
    c.licence === "all-rights-reserved"
      ? `${c.acquiredBy}. All rights reserved.`
      : c.licence === "CC0-1.0"
        ? `Dedicated to the public domain by ${c.acquiredBy} (${licence.shortName}).`
        : `${c.acquiredBy}, licensed under ${licence.shortName}.`;
  return {
    "XMP-dc:Title": c.title,
    "XMP-dc:Creator": [...new Set([c.acquiredBy, c.processedBy])],
    "XMP-dc:Rights": rights,
    "XMP-dc:Description": c.caption || c.title,
    "XMP-photoshop:Credit": c.creditLine ?? webJpegCreditLine(c),
    "XMP-xmpRights:WebStatement": licence.rightsUri,
    "XMP-xmpRights:Marked": licence.id === "CC0-1.0" ? "False" : "True",
    "XMP-iptcCore:AltTextAccessibility": c.altText,
  };
}

let exiftool: ExifTool | undefined;

export async function closeWebJpegWriter(): Promise<void> {
  const running = exiftool;
  exiftool = undefined;
  await running?.end();
}

/** JPEG bytes with the credits written in, made from the given JPEG. */
export async function embedCredits(jpeg: Buffer, credits: WebJpegCredits): Promise<Buffer> {
  exiftool ??= new ExifTool({ maxProcs: 1 });
  const dir = await mkdtemp(join(tmpdir(), "crownlight-web-jpeg-"));
  const path = join(dir, "web.jpg");
  try {
    await writeFile(path, jpeg);
    // Everything else goes first (in its own call: ExifTool applies "-all=" after
    // the tag assignments of the same command), so the file carries only what we
    // state: no GPS, no stray tags.
    await exiftool.deleteAllTags(path);
    await exiftool.write(path, buildWebJpegTags(credits) as unknown as WriteTags, { writeArgs: ["-overwrite_original"] });
    return await readFile(path);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

async function sourceJpeg(prefix: string): Promise<Buffer> {
  const derived = bucketName("derived");
  try {
    return await readSmallObject({ bucket: derived, key: `${prefix}preview.jpg` }, MAX_SOURCE_BYTES);
  } catch (err) {
    if (!isMissingObject(err)) throw err;
  }
  let png: Buffer;
  try {
    png = await readSmallObject({ bucket: derived, key: `${prefix}natural.png` }, MAX_SOURCE_BYTES);
  } catch (err) {
    if (isMissingObject(err)) throw new AppError("conflict", "The reduction has neither a preview nor a natural rendition, so no web JPEG can be made.");
    throw err;
  }
  return createSharp(png)
    .resize({ width: WEB_JPEG_LONG_SIDE_PX, height: WEB_JPEG_LONG_SIDE_PX, fit: "inside", withoutEnlargement: true })
    .toColourspace("srgb")
    .jpeg({ quality: 88, mozjpeg: true })
    .toBuffer();
}

/**
 * Makes (or makes again, after an edit of the credits) the web JPEG of one
 * version of a plate. Called by the desk's publish, new version and edit
 * functions, which have checked the actor; and by the public download for a
 * published version whose file is missing.
 */
export async function makeWebJpeg(db: DbOrTx, plateId: string, version: number): Promise<string> {
  const [row] = await db
    .select({ plate: plates, reductionOutputs: reductions.outputs, compositeOutputs: composites.outputs })
    .from(plates)
    .innerJoin(plateVersions, and(eq(plateVersions.plateId, plates.id), eq(plateVersions.version, version)))
    .leftJoin(reductions, eq(reductions.id, plateVersions.reductionId))
    .leftJoin(composites, eq(composites.id, plateVersions.compositeId))
    .where(eq(plates.id, plateId))
    .limit(1);
  const prefix = row?.reductionOutputs?.prefix ?? row?.compositeOutputs?.prefix;
  if (!row || !prefix) throw new AppError("not_found", `Version ${version} of that plate was not found.`);
  const society = await findSocietySettings(db);
  const { plate } = row;
  const bytes = await embedCredits(await sourceJpeg(prefix), {
    title: plate.title,
    caption: plate.caption,
    altText: plate.altText,
    acquiredBy: plate.acquiredBy,
    processedBy: plate.processedBy,
    licence: plate.licence,
    societyName: society.name,
    creditLine: plateCreditLine(society.creditLineTemplate, society.name, { ...plate, publishedAt: plate.publishedAt?.toISOString() ?? null }),
  });
  const key = webJpegKey(plateId, version);
  await putObjectBytes({ bucket: bucketName("derived"), key }, bytes, "image/jpeg");
  return key;
}

/**
 * The web JPEG of a published plate's version (the current one by default), as
 * a download. Drafts and withdrawn plates are not found.
 */
export async function serveWebJpeg(db: DbOrTx, slug: string, version?: number): Promise<Response> {
  const [plate] = await db
    .select({ id: plates.id, slug: plates.slug, currentVersion: plates.currentVersion })
    .from(plates)
    .where(and(eq(plates.slug, slug), eq(plates.state, "published")))
    .limit(1);
  if (!plate) throw new AppError("not_found", "That plate was not found.");
  const n = version ?? plate.currentVersion;
  const [v] = await db
    .select({ version: plateVersions.version })
    .from(plateVersions)
    .where(and(eq(plateVersions.plateId, plate.id), eq(plateVersions.version, n)))
    .limit(1);
  if (!v) throw new AppError("not_found", `Version ${n} of that plate was not found.`);
  const ref = { bucket: bucketName("derived"), key: webJpegKey(plate.id, n) };
  let bytes: Buffer;
  try {
    bytes = await readSmallObject(ref, MAX_SOURCE_BYTES);
  } catch (err) {
    if (!isMissingObject(err)) throw err;
    // Plates published before web JPEGs existed get theirs on first request.
    await makeWebJpeg(db, plate.id, n);
    bytes = await readSmallObject(ref, MAX_SOURCE_BYTES);
  }
  return new Response(new Uint8Array(bytes), {
    status: 200,
    headers: {
      "content-type": "image/jpeg",
      "content-length": String(bytes.length),
      "content-disposition": `attachment; filename="${plateDownloadName(plate.slug, n, "web")}"`,
      // Credits can be corrected after publishing, which rewrites the file.
      "cache-control": PUBLIC_REVALIDATE,
      "x-content-type-options": "nosniff",
    },
  });
}
