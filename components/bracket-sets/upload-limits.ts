/** Limits the server enforces, handed to the browser for early, friendly refusals. */
export interface UploadLimits {
  maxFileSizeBytes: number;
  maxFilesPerSet: number;
  partSizeBytes: number;
}

export function formatBytes(bytes: number): string {
  if (bytes >= 1024 ** 3) return `${(bytes / 1024 ** 3).toFixed(1)} GB`;
  if (bytes >= 1024 ** 2) return `${(bytes / 1024 ** 2).toFixed(1)} MB`;
  if (bytes >= 1024) return `${(bytes / 1024).toFixed(0)} kB`;
  return `${bytes} bytes`;
}
