/** Limits the server enforces, handed to the browser for early, friendly refusals. */
export interface UploadLimits {
  maxFileSizeBytes: number;
  maxFilesPerSet: number;
  partSizeBytes: number;
}

export { formatBytes } from "@/lib/format/bytes";
