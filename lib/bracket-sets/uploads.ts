// Frame uploads: the browser sends parts straight to S3 on presigned URLs; these
// services start an upload (checking limits from the declared size), sign part
// URLs, list what S3 holds (to resume after a reload), abort, and complete. On
// completion the server checks what arrived (size, type by content), records the
// frame and queues its ingest. An original, once stored, is never deleted here.
import { randomUUID } from "node:crypto";
import { and, count, eq, ne, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { frames, uploads, type Upload } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { AppError, notFound } from "@/lib/errors";
import { isMediaError } from "@/lib/media/errors";
import { formatBytes } from "@/lib/format/bytes";
import { enqueue } from "@/lib/queue/enqueue";
import {
  abortMultipartUpload,
  bucketName,
  buildOriginalKey,
  completeMultipartUpload,
  countParts,
  createMultipartUpload,
  findObjectSize,
  isNoSuchUpload,
  listUploadedParts,
  MAX_FILE_SIZE_BYTES,
  MAX_FILES_PER_SET,
  PART_SIZE_BYTES,
  PART_URL_TTL_S,
  signPartUrls,
  type MultipartRef,
  type UploadedPart,
} from "@/lib/storage";
import { findOwnOpenSet } from "./access";
import { toFrameDto, toUploadDto } from "./bracket-sets";
import type { FrameDto, SignedPartsDto, UploadDto, UploadPartsDto } from "./dto";
import type { StartUploadInput } from "./schemas";
import { sniffObject } from "./sniff-object";

const UPLOAD_NOT_FOUND = "That upload";


function refOf(u: Upload): MultipartRef {
  return { bucket: bucketName("originals"), key: u.key, uploadId: u.s3UploadId };
}

async function findUpload(db: DbOrTx, setId: string, uploadId: string): Promise<Upload> {
  if (!/^[0-9a-f-]{36}$/i.test(uploadId)) throw notFound(UPLOAD_NOT_FOUND);
  const [u] = await db.select().from(uploads).where(and(eq(uploads.id, uploadId), eq(uploads.bracketSetId, setId))).limit(1);
  if (!u) throw notFound(UPLOAD_NOT_FOUND);
  return u;
}

function requireOpen(u: Upload): void {
  if (u.state !== "open") throw new AppError("conflict", `${u.fileName}: this upload is ${u.state}; start it again to send the file.`);
}

export async function startFrameUpload(db: DbOrTx, actor: Actor | null, setId: string, input: StartUploadInput): Promise<UploadDto> {
  const { set } = await findOwnOpenSet(db, actor, setId);
  const name = input.fileName;
  if (input.sizeBytes === 0) throw new AppError("invalid_input", `${name}: the file is empty (0 bytes).`, [{ field: "sizeBytes", message: "the file is empty" }]);
  if (input.sizeBytes > MAX_FILE_SIZE_BYTES) {
    throw new AppError("too_large", `${name}: ${formatBytes(input.sizeBytes, MAX_FILE_SIZE_BYTES)} is more than the ${formatBytes(MAX_FILE_SIZE_BYTES, input.sizeBytes)} a frame may have.`, [
      { field: "sizeBytes", message: `at most ${MAX_FILE_SIZE_BYTES} bytes` },
    ]);
  }
  const [{ n: frameCount }] = await db.select({ n: count() }).from(frames).where(and(eq(frames.bracketSetId, set.id), ne(frames.ingestState, "refused")));
  const [{ n: openCount }] = await db.select({ n: count() }).from(uploads).where(and(eq(uploads.bracketSetId, set.id), eq(uploads.state, "open")));
  if (frameCount + openCount >= MAX_FILES_PER_SET) {
    throw new AppError("conflict", `${name}: the bracket set "${set.name}" already holds ${MAX_FILES_PER_SET} frames and uploads, the most a set takes.`);
  }
  const frameId = randomUUID();
  const key = buildOriginalKey(set.id, frameId, name);
  const bucket = bucketName("originals");
  const s3UploadId = await createMultipartUpload({ bucket, key }, input.contentType || "application/octet-stream");
  try {
    const [row] = await db
      .insert(uploads)
      .values({ bracketSetId: set.id, frameId, s3UploadId, key, fileName: name, sizeBytes: input.sizeBytes, partSizeBytes: PART_SIZE_BYTES })
      .returning();
    return toUploadDto(row);
  } catch (err) {
    // No row, no way to find the upload again: free its place in S3 now.
    await abortMultipartUpload({ bucket, key, uploadId: s3UploadId }).catch(() => undefined);
    throw err;
  }
}

export async function signParts(db: DbOrTx, actor: Actor | null, setId: string, uploadId: string, partNumbers: number[]): Promise<SignedPartsDto> {
  const { set } = await findOwnOpenSet(db, actor, setId);
  const u = await findUpload(db, set.id, uploadId);
  requireOpen(u);
  const partCount = countParts(u.sizeBytes, u.partSizeBytes);
  const beyond = partNumbers.filter((p) => p > partCount);
  if (beyond.length) {
    throw new AppError("invalid_input", `${u.fileName}: the file has ${partCount} part(s); part ${beyond.join(", ")} does not exist.`, [{ field: "partNumbers", message: `expected 1 to ${partCount}` }]);
  }
  const unique = [...new Set(partNumbers)].sort((a, b) => a - b);
  const urls = await signPartUrls(refOf(u), unique, PART_URL_TTL_S);
  return { uploadId: u.id, expiresAt: new Date(Date.now() + PART_URL_TTL_S * 1000).toISOString(), urls };
}

function describeParts(u: Upload, parts: UploadedPart[]): UploadPartsDto {
  const partCount = countParts(u.sizeBytes, u.partSizeBytes);
  const have = new Set(parts.map((p) => p.partNumber));
  const missing: number[] = [];
  for (let p = 1; p <= partCount; p++) if (!have.has(p)) missing.push(p);
  return { uploadId: u.id, partCount, parts: parts.map((p) => ({ partNumber: p.partNumber, sizeBytes: p.sizeBytes, etag: p.etag })), missingPartNumbers: missing };
}

export async function listParts(db: DbOrTx, actor: Actor | null, setId: string, uploadId: string): Promise<UploadPartsDto> {
  const { set } = await findOwnOpenSet(db, actor, setId);
  const u = await findUpload(db, set.id, uploadId);
  requireOpen(u);
  return describeParts(u, await listUploadedParts(refOf(u)));
}

export async function abortFrameUpload(db: DbOrTx, actor: Actor | null, setId: string, uploadId: string): Promise<UploadDto> {
  const { set } = await findOwnOpenSet(db, actor, setId);
  const u = await findUpload(db, set.id, uploadId);
  // Cancelling an upload that has already completed (or was cancelled) changes nothing and is no fault:
  // the uploader's list may cancel a file whose last part just arrived. The frame, if any, is removed on its own.
  if (u.state !== "open") return toUploadDto(u);
  await abortMultipartUpload(refOf(u));
  const [row] = await db
    .update(uploads)
    .set({ state: "aborted", updatedAt: sql`now()` })
    .where(and(eq(uploads.id, u.id), eq(uploads.bracketSetId, set.id)))
    .returning();
  return toUploadDto(row);
}

/** Parts 1..N all present, each full but the last, adding up to the declared size. */
function checkParts(u: Upload, parts: UploadedPart[]): void {
  const described = describeParts(u, parts);
  if (described.missingPartNumbers.length) {
    const list = described.missingPartNumbers.slice(0, 10).join(", ") + (described.missingPartNumbers.length > 10 ? ", ..." : "");
    throw new AppError("conflict", `${u.fileName}: part(s) ${list} of ${described.partCount} have not arrived; send them, then complete again.`);
  }
  const extra = parts.filter((p) => p.partNumber > described.partCount).map((p) => p.partNumber);
  const total = parts.filter((p) => p.partNumber <= described.partCount).reduce((s, p) => s + p.sizeBytes, 0);
  if (extra.length || total !== u.sizeBytes) {
    throw new AppError("invalid_input", `${u.fileName}: the parts hold ${total} bytes${extra.length ? ` plus part(s) ${extra.join(", ")} beyond the end` : ""}, but the file was declared as ${u.sizeBytes} bytes; send the parts again.`);
  }
}

export async function completeFrameUpload(db: DbOrTx, actor: Actor | null, setId: string, uploadId: string): Promise<FrameDto> {
  const { set } = await findOwnOpenSet(db, actor, setId);
  const u = await findUpload(db, set.id, uploadId);
  if (u.state === "completed") {
    const [f] = await db.select().from(frames).where(and(eq(frames.id, u.frameId), eq(frames.bracketSetId, set.id))).limit(1);
    if (f) return toFrameDto(f, set.clockOffsetS);
  } else requireOpen(u);

  const ref = refOf(u);
  const object = { bucket: ref.bucket, key: ref.key };
  try {
    const parts = await listUploadedParts(ref);
    checkParts(u, parts);
    await completeMultipartUpload(ref, parts.filter((p) => p.partNumber <= countParts(u.sizeBytes, u.partSizeBytes)));
  } catch (err) {
    // Completed by an earlier request whose answer was lost: the object is there.
    if (!isNoSuchUpload(err) || (await findObjectSize(object)) === null) {
      if (isNoSuchUpload(err)) throw new AppError("conflict", `${u.fileName}: the upload has expired or was cancelled; start it again.`);
      throw err;
    }
  }

  const sizeBytes = (await findObjectSize(object)) ?? 0;
  let refusal: string | null = null;
  let format: string | null = null;
  if (sizeBytes !== u.sizeBytes) {
    refusal = `${u.fileName}: ${sizeBytes} bytes arrived, but the file was declared as ${u.sizeBytes} bytes`;
  } else {
    try {
      format = await sniffObject(object, sizeBytes, u.fileName);
    } catch (err) {
      if (!isMediaError(err)) throw err;
      refusal = err.message;
    }
  }

  const frame = await db.transaction(async (tx) => {
    const claimed = await tx
      .update(uploads)
      .set({ state: "completed", updatedAt: sql`now()` })
      .where(and(eq(uploads.id, u.id), eq(uploads.bracketSetId, set.id), ne(uploads.state, "completed")))
      .returning({ id: uploads.id });
    const values = {
      id: u.frameId,
      bracketSetId: set.id,
      originalKey: u.key,
      originalFileName: u.fileName,
      sizeBytes,
      format,
      ingestState: refusal ? ("refused" as const) : ("received" as const),
      refusalReason: refusal,
    };
    if (claimed.length === 0) {
      const [existing] = await tx.select().from(frames).where(and(eq(frames.id, u.frameId), eq(frames.bracketSetId, set.id))).limit(1);
      if (existing) return existing;
    }
    const [row] = await tx.insert(frames).values(values).onConflictDoNothing({ target: frames.id }).returning();
    return row ?? (await tx.select().from(frames).where(and(eq(frames.id, u.frameId), eq(frames.bracketSetId, set.id))).limit(1))[0];
  });

  if (refusal) {
    // The original stays stored and the refused frame stays listed with its reason.
    throw new AppError(sizeBytes !== u.sizeBytes ? "invalid_input" : "unsupported_media", `${refusal}.`);
  }
  if (frame.ingestState === "received") await enqueue(db, "frame.ingest", { frameId: frame.id });
  return toFrameDto(frame, set.clockOffsetS);
}
