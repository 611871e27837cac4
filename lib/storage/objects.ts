// Plain object reads and writes used after an upload: size, the first bytes for
// sniffing, a streamed download to a temporary file, and derived files.
import { createReadStream, createWriteStream } from "node:fs";
import { stat } from "node:fs/promises";
import { Readable, Transform } from "node:stream";
import { pipeline } from "node:stream/promises";
import { DeleteObjectCommand, GetObjectCommand, HeadBucketCommand, HeadObjectCommand, ListObjectsV2Command, PutObjectCommand, type S3Client } from "@aws-sdk/client-s3";
import { Upload } from "@aws-sdk/lib-storage";
import type { ObjectRef } from "./multipart";
import { getS3 } from "./s3";

export function isMissingObject(err: unknown): boolean {
  const name = (err as { name?: string })?.name;
  return name === "NoSuchKey" || name === "NotFound" || (err as { $metadata?: { httpStatusCode?: number } })?.$metadata?.httpStatusCode === 404;
}

/** Size in bytes, or null when there is no such object. */
/** An object streamed for a response: its body, length and ETag; null when it does not exist (any other fault throws). */
export async function openObjectStream(ref: ObjectRef, s3: S3Client = getS3()): Promise<{ body: ReadableStream<Uint8Array>; contentLength?: number; etag?: string; contentType?: string } | null> {
  try {
    const out = await s3.send(new GetObjectCommand({ Bucket: ref.bucket, Key: ref.key }));
    if (!out.Body) return null;
    return { body: out.Body.transformToWebStream() as ReadableStream<Uint8Array>, contentLength: out.ContentLength, etag: out.ETag, contentType: out.ContentType };
  } catch (err) {
    if (isMissingObject(err)) return null;
    throw err;
  }
}

/**
 * An object's bytes as they arrive (the response's own stream, read once; a
 * reader that stops early must end its iteration, which destroys the stream and
 * frees its connection) with its length, or null when there is no such object.
 */
export async function readObjectChunks(ref: ObjectRef, s3: S3Client = getS3()): Promise<{ chunks: AsyncIterable<Uint8Array>; length?: number } | null> {
  try {
    const out = await s3.send(new GetObjectCommand({ Bucket: ref.bucket, Key: ref.key }));
    return out.Body ? { chunks: out.Body as Readable, length: out.ContentLength } : null;
  } catch (err) {
    if (isMissingObject(err)) return null;
    throw err;
  }
}

/** Resolves when the bucket answers (the health check's probe of the store). */
export async function checkBucket(bucket: string, s3: S3Client = getS3()): Promise<void> {
  await s3.send(new HeadBucketCommand({ Bucket: bucket }));
}

export async function findObjectSize(ref: ObjectRef, s3: S3Client = getS3()): Promise<number | null> {
  try {
    const out = await s3.send(new HeadObjectCommand({ Bucket: ref.bucket, Key: ref.key }));
    return out.ContentLength ?? 0;
  } catch (err) {
    if (isMissingObject(err)) return null;
    throw err;
  }
}

/** Bytes [start, start + length) of an object (fewer at its end). */
export async function readObjectRange(ref: ObjectRef, start: number, length: number, s3: S3Client = getS3()): Promise<Buffer> {
  if (length <= 0) return Buffer.alloc(0);
  const out = await s3.send(new GetObjectCommand({ Bucket: ref.bucket, Key: ref.key, Range: `bytes=${start}-${start + length - 1}` }));
  if (!out.Body) return Buffer.alloc(0);
  return Buffer.from(await out.Body.transformToByteArray());
}

/**
 * Streams an object into `path` without holding it in memory; `onChunk` sees
 * every chunk on the way (to hash it). Returns the bytes written.
 */
export async function downloadObjectToFile(ref: ObjectRef, path: string, onChunk?: (chunk: Buffer) => void, s3: S3Client = getS3()): Promise<number> {
  const out = await s3.send(new GetObjectCommand({ Bucket: ref.bucket, Key: ref.key }));
  if (!out.Body) throw new Error(`S3 returned no body for ${ref.key}`);
  let bytes = 0;
  const tap = new Transform({
    transform(chunk: Buffer, _enc, done) {
      bytes += chunk.length;
      onChunk?.(chunk);
      done(null, chunk);
    },
  });
  await pipeline(out.Body as Readable, tap, createWriteStream(path));
  return bytes;
}

export async function putObjectBytes(ref: ObjectRef, body: Buffer, contentType: string, s3: S3Client = getS3()): Promise<void> {
  await s3.send(new PutObjectCommand({ Bucket: ref.bucket, Key: ref.key, Body: body, ContentType: contentType, ContentLength: body.length }));
}

/** A small object whole (a report, an info.json); refuses anything over `maxBytes`. */
export async function readSmallObject(ref: ObjectRef, maxBytes = 8 * 1024 ** 2, s3: S3Client = getS3()): Promise<Buffer> {
  const out = await s3.send(new GetObjectCommand({ Bucket: ref.bucket, Key: ref.key }));
  if ((out.ContentLength ?? 0) > maxBytes) throw new Error(`${ref.key} is ${out.ContentLength} bytes, more than the ${maxBytes} expected`);
  return out.Body ? Buffer.from(await out.Body.transformToByteArray()) : Buffer.alloc(0);
}

/** A file on disk streamed to S3 (in parts when large); returns its size. */
export async function putObjectFile(ref: ObjectRef, path: string, contentType: string, s3: S3Client = getS3()): Promise<number> {
  const { size } = await stat(path);
  await new Upload({ client: s3, params: { Bucket: ref.bucket, Key: ref.key, Body: createReadStream(path), ContentType: contentType, ContentLength: size }, queueSize: 2 }).done();
  return size;
}

/** S3's limit on one PUT; larger files go up in parts (putObjectFile). */
export const MAX_SINGLE_PUT_BYTES = 5 * 1024 ** 3;

/**
 * Bytes made as they are sent (a generator of chunks, `length` in all) streamed to S3
 * in one PUT, at most MAX_SINGLE_PUT_BYTES: nothing is held whole or written to disk.
 */
export async function putObjectChunks(ref: ObjectRef, chunks: Iterable<Uint8Array> | AsyncIterable<Uint8Array>, length: number, contentType: string, s3: S3Client = getS3()): Promise<void> {
  if (length > MAX_SINGLE_PUT_BYTES) throw new Error(`${ref.key}: ${length} bytes are more than one PUT takes (${MAX_SINGLE_PUT_BYTES})`);
  await s3.send(new PutObjectCommand({ Bucket: ref.bucket, Key: ref.key, Body: Readable.from(chunks, { objectMode: false }), ContentType: contentType, ContentLength: length }));
}

/**
 * A file on disk streamed to S3 in one PUT (at most MAX_SINGLE_PUT_BYTES): no parts to
 * assemble afterwards, which is what a store of large pieces on the same network wants.
 * Returns its size.
 */
export async function putObjectFileWhole(ref: ObjectRef, path: string, contentType: string, s3: S3Client = getS3()): Promise<number> {
  const { size } = await stat(path);
  if (size > MAX_SINGLE_PUT_BYTES) return putObjectFile(ref, path, contentType, s3);
  await s3.send(new PutObjectCommand({ Bucket: ref.bucket, Key: ref.key, Body: createReadStream(path), ContentType: contentType, ContentLength: size }));
  return size;
}

/** Deletes one object; one already gone counts as deleted (S3 answers the same). */
export async function deleteObject(ref: ObjectRef, s3: S3Client = getS3()): Promise<void> {
  await s3.send(new DeleteObjectCommand({ Bucket: ref.bucket, Key: ref.key }));
}

/** Keys of every object under a prefix, in key order. */
export async function listObjectKeys(ref: { bucket: string; prefix: string }, s3: S3Client = getS3()): Promise<string[]> {
  const keys: string[] = [];
  let token: string | undefined;
  do {
    const page = await s3.send(new ListObjectsV2Command({ Bucket: ref.bucket, Prefix: ref.prefix, ContinuationToken: token }));
    for (const o of page.Contents ?? []) if (o.Key) keys.push(o.Key);
    token = page.IsTruncated ? page.NextContinuationToken : undefined;
  } while (token);
  return keys;
}

/** Deletes every object under a prefix, a few at a time; returns how many there were. */
export async function deleteObjectsUnder(ref: { bucket: string; prefix: string }, s3: S3Client = getS3()): Promise<number> {
  if (!ref.prefix.endsWith("/")) throw new Error(`a prefix to delete under must end in "/": ${ref.prefix}`);
  const keys = await listObjectKeys(ref, s3);
  for (let i = 0; i < keys.length; i += 8) await Promise.all(keys.slice(i, i + 8).map((key) => deleteObject({ bucket: ref.bucket, key }, s3)));
  return keys.length;
}
