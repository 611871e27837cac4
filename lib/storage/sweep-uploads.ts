// Abandoned uploads: a multipart upload that was started and never completed
// keeps its parts in S3 (and on the bill) until aborted. The sweeper aborts
// those still open after N hours and marks their rows "expired". It only ever
// aborts in-progress uploads; completed objects (originals) are never touched.
import { and, eq, lt, sql } from "drizzle-orm";
import type { S3Client } from "@aws-sdk/client-s3";
import type { DbOrTx } from "@/db/client";
import { uploads } from "@/db/schema";
import { ABANDONED_UPLOAD_AGE_H } from "./limits";
import { abortMultipartUpload } from "./multipart";
import { bucketName, getS3 } from "./s3";

export interface SweepResult {
  /** Upload rows marked expired. */
  expired: number;
  /** Of those, how many S3 still held (the rest had already gone). */
  abortedInS3: number;
}

export async function sweepAbandonedUploads(
  db: DbOrTx,
  options: { olderThanHours?: number; now?: Date; s3?: S3Client } = {},
): Promise<SweepResult> {
  const hours = options.olderThanHours ?? ABANDONED_UPLOAD_AGE_H;
  if (!(hours >= 0)) throw new RangeError(`olderThanHours must be 0 or more, not ${hours}`);
  const cutoff = new Date((options.now ?? new Date()).getTime() - hours * 3600_000);
  const s3 = options.s3 ?? getS3();
  const bucket = bucketName("originals");
  const stale = await db
    .select({ id: uploads.id, key: uploads.key, s3UploadId: uploads.s3UploadId })
    .from(uploads)
    .where(and(eq(uploads.state, "open"), lt(uploads.createdAt, cutoff)));
  let abortedInS3 = 0;
  let expired = 0;
  for (const u of stale) {
    if (await abortMultipartUpload({ bucket, key: u.key, uploadId: u.s3UploadId }, s3)) abortedInS3++;
    // Only a row still open is marked: one completed meanwhile keeps its state.
    const done = await db
      .update(uploads)
      .set({ state: "expired", updatedAt: sql`now()` })
      .where(and(eq(uploads.id, u.id), eq(uploads.state, "open")))
      .returning({ id: uploads.id });
    expired += done.length;
  }
  return { expired, abortedInS3 };
}
