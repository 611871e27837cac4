// Writes capture EXIF into an existing JPEG or TIFF through exiftool-vendored:
// sharp's withExif takes strings only and cannot write the RATIONAL values
// (ExposureTime, FNumber) that readers expect. One ExifTool process is kept
// and must be ended with closeExifWriter when the caller is done.
import { ExifTool, type WriteTags } from "exiftool-vendored";
import { basename } from "node:path";
import { MediaError } from "./errors";

export interface CaptureExif {
  exposureS: number;
  fNumber?: number;
  iso?: number;
  /** EXIF 2.32 strings: "YYYY:MM:DD HH:MM:SS", digits of the second, "+HH:MM". */
  dateTimeOriginal?: string;
  subSecTimeOriginal?: string;
  offsetTimeOriginal?: string;
  make: string;
  model: string;
}

let exiftool: ExifTool | undefined;

function formatExposure(exposureS: number): string {
  const inverse = 1 / exposureS;
  return exposureS < 1 && Math.abs(inverse - Math.round(inverse)) < 1e-6 * inverse ? `1/${Math.round(inverse)}` : String(exposureS);
}

/** UTC milliseconds -> the three EXIF strings, in the time zone `offsetMinutes` east of UTC. */
export function formatExifDateTime(captureTimeMs: number, offsetMinutes = 0): Pick<CaptureExif, "dateTimeOriginal" | "subSecTimeOriginal" | "offsetTimeOriginal"> {
  const local = new Date(captureTimeMs + offsetMinutes * 60_000);
  const pad = (n: number, width = 2) => String(n).padStart(width, "0");
  const sign = offsetMinutes < 0 ? "-" : "+";
  const abs = Math.abs(offsetMinutes);
  return {
    dateTimeOriginal: `${local.getUTCFullYear()}:${pad(local.getUTCMonth() + 1)}:${pad(local.getUTCDate())} ${pad(local.getUTCHours())}:${pad(local.getUTCMinutes())}:${pad(local.getUTCSeconds())}`,
    subSecTimeOriginal: pad(local.getUTCMilliseconds(), 3),
    offsetTimeOriginal: `${sign}${pad(Math.floor(abs / 60))}:${pad(abs % 60)}`,
  };
}

export async function writeCaptureExif(path: string, tags: CaptureExif): Promise<void> {
  exiftool ??= new ExifTool({ maxProcs: 1 });
  const write: WriteTags = {
    ExposureTime: formatExposure(tags.exposureS),
    Make: tags.make,
    Model: tags.model,
  };
  if (tags.fNumber !== undefined) write.FNumber = tags.fNumber;
  if (tags.iso !== undefined) write.ISO = tags.iso;
  if (tags.dateTimeOriginal) write.DateTimeOriginal = tags.dateTimeOriginal;
  if (tags.subSecTimeOriginal) write.SubSecTimeOriginal = tags.subSecTimeOriginal as unknown as number;
  if (tags.offsetTimeOriginal) write.OffsetTimeOriginal = tags.offsetTimeOriginal;
  try {
    await exiftool.write(path, write, { writeArgs: ["-overwrite_original"] });
  } catch (error) {
    throw new MediaError("corrupt", basename(path), `ExifTool cannot write the capture tags: ${error instanceof Error ? error.message : String(error)}`, { cause: error });
  }
}

export async function closeExifWriter(): Promise<void> {
  const running = exiftool;
  exiftool = undefined;
  await running?.end();
}
