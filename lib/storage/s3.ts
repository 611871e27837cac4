// The S3 client from env: the local fake (path style, loopback endpoint) or
// real S3 (no endpoint), chosen by env alone. Checksums only when required:
// with the fake, streamed puts would otherwise be stored with aws-chunked
// framing, and presigned URLs would carry a checksum real S3 rejects.
import { S3Client } from "@aws-sdk/client-s3";

let client: S3Client | undefined;

export function createS3Client(env: NodeJS.ProcessEnv = process.env): S3Client {
  const endpoint = env.S3_ENDPOINT || undefined;
  return new S3Client({
    region: env.S3_REGION ?? "us-east-1",
    endpoint,
    forcePathStyle: env.S3_FORCE_PATH_STYLE === "true" || env.S3_FORCE_PATH_STYLE === "1",
    credentials:
      env.S3_ACCESS_KEY_ID && env.S3_SECRET_ACCESS_KEY
        ? { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY }
        : undefined,
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
  });
}

export function getS3(): S3Client {
  client ??= createS3Client();
  return client;
}

export type BucketRole = "originals" | "derived" | "exports";

export function bucketName(role: BucketRole, env: NodeJS.ProcessEnv = process.env): string {
  const key = { originals: "S3_BUCKET_ORIGINALS", derived: "S3_BUCKET_DERIVED", exports: "S3_BUCKET_EXPORTS" }[role];
  const name = env[key];
  if (!name) throw new Error(`${key} is missing`);
  return name;
}
