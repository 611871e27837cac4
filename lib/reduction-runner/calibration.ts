// The runner's calibration step: the bias, dark and flat files are decoded,
// combined into masters (lib/imaging/calibrate.ts) and applied to every light
// frame before anything else. Without calibration frames, sensor defects are
// found from the bracket itself (pixels that stay outliers at fixed sensor
// positions). Every refusal names the file.
import { basename } from "node:path";
import { buildCalibrationMasters, calibrateLightFrame, type CalibrationMasters, type CalibrationSummary } from "@/lib/imaging/calibrate";
import { combineBracketOutliers, findBadPixelsFromBracket, findFrameOutliers } from "@/lib/imaging/calibrate-defects";
import type { LinearFrame } from "@/lib/imaging/types";
import { decodeFrame } from "@/lib/media";
import { ReductionInputError } from "./errors";

export interface CalibrationFiles {
  bias: string[];
  dark: string[];
  flat: string[];
}

/** What the report says of the calibration. */
export interface CalibrationReport {
  /** "masters": from calibration frames; "bracket": defects found in the lights themselves; "none". */
  source: "masters" | "bracket" | "none";
  summary?: CalibrationSummary;
  /** Sensor defects masked in every frame. */
  badPixelCount: number;
}

/** A bias frame's exposure may be absent (the shortest the camera makes): it is then taken as a microsecond, which no master depends on. */
const BIAS_EXPOSURE_S = 1e-6;

async function decodeCalibration(path: string, kind: keyof CalibrationFiles, overrides: Map<string, number>): Promise<LinearFrame> {
  const name = basename(path);
  const decoded = await decodeFrame(path, name);
  const exposureS = overrides.get(name) ?? decoded.metadata.exposureS ?? (kind === "bias" ? BIAS_EXPOSURE_S : undefined);
  if (exposureS === undefined) {
    throw new ReductionInputError("missing-exposure", `${name}: this ${kind} frame has no exposure time in the file; give it, since ${kind === "dark" ? "darks are matched to lights by exposure" : "a flat's offset depends on it"}`);
  }
  return {
    name, image: decoded.image, exposureS, blackLevel: decoded.blackLevel, whiteLevel: decoded.whiteLevel,
    blackLevelSource: decoded.blackLevelSource, encoding: decoded.encoding, captureTimeMs: decoded.metadata.captureTimeMs,
  };
}

/** Decodes the calibration files and combines them into masters; undefined when none were given. */
export async function loadCalibrationMasters(files: CalibrationFiles | undefined, overrides: Map<string, number>): Promise<CalibrationMasters | undefined> {
  if (!files || files.bias.length + files.dark.length + files.flat.length === 0) return undefined;
  const decodeAll = (paths: string[], kind: keyof CalibrationFiles) => Promise.all(paths.map((p) => decodeCalibration(p, kind, overrides)));
  const [bias, darks, flats] = [await decodeAll(files.bias, "bias"), await decodeAll(files.dark, "dark"), await decodeAll(files.flat, "flat")];
  return buildCalibrationMasters({ bias, darks, flats });
}

/**
 * Applies the masters to the light frames (in place in the list), or, without
 * masters, masks the defects the bracket itself shows (findBadPixelsFromBracket;
 * `outliers[i]`, when given, is frame i's part of that search, made already, in
 * a worker thread say). Linear frames only: an 8-bit bracket is returned as it is.
 */
export function calibrateBracket(frames: LinearFrame[], masters: CalibrationMasters | undefined, onCalibrated?: (frame: LinearFrame) => void, outliers: readonly (Uint32Array | undefined)[] = []): CalibrationReport {
  if (frames.length === 0 || frames[0].encoding !== "linear") return { source: "none", badPixelCount: 0 };
  if (masters) {
    frames.forEach((f, i) => {
      frames[i] = calibrateLightFrame(f, masters);
      onCalibrated?.(frames[i]);
    });
    return { source: "masters", summary: masters.summary, badPixelCount: countSet(masters.badPixels) };
  }
  const { width, height } = frames[0].image;
  const badPixels = outliers.length === 0 ? findBadPixelsFromBracket(frames) : combineBracketOutliers(frames.map((f, i) => outliers[i] ?? findFrameOutliers(f)), width * height);
  const count = countSet(badPixels);
  if (count > 0) frames.forEach((f, i) => { frames[i] = { ...f, badPixels }; });
  return { source: count > 0 ? "bracket" : "none", badPixelCount: count };
}

function countSet(mask: Uint8Array): number {
  let n = 0;
  for (const v of mask) n += v;
  return n;
}
