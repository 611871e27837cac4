// The storage adapter's public surface.
export { bucketName, createS3Client, getS3, type BucketRole } from "./s3";
export { buildDerivedPrefix, buildCompositePrefix, buildReductionPrefix, buildOriginalKey, buildThumbnailKey, toSafeFileName } from "./keys";
export * from "./limits";
export {
  abortMultipartUpload,
  completeMultipartUpload,
  createMultipartUpload,
  isNoSuchUpload,
  listUploadedParts,
  signPartUrls,
  type MultipartRef,
  type ObjectRef,
  type SignedPart,
  type UploadedPart,
} from "./multipart";
export { checkBucket, deleteObject, deleteObjectsUnder, downloadObjectToFile, findObjectSize, isMissingObject, openObjectStream, listObjectKeys, MAX_SINGLE_PUT_BYTES, putObjectBytes, putObjectChunks, putObjectFile, putObjectFileWhole, readObjectChunks, readObjectRange, readSmallObject } from "./objects";
export { sweepAbandonedUploads, type SweepResult } from "./sweep-uploads";
