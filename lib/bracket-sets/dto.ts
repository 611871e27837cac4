// What leaves the server about bracket sets, frames and uploads: chosen fields,
// dates as ISO text, no storage keys and no owner ids.
import type { BracketSetState, ExposureSource, FrameFlags, FrameKind, GivenTimeSource, IngestState, UploadState } from "@/db/schema";

export interface BracketSetSummaryDto {
  id: string;
  name: string;
  eclipseId: string;
  siteId: string;
  kitId: string | null;
  ownerName: string;
  isOwn: boolean;
  state: BracketSetState;
  clockOffsetS: number;
  /** North in the image as the photographer gave it (degrees counter-clockwise from up); null: from the kit's mount, or estimated. */
  northAngleDeg: number | null;
  frameCount: number;
  createdAt: string;
  updatedAt: string;
}

export interface FrameDto {
  id: string;
  fileName: string;
  sizeBytes: number;
  sha256: string | null;
  format: string | null;
  width: number | null;
  height: number | null;
  bitDepth: number | null;
  exposureS: number | null;
  exposureSource: ExposureSource | null;
  /** True when ingest found no exposure and the photographer has given none. */
  needsExposure: boolean;
  fNumber: number | null;
  iso: number | null;
  /** As the camera clock read, in UTC: the photographer's time when given, else the file's. */
  captureAt: string | null;
  /** With the set's clock offset applied: true time = clock - offset. */
  correctedCaptureAt: string | null;
  /** The file's own time, kept as read even when the photographer gave another. */
  fileCaptureAt: string | null;
  /** Where captureAt comes from: the file, or how the photographer gave it. */
  captureTimeSource: "file" | GivenTimeSource | null;
  /** A checked light frame with no capture time at all: a Sun-centred reduction cannot use it. */
  needsTime: boolean;
  make: string | null;
  model: string | null;
  kind: FrameKind;
  included: boolean;
  /** The bracket within the set (1, 2, ...) when one upload held several. */
  groupNumber: number;
  ingestState: IngestState;
  refusalReason: string | null;
  hasThumbnail: boolean;
  flags: FrameFlags;
}

export interface UploadDto {
  id: string;
  frameId: string;
  fileName: string;
  sizeBytes: number;
  partSizeBytes: number;
  partCount: number;
  state: UploadState;
  createdAt: string;
}

export interface BracketSetDto extends BracketSetSummaryDto {
  notes: string;
  frames: FrameDto[];
  /** Uploads still open: a reloaded page resumes these. */
  openUploads: UploadDto[];
}

export interface UploadedPartDto {
  partNumber: number;
  sizeBytes: number;
  etag: string;
}

export interface UploadPartsDto {
  uploadId: string;
  partCount: number;
  parts: UploadedPartDto[];
  missingPartNumbers: number[];
}

export interface SignedPartsDto {
  uploadId: string;
  expiresAt: string;
  urls: { partNumber: number; url: string }[];
}

export interface RemovedFrameDto {
  id: string;
  fileName: string;
  /** False when a finished reduction of the set was made while the frame was in it: its original stays stored for that record. */
  isOriginalDeleted: boolean;
}

export interface FrameTimesResultDto {
  timesSet: number;
  exposuresSet: number;
  /** Frame names in the order they were given times, for the confirmation. */
  fileNames: string[];
}
