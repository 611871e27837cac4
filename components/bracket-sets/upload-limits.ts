/** Limits the server enforces, handed to the browser for early, friendly refusals. */
export interface UploadLimits {
  maxFileSizeBytes: number;
  maxFilesPerSet: number;
  partSizeBytes: number;
}

export { formatBytes } from "@/lib/format/bytes";

/**
 * File name extensions of the formats ingest reads (lib/media/sniff.ts keeps the
 * same list; a unit test holds them equal). The file picker offers only these;
 * the server still decides by content.
 */
export const FRAME_EXTENSIONS = [".fits", ".fit", ".fts", ".tif", ".tiff", ".dng", ".cr2", ".cr3", ".nef", ".nrw", ".arw", ".orf", ".raf", ".jpg", ".jpeg", ".jpe", ".png"] as const;

/** A file input's button styled like the app's secondary buttons. */
export const FILE_INPUT_CLASSES =
  "max-w-full text-sm file:mr-3 file:min-h-11 file:cursor-pointer file:rounded-control file:border file:border-solid file:border-line-strong file:bg-surface-raised file:px-4 file:font-medium file:text-ink hover:file:bg-surface-hover";
