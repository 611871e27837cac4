// Presigned multipart uploads: the browser sends parts straight to S3, the
// server never carries the bytes. Part URLs are signed for given part numbers
// only; the list of parts already uploaded comes from S3 itself (ListParts), so a
// reloaded page resumes from what S3 really holds, not from what a client says.
import {
  AbortMultipartUploadCommand,
  CompleteMultipartUploadCommand,
  CreateMultipartUploadCommand,
  ListPartsCommand,
  UploadPartCommand,
  type S3Client,
} from "@aws-sdk/client-s3";
import { getSignedUrl } from "@aws-sdk/s3-request-presigner";
import { PART_URL_TTL_S } from "./limits";
import { getS3 } from "./s3";

export interface ObjectRef {
  bucket: string;
  key: string;
}

export interface MultipartRef extends ObjectRef {
  uploadId: string;
}

export interface UploadedPart {
  partNumber: number;
  etag: string;
  sizeBytes: number;
}

export interface SignedPart {
  partNumber: number;
  url: string;
}

export async function createMultipartUpload(ref: ObjectRef, contentType = "application/octet-stream", s3: S3Client = getS3()): Promise<string> {
  const out = await s3.send(new CreateMultipartUploadCommand({ Bucket: ref.bucket, Key: ref.key, ContentType: contentType }));
  if (!out.UploadId) throw new Error(`S3 gave no upload id for ${ref.key}`);
  return out.UploadId;
}

/** One presigned PUT URL per part number (1..10000), valid for `expiresInS`. */
export async function signPartUrls(ref: MultipartRef, partNumbers: readonly number[], expiresInS = PART_URL_TTL_S, s3: S3Client = getS3()): Promise<SignedPart[]> {
  return Promise.all(
    partNumbers.map(async (partNumber) => ({
      partNumber,
      url: await getSignedUrl(s3, new UploadPartCommand({ Bucket: ref.bucket, Key: ref.key, UploadId: ref.uploadId, PartNumber: partNumber }), {
        expiresIn: expiresInS,
      }),
    })),
  );
}

/** Every part S3 holds for the upload, in part order (follows S3's pagination). */
export async function listUploadedParts(ref: MultipartRef, s3: S3Client = getS3()): Promise<UploadedPart[]> {
  const parts: UploadedPart[] = [];
  let marker: string | undefined;
  for (;;) {
    const out = await s3.send(new ListPartsCommand({ Bucket: ref.bucket, Key: ref.key, UploadId: ref.uploadId, PartNumberMarker: marker }));
    for (const p of out.Parts ?? []) {
      if (p.PartNumber === undefined || !p.ETag) continue;
      parts.push({ partNumber: p.PartNumber, etag: p.ETag, sizeBytes: p.Size ?? 0 });
    }
    if (!out.IsTruncated || !out.NextPartNumberMarker) break;
    marker = out.NextPartNumberMarker;
  }
  return parts.sort((a, b) => a.partNumber - b.partNumber);
}

export async function completeMultipartUpload(ref: MultipartRef, parts: readonly UploadedPart[], s3: S3Client = getS3()): Promise<void> {
  await s3.send(
    new CompleteMultipartUploadCommand({
      Bucket: ref.bucket,
      Key: ref.key,
      UploadId: ref.uploadId,
      MultipartUpload: { Parts: parts.map((p) => ({ PartNumber: p.partNumber, ETag: p.etag })) },
    }),
  );
}

/** Aborts the upload and frees its parts. False when S3 no longer knows it (already gone). */
export async function abortMultipartUpload(ref: MultipartRef, s3: S3Client = getS3()): Promise<boolean> {
  try {
    await s3.send(new AbortMultipartUploadCommand({ Bucket: ref.bucket, Key: ref.key, UploadId: ref.uploadId }));
    return true;
  } catch (err) {
    if (isNoSuchUpload(err)) return false;
    throw err;
  }
}

export function isNoSuchUpload(err: unknown): boolean {
  return (err as { name?: string })?.name === "NoSuchUpload";
}
