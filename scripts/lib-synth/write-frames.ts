// One file per frame and format. Every format is normalized so that decodeFrame
// gives the pipeline consistent levels:
// - TIFF: 16-bit LZW (sharp writes 8 bits unless a compression is named), black
//   subtracted and white mapped to 65535, as LibRaw does for raws;
// - JPEG: the same linear value, sRGB-encoded (IEC 61966-2-1) to 8 bits, with
//   capture EXIF written by ExifTool;
// - FITS: BITPIX 16 with BZERO 32768, black subtracted, SATURATE at white - black;
// - DNG: the raw RGGB mosaic with its own BlackLevel and WhiteLevel.
import { writeFile } from "node:fs/promises";
import { join } from "node:path";
import { encodeSrgb } from "@/lib/imaging/srgb";
import { encodeDng, mosaicRggb } from "@/lib/media/dng-write";
import { formatExifDateTime, writeCaptureExif } from "@/lib/media/exif-write";
import { writeFitsFile } from "@/lib/media/fits-write";
import { createSharp } from "@/lib/media/sharp-setup";
import { SYNTH_F_NUMBER, SYNTH_ISO, SYNTH_MAKE, SYNTH_MODEL, type SynthBracket, type SynthBracketFrame, type SynthFormat } from "./types";

export const SYNTH_EXTENSIONS: Record<SynthFormat, string> = { tiff: ".tif", jpeg: ".jpg", fits: ".fits", dng: ".dng" };

function toInterleaved<T extends Uint8Array | Uint16Array>(planes: ArrayLike<number>[], count: number, out: T, map: (dn: number) => number): T {
  const channels = planes.length;
  for (let i = 0; i < count; i++) for (let c = 0; c < channels; c++) out[i * channels + c] = map(planes[c][i]);
  return out;
}

/** (dn - black) / (white - black), clamped to [0, 1]. */
function normalize(bracket: SynthBracket): (dn: number) => number {
  const range = bracket.whiteLevel - bracket.blackLevel;
  return (dn) => Math.min(1, Math.max(0, (dn - bracket.blackLevel) / range));
}

/** The offset a file of this frame keeps in its data: none when the writer subtracts it. */
function keptOffset(bracket: SynthBracket, frame: SynthBracketFrame): number {
  return (bracket.offsetInFiles ?? "subtracted") === "subtracted" ? 0 : (frame.blackLevel ?? bracket.blackLevel);
}

async function writeTiffFrame(bracket: SynthBracket, frame: SynthBracketFrame, path: string): Promise<void> {
  const { width, height } = bracket;
  const kept = keptOffset(bracket, frame);
  const black = frame.blackLevel ?? bracket.blackLevel;
  const range = bracket.whiteLevel - bracket.blackLevel;
  // A pedestal kept in the file stays at its DN, on the same 16-bit scale as the light.
  const level = (dn: number) => Math.min(1, Math.max(0, (dn - black + kept) / range));
  const channels = frame.planes.length as 1 | 3;
  const data = toInterleaved(frame.planes, width * height, new Uint16Array(width * height * channels), (dn) => Math.round(level(dn) * 65535));
  await createSharp(data, { raw: { width, height, channels } })
    .toColourspace(channels === 1 ? "grey16" : "rgb16")
    .tiff({ compression: "lzw", predictor: "horizontal" })
    .toFile(path);
}

async function writeJpegFrame(bracket: SynthBracket, frame: SynthBracketFrame, path: string, offsetMinutes: number): Promise<void> {
  const { width, height } = bracket;
  const level = normalize(bracket);
  const channels = frame.planes.length as 1 | 3;
  const data = toInterleaved(frame.planes, width * height, new Uint8Array(width * height * channels), (dn) => Math.round(encodeSrgb(level(dn)) * 255));
  const pipeline = createSharp(data, { raw: { width, height, channels } });
  await (channels === 1 ? pipeline.toColourspace("b-w") : pipeline).jpeg({ quality: 95, chromaSubsampling: "4:4:4" }).toFile(path);
  await writeCaptureExif(path, {
    exposureS: frame.exposureS,
    fNumber: SYNTH_F_NUMBER,
    iso: SYNTH_ISO,
    ...formatExifDateTime(frame.captureTimeMs, offsetMinutes),
    make: SYNTH_MAKE,
    model: SYNTH_MODEL,
  });
}

async function writeFitsFrame(bracket: SynthBracket, frame: SynthBracketFrame, path: string): Promise<void> {
  const { width, height, blackLevel, whiteLevel } = bracket;
  const black = frame.blackLevel ?? blackLevel;
  const kept = keptOffset(bracket, frame);
  const planes = frame.planes.map((plane) => Uint16Array.from(plane, (dn) => Math.max(0, Math.min(65535, Math.round(dn - black + kept)))));
  const hasTime = bracket.hasCaptureTimes ?? true;
  await writeFitsFile(path, {
    width,
    height,
    planes,
    cards: [
      { key: "EXPTIME", value: frame.exposureS, comment: "exposure time in seconds" },
      ...(hasTime ? [{ key: "DATE-OBS", value: new Date(frame.captureTimeMs).toISOString().replace("Z", ""), comment: "UTC start of the exposure" }] : []),
      { key: "INSTRUME", value: `${SYNTH_MAKE} ${SYNTH_MODEL}`, comment: "synthetic data, not an observation" },
      { key: "SATURATE", value: whiteLevel - black + kept, comment: "DN at which pixels clip" },
      ...(bracket.offsetInFiles === "card" ? [{ key: "BLKLEVEL", value: kept, comment: "sensor offset (bias pedestal) in the data, DN" }] : []),
      { key: "ISOSPEED", value: SYNTH_ISO },
    ],
    history: [kept > 0 ? `Synthetic frame: the sensor offset (${kept} DN) stays in the data.` : `Synthetic frame: sensor black level ${black} DN subtracted before writing.`],
  });
}

async function writeDngFrame(bracket: SynthBracket, frame: SynthBracketFrame, path: string, offsetMinutes: number): Promise<void> {
  const { width, height, blackLevel, whiteLevel } = bracket;
  const mosaic = mosaicRggb(frame.planes, width, height);
  const bytes = encodeDng(
    {
      width,
      height,
      mosaic,
      blackLevel,
      whiteLevel,
      exposureS: frame.exposureS,
      fNumber: SYNTH_F_NUMBER,
      iso: SYNTH_ISO,
      ...formatExifDateTime(frame.captureTimeMs, offsetMinutes),
      make: SYNTH_MAKE,
      model: SYNTH_MODEL,
    },
    path,
  );
  await writeFile(path, bytes);
}

export interface WrittenFrame {
  name: string;
  exposureS: number;
  captureTimeMs: number;
  files: Partial<Record<SynthFormat, string>>;
}

/**
 * Write every frame in every format into `outDir`. EXIF clocks are written in
 * the zone `offsetMinutes` east of UTC (with OffsetTimeOriginal) so that readers
 * must apply the offset to get UTC back.
 */
export async function writeBracketFrames(bracket: SynthBracket, outDir: string, formats: readonly SynthFormat[], offsetMinutes = 0): Promise<WrittenFrame[]> {
  if (formats.includes("dng") && (bracket.width % 2 || bracket.height % 2)) {
    throw new Error(`DNG needs an even width and height for its 2x2 Bayer pattern, not ${bracket.width} x ${bracket.height}`);
  }
  const written: WrittenFrame[] = [];
  for (const frame of bracket.frames) {
    const files: Partial<Record<SynthFormat, string>> = {};
    for (const format of formats) {
      const file = `${frame.name}${SYNTH_EXTENSIONS[format]}`;
      const path = join(outDir, file);
      if (format === "tiff") await writeTiffFrame(bracket, frame, path);
      else if (format === "jpeg") await writeJpegFrame(bracket, frame, path, offsetMinutes);
      else if (format === "fits") await writeFitsFrame(bracket, frame, path);
      else await writeDngFrame(bracket, frame, path, offsetMinutes);
      files[format] = file;
    }
    written.push({ name: frame.name, exposureS: frame.exposureS, captureTimeMs: frame.captureTimeMs, files });
  }
  return written;
}
