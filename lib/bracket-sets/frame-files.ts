// A frame's stored files for the people who may see its set (the owner and
// curators): the ingest thumbnail, and the original as uploaded, streamed from
// S3 without passing whole through memory. A refused frame's original stays
// downloadable so that its owner can get it back.
import { and, eq } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { frames } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { notFound } from "@/lib/errors";
import { bucketName, openObjectStream, type ObjectRef } from "@/lib/storage";
import { findVisibleSet } from "./access";

export interface FrameFile {
  body: ReadableStream<Uint8Array>;
  contentType: string;
  contentLength: number | null;
  fileName: string;
}

const FRAME_NOT_FOUND = "That frame";

async function findVisibleFrame(db: DbOrTx, actor: Actor | null, setId: string, frameId: string) {
  const { set } = await findVisibleSet(db, actor, setId);
  if (!z.uuid().safeParse(frameId).success) throw notFound(FRAME_NOT_FOUND);
  const [frame] = await db
    .select({ originalKey: frames.originalKey, fileName: frames.originalFileName, thumbnailKey: frames.thumbnailKey })
    .from(frames)
    .where(and(eq(frames.id, frameId), eq(frames.bracketSetId, set.id)))
    .limit(1);
  if (!frame) throw notFound(FRAME_NOT_FOUND);
  return frame;
}

async function openObject(ref: ObjectRef, what: string, fallbackType: string): Promise<Omit<FrameFile, "fileName">> {
  const out = await openObjectStream(ref);
  if (!out) throw notFound(what);
  return { body: out.body, contentType: out.contentType || fallbackType, contentLength: out.contentLength ?? null };
}

export async function openFrameThumbnail(db: DbOrTx, actor: Actor | null, setId: string, frameId: string): Promise<FrameFile> {
  const frame = await findVisibleFrame(db, actor, setId, frameId);
  const what = `The thumbnail of ${frame.fileName}`;
  // Refused frames and frames still being ingested have none yet.
  if (!frame.thumbnailKey) throw notFound(what);
  const file = await openObject({ bucket: bucketName("derived"), key: frame.thumbnailKey }, what, "image/jpeg");
  return { ...file, fileName: frame.fileName };
}

export async function openFrameOriginal(db: DbOrTx, actor: Actor | null, setId: string, frameId: string): Promise<FrameFile> {
  const frame = await findVisibleFrame(db, actor, setId, frameId);
  // Served as bytes to save, never rendered: the content type is not taken from what was uploaded.
  const file = await openObject({ bucket: bucketName("originals"), key: frame.originalKey }, `The original of ${frame.fileName}`, "application/octet-stream");
  return { ...file, contentType: "application/octet-stream", fileName: frame.fileName };
}

/** Content-Disposition for a download: an ASCII fallback name and the exact name in RFC 5987 / RFC 6266 form. */
export function attachmentDisposition(fileName: string): string {
  const fallback = fileName.replace(/[^\x20-\x7e]|["\\]/g, "_") || "frame";
  const exact = encodeURIComponent(fileName).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
  return `attachment; filename="${fallback}"; filename*=UTF-8''${exact}`;
}
