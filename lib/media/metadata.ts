// One normalized description of a frame's capture, from EXIF (through exifr) or
// FITS header cards. Capture times are built in UTC by us: exifr would read
// DateTimeOriginal as the server's local time, and FITS DATE-OBS is UTC by the
// standard's default TIMESYS (FITS 4.0 section 9.2.1).
import exifr from "exifr";
import { MediaError } from "./errors";
import type { FitsValue } from "./fits-cards";

export interface FrameMetadata {
  exposureS?: number;
  fNumber?: number;
  iso?: number;
  /** Capture time in UTC milliseconds since the epoch, before any camera clock correction. */
  captureTimeMs?: number;
  /** True when the file gave no time zone and the clock was taken to read UTC. */
  isTimeZoneAssumed?: boolean;
  make?: string;
  model?: string;
  lensModel?: string;
  focalMm?: number;
  /** FITS only: detector gain as written (GAIN, e-/ADU by common convention). */
  gain?: number;
  instrument?: string;
  telescope?: string;
  /** Pixel pitch in micrometres (FITS XPIXSZ). */
  pitchUm?: number;
  /** Clock correction already applied, in seconds (see applyClockOffset). */
  clockOffsetS?: number;
}

const EXIF_TAGS = [
  "ExposureTime", "FNumber", "ISO", "ISOSpeedRatings", "PhotographicSensitivity",
  "DateTimeOriginal", "SubSecTimeOriginal", "OffsetTimeOriginal", "OffsetTime",
  "Make", "Model", "LensModel", "FocalLength",
];

function positiveNumber(value: unknown): number | undefined {
  const number = Array.isArray(value) ? Number(value[0]) : typeof value === "string" ? Number(value) : value;
  return typeof number === "number" && Number.isFinite(number) && number > 0 ? number : undefined;
}

function text(value: unknown): string | undefined {
  if (typeof value !== "string") return undefined;
  const trimmed = value.replace(/\0+$/, "").trim();
  return trimmed === "" ? undefined : trimmed;
}

/**
 * UTC milliseconds of a calendar date and time, or undefined when the parts name
 * no real instant (month 13, 31 April, 25 h): Date.UTC would silently roll them
 * over into the next month or day.
 */
export function utcFromParts(y: number, mo: number, d: number, h = 0, mi = 0, s = 0): number | undefined {
  if (mo < 1 || mo > 12 || d < 1 || h > 23 || mi > 59 || s > 59) return undefined;
  const ms = Date.UTC(y, mo - 1, d, h, mi, s);
  return new Date(ms).getUTCDate() === d ? ms : undefined;
}

/**
 * UTC milliseconds from EXIF 2.32 strings: DateTimeOriginal "YYYY:MM:DD HH:MM:SS",
 * SubSecTimeOriginal (decimal digits of the second), OffsetTimeOriginal "+HH:MM".
 */
export function buildExifCaptureTime(dateTime: string, subSec?: string, offset?: string): { captureTimeMs: number; isTimeZoneAssumed: boolean } | undefined {
  const match = /^(\d{4}):(\d{2}):(\d{2})[ T](\d{2}):(\d{2}):(\d{2})/.exec(dateTime.trim());
  if (!match) return undefined;
  const [, y, mo, d, h, mi, s] = match.map(Number);
  const digits = (subSec ?? "").trim().replace(/\D.*$/, "");
  const fractionMs = digits ? Number(`0.${digits}`) * 1000 : 0;
  const start = utcFromParts(y, mo, d, h, mi, s);
  // "0000:00:00 00:00:00" is how cameras whose clock was never set write "unknown".
  if (start === undefined && y === 0 && mo === 0 && d === 0) return undefined;
  if (start === undefined) throw new RangeError(`DateTimeOriginal "${dateTime.trim()}" is not a real date and time`);
  const local = start + fractionMs;
  const zone = /^([+-])(\d{2}):?(\d{2})$/.exec((offset ?? "").trim());
  if (!zone) return { captureTimeMs: local, isTimeZoneAssumed: true };
  const offsetMs = (zone[1] === "-" ? -1 : 1) * (Number(zone[2]) * 60 + Number(zone[3])) * 60_000;
  return { captureTimeMs: local - offsetMs, isTimeZoneAssumed: false };
}

/** EXIF of a JPEG, TIFF, PNG or TIFF-based raw; an empty object when the file has none. */
export async function readExifMetadata(input: Uint8Array | string, fileName = typeof input === "string" ? input : "the file"): Promise<FrameMetadata> {
  let tags: Record<string, unknown> | undefined;
  try {
    tags = await exifr.parse(input instanceof Uint8Array ? Buffer.from(input.buffer, input.byteOffset, input.byteLength) : input, {
      pick: EXIF_TAGS,
      reviveValues: false,
      translateValues: false,
      tiff: true,
      exif: true,
      xmp: false,
      icc: false,
      iptc: false,
      makerNote: false,
    });
  } catch {
    // A file exifr cannot parse (CR3, FITS, an image without EXIF) simply has no EXIF.
    return {};
  }
  if (!tags) return {};
  const metadata: FrameMetadata = {
    exposureS: positiveNumber(tags.ExposureTime),
    fNumber: positiveNumber(tags.FNumber),
    iso: positiveNumber(tags.ISO ?? tags.ISOSpeedRatings ?? tags.PhotographicSensitivity),
    make: text(tags.Make),
    model: text(tags.Model),
    lensModel: text(tags.LensModel),
    focalMm: positiveNumber(tags.FocalLength),
  };
  const dateTime = text(tags.DateTimeOriginal);
  if (dateTime) {
    let built: ReturnType<typeof buildExifCaptureTime>;
    try {
      built = buildExifCaptureTime(dateTime, text(String(tags.SubSecTimeOriginal ?? "")), text(tags.OffsetTimeOriginal) ?? text(tags.OffsetTime));
    } catch (err) {
      throw new MediaError("corrupt", fileName, `EXIF ${(err as Error).message}; nothing was rolled over into another day`);
    }
    if (built) Object.assign(metadata, built);
  }
  return dropUndefined(metadata);
}

/**
 * ISO 8601 DATE-OBS (with TIME-OBS when DATE-OBS holds the date only), read as
 * UTC; undefined when the text is not in that form, a RangeError when it is but
 * names no real instant (month 13).
 */
export function parseFitsDate(dateObs: string, timeObs?: string): number | undefined {
  const full = /^\d{4}-\d{2}-\d{2}$/.test(dateObs.trim()) && timeObs ? `${dateObs.trim()}T${timeObs.trim()}` : dateObs.trim();
  const match = /^(\d{4})-(\d{2})-(\d{2})(?:T(\d{2}):(\d{2}):(\d{2})(\.\d+)?)?$/.exec(full);
  if (!match) return undefined;
  const [, y, mo, d, h = "0", mi = "0", s = "0", fraction = ""] = match;
  const fractionMs = fraction ? Number(fraction) * 1000 : 0;
  const start = utcFromParts(Number(y), Number(mo), Number(d), Number(h), Number(mi), Number(s));
  if (start === undefined) throw new RangeError(`"${full}" is not a real date and time`);
  return start + fractionMs;
}

/** Capture description from FITS cards (EXPTIME or EXPOSURE, DATE-OBS, GAIN, INSTRUME, TELESCOP, FOCALLEN, XPIXSZ). */
export function readFitsMetadata(header: Map<string, FitsValue>, fileName = "FITS file"): FrameMetadata {
  const dateObs = text(header.get("DATE-OBS"));
  let captureTimeMs: number | undefined;
  try {
    captureTimeMs = dateObs ? parseFitsDate(dateObs, text(header.get("TIME-OBS"))) : undefined;
  } catch (err) {
    throw new MediaError("fits-header", fileName, `card DATE-OBS${header.has("TIME-OBS") ? " (with TIME-OBS)" : ""}: ${(err as Error).message}; nothing was rolled over into another day`);
  }
  return dropUndefined({
    exposureS: positiveNumber(header.get("EXPTIME")) ?? positiveNumber(header.get("EXPOSURE")),
    captureTimeMs,
    isTimeZoneAssumed: captureTimeMs === undefined ? undefined : false,
    iso: positiveNumber(header.get("ISOSPEED")),
    gain: typeof header.get("GAIN") === "number" ? (header.get("GAIN") as number) : undefined,
    instrument: text(header.get("INSTRUME")),
    telescope: text(header.get("TELESCOP")),
    focalMm: positiveNumber(header.get("FOCALLEN")),
    pitchUm: positiveNumber(header.get("XPIXSZ")),
  });
}

/**
 * The capture time corrected for a camera clock that ran `clockOffsetS` seconds
 * ahead (positive) or behind (negative) of UTC: true time = clock time - offset.
 */
export function applyClockOffset(metadata: FrameMetadata, clockOffsetS: number): FrameMetadata {
  if (!Number.isFinite(clockOffsetS)) throw new RangeError(`clock offset ${clockOffsetS} s is not a finite number`);
  if (metadata.captureTimeMs === undefined) return { ...metadata };
  const previousS = metadata.clockOffsetS ?? 0;
  return {
    ...metadata,
    captureTimeMs: metadata.captureTimeMs + previousS * 1000 - clockOffsetS * 1000,
    clockOffsetS,
  };
}

function dropUndefined<T extends object>(value: T): T {
  return Object.fromEntries(Object.entries(value).filter(([, v]) => v !== undefined)) as T;
}
