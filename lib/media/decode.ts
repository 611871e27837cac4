// Any frame we accept -> Float32Array planes plus what the pipeline needs to
// linearize them. The format comes from the content (sniff.ts); each family has
// one decoder: sharp for JPEG/PNG/TIFF, LibRaw for camera raw, fitsjs for FITS.
import { readFile } from "node:fs/promises";
import type { LinearFrame, PlaneImage } from "@/lib/imaging/types";
import { MediaError } from "./errors";
import { readFits } from "./fits";
import { decodeRaster } from "./decode-raster";
import { decodeCameraRaw } from "./decode-raw";
import { readExifMetadata, readFitsMetadata, type FrameMetadata } from "./metadata";
import { RAW_FORMATS, sniffBytes, sniffFile, type MediaFormat } from "./sniff";

export interface DecodedFrame {
  name: string;
  format: MediaFormat;
  image: PlaneImage;
  /** Bits per stored sample: 8 or 16 for rasters and raw, |BITPIX| for FITS. */
  bitDepth: number;
  /** Pedestal and saturation in the planes' units (data numbers). */
  blackLevel: number;
  whiteLevel: number;
  /** "file" when the file states its offset (or the raw decoder removed it), "none" when a linear file says nothing. */
  blackLevelSource?: "file" | "none";
  encoding: "linear" | "srgb8";
  metadata: FrameMetadata;
}

/**
 * The offset (bias pedestal) a FITS file states, DN in the stored data's units:
 * BLKLEVEL or BLACKLEV give it directly. PEDESTAL is written by some acquisition
 * software as the value to add to reach zero-based data (negative, e.g. -100 for a
 * 100 DN pedestal) and by others as the pedestal itself; either way its size is the
 * offset. Undefined when no card says it.
 */
export function readFitsOffset(header: Map<string, unknown>): number | undefined {
  for (const key of ["BLKLEVEL", "BLACKLEV"]) {
    const v = header.get(key);
    if (typeof v === "number" && Number.isFinite(v) && v >= 0) return v;
  }
  const pedestal = header.get("PEDESTAL");
  if (typeof pedestal === "number" && Number.isFinite(pedestal)) return Math.abs(pedestal);
  return undefined;
}

/** FITS saturation: the SATURATE card when given, else the largest value the integer type holds. */
function fitsWhiteLevel(bitpix: number, bzero: number, bscale: number, header: Map<string, unknown>): number {
  const saturate = header.get("SATURATE");
  if (typeof saturate === "number" && Number.isFinite(saturate)) return saturate;
  if (bitpix === 8) return bzero + bscale * 255;
  if (bitpix === 16) return bzero + bscale * 32767;
  if (bitpix === 32) return bzero + bscale * 2147483647;
  // Floating-point data carry no saturation level; nothing is marked clipped.
  return Number.POSITIVE_INFINITY;
}

/** Formats sharp and exifr read straight from a file, so that a large frame never sits whole in a buffer. */
const PATH_DECODED_FORMATS: ReadonlySet<MediaFormat> = new Set(["jpeg", "png", "tiff"]);

export async function decodeFrame(input: Buffer | string, name: string): Promise<DecodedFrame> {
  // A path is sniffed from its first bytes; a raster is then decoded from the file
  // itself (reading a 144 MB TIFF into memory first costs more than decoding it).
  const sniffed = typeof input === "string" ? sniffFile(input, name) : undefined;
  if (typeof input === "string" && sniffed && PATH_DECODED_FORMATS.has(sniffed)) return decodeRasterFrame(input, name, sniffed);
  const bytes = typeof input === "string" ? await readFile(input) : input;
  const format = sniffed ?? sniffBytes(bytes, name);
  if (format === "fits") {
    const fits = await readFits(bytes, name);
    const { width, height, planes } = fits;
    if (planes.length !== 1 && planes.length !== 3) {
      throw new MediaError("unsupported", name, `NAXIS3 = ${planes.length}: a frame has 1 plane (mono) or 3 (red, green, blue), not ${planes.length}`);
    }
    const offset = readFitsOffset(fits.header);
    return {
      name,
      format,
      image: { width, height, planes },
      bitDepth: Math.abs(fits.bitpix),
      blackLevel: offset ?? 0,
      blackLevelSource: offset === undefined ? "none" : "file",
      whiteLevel: fitsWhiteLevel(fits.bitpix, fits.bzero, fits.bscale, fits.header),
      encoding: "linear",
      metadata: readFitsMetadata(fits.header, name),
    };
  }
  return decodeRasterFrame(bytes, name, format);
}

/** JPEG, PNG, TIFF and camera raw: pixels and EXIF, from bytes or from a file. */
async function decodeRasterFrame(input: Buffer | string, name: string, format: MediaFormat): Promise<DecodedFrame> {
  const isRaw = RAW_FORMATS.has(format);
  const [pixels, metadata] = await Promise.all([
    isRaw ? decodeCameraRaw(input, name) : decodeRaster(input, name),
    readExifMetadata(input, name),
  ]);
  const is8 = pixels.bitDepth === 8;
  return {
    name,
    format,
    image: pixels.image,
    bitDepth: pixels.bitDepth,
    blackLevel: 0,
    whiteLevel: is8 ? 255 : 65535,
    // LibRaw subtracts the raw file's own black level; a 16-bit raster says nothing of its offset.
    blackLevelSource: is8 ? undefined : isRaw ? "file" : "none",
    encoding: is8 ? "srgb8" : "linear",
    metadata,
  };
}

/**
 * The pipeline's view of a decoded frame. The exposure comes from the file or
 * from the photographer (`exposureOverrideS`); it is never guessed.
 */
export function toLinearFrame(decoded: DecodedFrame, exposureOverrideS?: number): LinearFrame {
  if (exposureOverrideS !== undefined && !(Number.isFinite(exposureOverrideS) && exposureOverrideS > 0)) {
    throw new MediaError("bad-argument", decoded.name, `the exposure time given, ${exposureOverrideS} s, is not a positive number of seconds`);
  }
  const exposureS = exposureOverrideS ?? decoded.metadata.exposureS;
  if (exposureS === undefined) throw new MediaError("missing-exposure", decoded.name, "no exposure time in the file; give one");
  return {
    name: decoded.name,
    image: decoded.image,
    exposureS,
    blackLevel: decoded.blackLevel,
    whiteLevel: decoded.whiteLevel,
    blackLevelSource: decoded.blackLevelSource,
    encoding: decoded.encoding,
    captureTimeMs: decoded.metadata.captureTimeMs,
  };
}
