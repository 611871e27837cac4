// Presigned multipart uploads against the S3 fake: parts PUT with fetch to the
// signed URLs, listed for resumption, completed into the right bytes; aborted
// uploads leave nothing; abandoned ones are swept. Then the upload services on
// top: limits from the declared size, resumption, and what completion refuses.
import { createHash, randomUUID } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { frames, uploads } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { abortFrameUpload, completeFrameUpload, findBracketSet, listParts, startFrameUpload } from "@/lib/bracket-sets";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import {
  abortMultipartUpload,
  bucketName,
  completeMultipartUpload,
  createMultipartUpload,
  deleteObjectsUnder,
  findObjectSize,
  listObjectKeys,
  listUploadedParts,
  PART_SIZE_BYTES,
  putObjectBytes,
  readObjectRange,
  signPartUrls,
  sweepAbandonedUploads,
} from "@/lib/storage";
import { requireTestDatabase } from "../support/env";
import { createMember, createSetFor, putParts } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(async () => {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

/** Deterministic bytes that differ from part to part, so a swapped part would show. */
function patternBytes(length: number, seed: number): Uint8Array<ArrayBuffer> {
  const out = new Uint8Array(length);
  let x = seed;
  for (let i = 0; i < length; i++) {
    x = (x * 1103515245 + 12345) >>> 0;
    out[i] = x >>> 24;
  }
  return out;
}

const sha = (b: Uint8Array) => createHash("sha256").update(b).digest("hex");

describe("multipart helpers against the S3 fake", () => {
  const bucket = bucketName("originals");

  it("completes parts PUT to presigned URLs into exactly the bytes sent", async () => {
    const key = `originals/test/${randomUUID()}/two-parts.bin`;
    const bytes = patternBytes(5 * 1024 * 1024 + 1234, 7);
    const uploadId = await createMultipartUpload({ bucket, key });
    const ref = { bucket, key, uploadId };
    const urls = await signPartUrls(ref, [1, 2], 300);
    expect(urls.map((u) => u.partNumber)).toEqual([1, 2]);
    // Part 2 first: S3 orders by part number, not by arrival.
    for (const { partNumber, url } of [...urls].reverse()) {
      const body = partNumber === 1 ? bytes.subarray(0, 5 * 1024 * 1024) : bytes.subarray(5 * 1024 * 1024);
      expect((await fetch(url, { method: "PUT", body })).status).toBe(200);
    }
    const parts = await listUploadedParts(ref);
    expect(parts.map((p) => [p.partNumber, p.sizeBytes])).toEqual([
      [1, 5 * 1024 * 1024],
      [2, 1234],
    ]);
    await completeMultipartUpload(ref, parts);
    expect(await findObjectSize({ bucket, key })).toBe(bytes.length);
    const tail = await readObjectRange({ bucket, key }, 5 * 1024 * 1024 - 4, 8);
    expect([...tail]).toEqual([...bytes.subarray(5 * 1024 * 1024 - 4, 5 * 1024 * 1024 + 4)]);
  });

  it("leaves nothing behind after an abort", async () => {
    const key = `originals/test/${randomUUID()}/aborted.bin`;
    const uploadId = await createMultipartUpload({ bucket, key });
    const ref = { bucket, key, uploadId };
    const [{ url }] = await signPartUrls(ref, [1], 300);
    expect((await fetch(url, { method: "PUT", body: patternBytes(1000, 3) })).status).toBe(200);
    expect(await abortMultipartUpload(ref)).toBe(true);
    await expect(listUploadedParts(ref)).rejects.toMatchObject({ name: "NoSuchUpload" });
    expect(await findObjectSize({ bucket, key })).toBeNull();
    // A second abort finds it gone and says so instead of failing.
    expect(await abortMultipartUpload(ref)).toBe(false);
  });

  it("deletes every object under a prefix, many in one folder side by side, as S3 does", async () => {
    // Through the fake's HTTP, end to end. s3rver removes a folder left empty after each delete,
    // and deletes side by side in one folder race there; that race is shown on its store alone
    // (tests/unit/fakes/s3-concurrent-deletes.test.ts), where its timing is sure.
    const prefix = `derived/test/${randomUUID()}/`;
    // Folders of 8: each batch of deletes (8 side by side) empties one folder, and then its parents.
    const keys = Array.from({ length: 64 }, (_, i) => `${prefix}tiles/${Math.floor(i / 8)}/${i}.jpg`);
    for (const key of keys) await putObjectBytes({ bucket, key }, Buffer.from(patternBytes(16, keys.indexOf(key))), "image/jpeg");
    expect(await deleteObjectsUnder({ bucket, prefix })).toBe(64);
    expect(await listObjectKeys({ bucket, prefix })).toEqual([]);
  });

  it("lists and deletes more than a page of objects under a prefix (S3 lists 1000 at a time)", async () => {
    // s3rver sealed the token for the next page with DES, which OpenSSL 3 no longer offers by
    // default: every listing past 1000 keys failed, and a 24-megapixel reduction has about 1300 tiles.
    const prefix = `derived/test/${randomUUID()}/`;
    const keys = Array.from({ length: 1010 }, (_, i) => `${prefix}tiles/${String(i).padStart(4, "0")}.jpg`);
    for (let i = 0; i < keys.length; i += 16) {
      await Promise.all(keys.slice(i, i + 16).map((key) => putObjectBytes({ bucket, key }, Buffer.from(key), "image/jpeg")));
    }
    expect(await listObjectKeys({ bucket, prefix })).toEqual(keys);
    expect(await deleteObjectsUnder({ bucket, prefix })).toBe(1010);
    expect(await listObjectKeys({ bucket, prefix })).toEqual([]);
  }, 60_000);

  it("refuses to complete an upload already aborted, as S3 does, and goes on serving", async () => {
    // A cancel that meets the last part: the abort wins, and the complete that follows names parts
    // whose files are gone (s3rver alone ended the fake on it).
    const key = `originals/test/${randomUUID()}/cancelled.bin`;
    const uploadId = await createMultipartUpload({ bucket, key });
    const ref = { bucket, key, uploadId };
    const [{ url }] = await signPartUrls(ref, [1], 300);
    expect((await fetch(url, { method: "PUT", body: patternBytes(1000, 4) })).status).toBe(200);
    const parts = await listUploadedParts(ref);
    expect(await abortMultipartUpload(ref)).toBe(true);
    await expect(completeMultipartUpload(ref, parts)).rejects.toMatchObject({ name: "NoSuchUpload" });
    expect(await findObjectSize({ bucket, key })).toBeNull();
    // The fake is still there for the next upload.
    expect(await createMultipartUpload({ bucket, key: `${key}.next` })).toMatch(/^[0-9a-f]+$/);
  });
});

describe("frame uploads", () => {
  let alice: Actor;
  let setId: string;
  beforeAll(async () => {
    alice = await createMember(db, "Alice Upload");
    setId = await createSetFor(db, alice);
  });

  it("refuses an empty file and an absurd size from the declared size, naming the file", async () => {
    await expect(startFrameUpload(db, alice, setId, { fileName: "IMG_0001.CR3", sizeBytes: 0 })).rejects.toMatchObject({
      code: "invalid_input",
      message: "IMG_0001.CR3: the file is empty (0 bytes).",
    });
    await expect(startFrameUpload(db, alice, setId, { fileName: "IMG_0002.CR3", sizeBytes: 3 * 1024 ** 3 })).rejects.toMatchObject({
      code: "too_large",
      message: "IMG_0002.CR3: 3.0 GB is more than the 2.0 GB a frame may have.",
    });
    const rows = await db.select().from(uploads).where(eq(uploads.bracketSetId, setId));
    expect(rows).toHaveLength(0);
  });

  it("resumes from what S3 holds, refuses to complete while a part is missing, then completes", async () => {
    const bytes = patternBytes(PART_SIZE_BYTES + 5000, 11);
    const upload = await startFrameUpload(db, alice, setId, { fileName: "resumed.bin", sizeBytes: bytes.length });
    expect(upload.partCount).toBe(2);
    await putParts(db, alice, setId, upload, bytes, [1]);

    // A reloaded page asks what arrived and sees the set's open upload.
    const seen = await listParts(db, alice, setId, upload.id);
    expect(seen.missingPartNumbers).toEqual([2]);
    expect(seen.parts.map((p) => p.sizeBytes)).toEqual([PART_SIZE_BYTES]);
    expect((await findBracketSet(db, alice, setId)).openUploads.map((u) => u.id)).toContain(upload.id);

    await expect(completeFrameUpload(db, alice, setId, upload.id)).rejects.toMatchObject({
      code: "conflict",
      message: expect.stringMatching(/^resumed\.bin: part\(s\) 2 of 2 have not arrived/),
    });
    await putParts(db, alice, setId, upload, bytes, [2]);
    // Random bytes are no image: stored, but refused by content with the file named.
    await expect(completeFrameUpload(db, alice, setId, upload.id)).rejects.toMatchObject({
      code: "unsupported_media",
      message: expect.stringMatching(/^resumed\.bin: the content is not an image format we read/),
    });
    const [frame] = await db.select().from(frames).where(eq(frames.id, upload.frameId));
    expect(frame.ingestState).toBe("refused");
    expect(frame.refusalReason).toMatch(/^resumed\.bin: /);
    // The original is kept, byte for byte.
    expect(await findObjectSize({ bucket: bucketName("originals"), key: frame.originalKey })).toBe(bytes.length);
    const head = await readObjectRange({ bucket: bucketName("originals"), key: frame.originalKey }, 0, bytes.length);
    expect(sha(head)).toBe(sha(bytes));
  });

  it("refuses parts that add up to more than was declared, and keeps the upload open", async () => {
    const upload = await startFrameUpload(db, alice, setId, { fileName: "short-claim.tif", sizeBytes: 100 });
    await putParts(db, alice, setId, upload, patternBytes(100, 1), [1]);
    // Overwrite part 1 with more bytes than declared.
    const [row] = await db.select().from(uploads).where(eq(uploads.id, upload.id));
    const [{ url }] = await signPartUrls({ bucket: bucketName("originals"), key: row.key, uploadId: row.s3UploadId }, [1], 60);
    await fetch(url, { method: "PUT", body: patternBytes(150, 2) });
    await expect(completeFrameUpload(db, alice, setId, upload.id)).rejects.toMatchObject({
      code: "invalid_input",
      message: expect.stringMatching(/^short-claim\.tif: the parts hold 150 bytes.*declared as 100 bytes/),
    });
    const [after] = await db.select().from(uploads).where(eq(uploads.id, upload.id));
    expect(after.state).toBe("open");
    const aborted = await abortFrameUpload(db, alice, setId, upload.id);
    expect(aborted.state).toBe("aborted");
    await expect(listUploadedParts({ bucket: bucketName("originals"), key: row.key, uploadId: row.s3UploadId })).rejects.toMatchObject({ name: "NoSuchUpload" });
  });

  it("sweeps uploads abandoned for longer than N hours, and only those", async () => {
    const old = await startFrameUpload(db, alice, setId, { fileName: "abandoned.tif", sizeBytes: 10 });
    const fresh = await startFrameUpload(db, alice, setId, { fileName: "fresh.tif", sizeBytes: 10 });
    await db.update(uploads).set({ createdAt: sql`now() - interval '30 hours'` }).where(eq(uploads.id, old.id));
    const result = await sweepAbandonedUploads(db, { olderThanHours: 24 });
    expect(result.expired).toBeGreaterThanOrEqual(1);
    const rows = await db.select().from(uploads).where(eq(uploads.bracketSetId, setId));
    expect(rows.find((r) => r.id === old.id)?.state).toBe("expired");
    expect(rows.find((r) => r.id === fresh.id)?.state).toBe("open");
    const oldRow = rows.find((r) => r.id === old.id)!;
    await expect(listUploadedParts({ bucket: bucketName("originals"), key: oldRow.key, uploadId: oldRow.s3UploadId })).rejects.toMatchObject({ name: "NoSuchUpload" });
    await abortFrameUpload(db, alice, setId, fresh.id);
  });
});
