// Upload limits, in one place: the services check them when an upload starts
// (from the declared size) and again when it completes (from what arrived).
export { MAX_INPUT_PIXELS } from "@/lib/media/sharp-setup";

/** Largest original we take: 2 GiB (a large camera raw is under 150 MB). */
export const MAX_FILE_SIZE_BYTES = 2 * 1024 ** 3;
/** Most frames (and open uploads) in one bracket set. */
export const MAX_FILES_PER_SET = 500;
/** Part size of multipart uploads. S3 needs at least 5 MiB for all parts but the last. */
export const PART_SIZE_BYTES = 8 * 1024 ** 2;
/** S3's ceiling on parts per upload; 2 GiB / 8 MiB is 256, well inside it. */
export const MAX_PARTS = 10_000;
/** Most part URLs signed in one request. */
export const MAX_PARTS_PER_SIGNING = 100;
/** Lifetime of a presigned part URL. */
export const PART_URL_TTL_S = 3600;
/** An upload still open after this long is abandoned: the sweeper aborts it. */
export const ABANDONED_UPLOAD_AGE_H = 24;

/** Parts needed for a file of `sizeBytes` (at least one). */
export function countParts(sizeBytes: number, partSizeBytes = PART_SIZE_BYTES): number {
  return Math.max(1, Math.ceil(sizeBytes / partSizeBytes));
}
