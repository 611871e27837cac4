// Calibration with bias, dark and flat frames (the standard CCD reduction, e.g.
// Howell, "Handbook of CCD Astronomy", 2nd ed. 2006, chapter 4; ccdproc's
// subtract_bias, subtract_dark and flat_correct do the same steps):
//   calibrated = (raw - bias - dark current x t) / (flat / median(flat)).
// Masters are sigma-clipped medians (calibrate-combine.ts). Pure: typed arrays in
// and out, no I/O.
import { combineSigmaClippedMedian, computeMedian, type SigmaClipOptions } from "./calibrate-combine";
import { classifyDefects, type BadPixelCounts, type DefectThresholds, DEFAULT_DEFECT_THRESHOLDS } from "./calibrate-defects";
import { ImagingError } from "./errors";
import type { LinearFrame } from "./types";

export { combineSigmaClippedMedian, computeMedian, computeRobustStats, CCDPROC_CLIP_DEFAULTS, MAD_TO_SIGMA, type CombinedStack, type SigmaClipOptions } from "./calibrate-combine";
export { findBadPixelsFromBracket, DEFAULT_DEFECT_THRESHOLDS, type BadPixelCounts, type DefectThresholds } from "./calibrate-defects";

/**
 * Two exposures count as the same when they differ by at most 2 %: nominal shutter
 * speeds are rounded (1/3 s may be written 0.33 or 0.333), while the steps of a
 * bracket are a third of a stop (26 %) or more apart (common practice).
 */
export const EXPOSURE_MATCH_TOLERANCE = 0.02;
/** Normalised flat values below this are not divided by: the pixel is masked instead (common practice). */
export const MIN_FLAT_RESPONSE = 0.05;
/** A flat whose median signal is below this share of the range above its offset holds too little light to be a flat. */
export const MIN_FLAT_SIGNAL_FRACTION = 0.02;
/** A dark whose median signal above the bias passes this share of the range saw light. */
export const MAX_DARK_SIGNAL_FRACTION = 0.25;

export interface CalibrationFrames {
  bias: LinearFrame[];
  darks: LinearFrame[];
  flats: LinearFrame[];
}

export interface CalibrationOptions {
  /** Sigma clipping of every stack; ccdproc's defaults when absent (see SigmaClipOptions). */
  clip?: SigmaClipOptions;
  /** Thresholds of the bad-pixel map; DEFAULT_DEFECT_THRESHOLDS when absent. */
  defects?: Partial<DefectThresholds>;
}

export interface DarkMaster {
  exposureS: number;
  /** Offset-free dark current x exposureS when a bias master exists; otherwise the raw dark level (pedestal included). */
  planes: Float32Array[];
  biasSubtracted: boolean;
  frameNames: string[];
  rejectedFraction: number;
}

/** How the offset of a frame at some exposure is made from the masters. */
export type OffsetMethod = "matched-dark" | "scaled-dark" | "fitted-dark" | "unscaled-dark" | "bias";

export interface CalibrationSummary {
  bias?: { frameNames: string[]; rejectedFraction: number; medianDn: number };
  darks: { exposureS: number; frameNames: string[]; rejectedFraction: number; biasSubtracted: boolean; medianDn: number }[];
  /**
   * How darks reach other exposures: "scaled" (dark current proportional to time,
   * over the bias), "fitted" (per-pixel offset + rate from darks at two or more
   * exposures, no bias), "nearest-unscaled" (one dark exposure, no bias: the nearest
   * dark is used as it is) or "none".
   */
  darkModel: "scaled" | "fitted" | "nearest-unscaled" | "none";
  flat?: { frameNames: string[]; rejectedFraction: number; signalDn: number[]; minResponse: number; offsetMethods: (OffsetMethod | "none")[] };
  badPixels: BadPixelCounts & { fraction: number };
  thresholds: DefectThresholds;
}

export interface CalibrationMasters {
  width: number;
  height: number;
  planeCount: number;
  /** Bias master, DN, one array per plane. */
  bias?: Float32Array[];
  /** Dark masters sorted by exposure. */
  darks: DarkMaster[];
  /** Without a bias and with darks at two or more exposures: raw dark = offset + rate x t per pixel (least squares). */
  darkFit?: { offset: Float32Array[]; ratePerS: Float32Array[] };
  /** Flat master normalised to a median of 1 in each plane. */
  flat?: Float32Array[];
  /** 1 = hot, stuck or dead pixel (any plane). */
  badPixels: Uint8Array;
  summary: CalibrationSummary;
}

interface FrameShape { width: number; height: number; planeCount: number; source: string }

function requireCalibrationFrame(frame: LinearFrame, shape: FrameShape, kind: string): void {
  const { width, height, planes } = frame.image;
  if (frame.encoding !== "linear") {
    throw new ImagingError("bad-levels", `is an 8-bit encoded image; ${kind} frames must hold linear data (camera raw, 16-bit TIFF or FITS)`, frame.name);
  }
  if (width !== shape.width || height !== shape.height || planes.length !== shape.planeCount) {
    throw new ImagingError(
      "size-mismatch",
      `is ${width} x ${height} with ${planes.length} plane(s), but ${shape.source} is ${shape.width} x ${shape.height} with ${shape.planeCount}; calibration frames must come from the same sensor at the same size`,
      frame.name,
    );
  }
  planes.forEach((p, i) => {
    if (p.length !== width * height) throw new ImagingError("size-mismatch", `plane ${i} has ${p.length} values, expected ${width} x ${height}`, frame.name);
  });
}

function requireExposure(frame: LinearFrame, kind: string): void {
  if (!(Number.isFinite(frame.exposureS) && frame.exposureS > 0)) {
    throw new ImagingError("bad-exposure", `a ${kind} frame needs its exposure time in seconds, got ${String(frame.exposureS)}`, frame.name);
  }
}

function combinePlanes(frames: LinearFrame[], planeCount: number, clip: SigmaClipOptions | undefined, transform?: (frame: LinearFrame, plane: number) => Float32Array): { planes: Float32Array[]; rejectedFraction: number } {
  const planes: Float32Array[] = [];
  let rejected = 0;
  for (let c = 0; c < planeCount; c++) {
    const stack = frames.map((f) => (transform ? transform(f, c) : f.image.planes[c]));
    const r = combineSigmaClippedMedian(stack, clip);
    planes.push(r.combined);
    rejected += r.rejectedFraction;
  }
  return { planes, rejectedFraction: rejected / planeCount };
}

function sameExposure(a: number, b: number): boolean {
  return Math.abs(a - b) <= EXPOSURE_MATCH_TOLERANCE * Math.max(a, b);
}

/** Groups darks by exposure (within EXPOSURE_MATCH_TOLERANCE), each group named by its mean exposure. */
function groupByExposure(darks: LinearFrame[]): LinearFrame[][] {
  const groups: LinearFrame[][] = [];
  for (const d of [...darks].sort((a, b) => a.exposureS - b.exposureS)) {
    const g = groups.find((group) => sameExposure(group[0].exposureS, d.exposureS));
    if (g) g.push(d);
    else groups.push([d]);
  }
  return groups;
}

/** Per-pixel least squares of raw = offset + rate x t over dark masters at two or more exposures (no bias). */
function fitDarkModel(darks: DarkMaster[], planeCount: number, size: number): { offset: Float32Array[]; ratePerS: Float32Array[] } {
  const ts = darks.map((d) => d.exposureS);
  const n = ts.length;
  const tMean = ts.reduce((s, t) => s + t, 0) / n;
  const sxx = ts.reduce((s, t) => s + (t - tMean) ** 2, 0);
  const offset: Float32Array[] = [];
  const ratePerS: Float32Array[] = [];
  for (let c = 0; c < planeCount; c++) {
    const a = new Float32Array(size);
    const b = new Float32Array(size);
    for (let i = 0; i < size; i++) {
      let yMean = 0;
      for (let k = 0; k < n; k++) yMean += darks[k].planes[c][i];
      yMean /= n;
      let sxy = 0;
      for (let k = 0; k < n; k++) sxy += (ts[k] - tMean) * (darks[k].planes[c][i] - yMean);
      const rate = sxy / sxx;
      b[i] = rate;
      a[i] = yMean - rate * tMean;
    }
    offset.push(a);
    ratePerS.push(b);
  }
  return { offset, ratePerS };
}

function nearestDark(darks: DarkMaster[], exposureS: number): DarkMaster {
  let best = darks[0];
  for (const d of darks) if (Math.abs(Math.log(d.exposureS / exposureS)) < Math.abs(Math.log(best.exposureS / exposureS))) best = d;
  return best;
}

/**
 * The offset (everything a frame records without light) at an exposure, per plane, in order of preference:
 * a dark of the same exposure (plus the bias when the dark master is bias-subtracted);
 * the bias plus the nearest dark scaled by t / t_dark (dark current grows in proportion to time);
 * the per-pixel offset + rate fit (no bias, darks at two or more exposures);
 * the nearest dark as it is (no bias, one dark exposure: its pedestal is right, its dark current that of its own exposure);
 * the bias alone. Null without bias or darks.
 */
export function selectOffset(masters: Pick<CalibrationMasters, "bias" | "darks" | "darkFit" | "planeCount" | "width" | "height">, exposureS: number): { planes: Float32Array[]; method: OffsetMethod; darkExposureS?: number } | null {
  const { bias, darks, darkFit } = masters;
  const size = masters.width * masters.height;
  const matched = Number.isFinite(exposureS) && exposureS > 0 ? darks.find((d) => sameExposure(d.exposureS, exposureS)) : undefined;
  const addBias = (planes: Float32Array[], scale: number) =>
    planes.map((p, c) => {
      const out = new Float32Array(size);
      const b = bias?.[c];
      for (let i = 0; i < size; i++) out[i] = (b ? b[i] : 0) + scale * p[i];
      return out;
    });
  if (matched) return { planes: matched.biasSubtracted ? addBias(matched.planes, 1) : matched.planes.map((p) => p.slice()), method: "matched-dark", darkExposureS: matched.exposureS };
  if (bias && darks.length > 0 && exposureS > 0) {
    const d = nearestDark(darks, exposureS);
    return { planes: addBias(d.planes, exposureS / d.exposureS), method: "scaled-dark", darkExposureS: d.exposureS };
  }
  if (darkFit && exposureS > 0) {
    const planes = darkFit.offset.map((a, c) => {
      const out = new Float32Array(size);
      const r = darkFit.ratePerS[c];
      for (let i = 0; i < size; i++) out[i] = a[i] + r[i] * exposureS;
      return out;
    });
    return { planes, method: "fitted-dark" };
  }
  if (darks.length > 0) {
    const d = nearestDark(darks, exposureS > 0 ? exposureS : darks[0].exposureS);
    return { planes: d.planes.map((p) => p.slice()), method: "unscaled-dark", darkExposureS: d.exposureS };
  }
  if (bias) return { planes: bias.map((p) => p.slice()), method: "bias" };
  return null;
}

function medianOfPlanes(planes: Float32Array[]): number {
  return computeMedian(planes.length === 1 ? planes[0] : planes[0].map((_, i) => planes.reduce((s, p) => s + p[i], 0) / planes.length));
}

/**
 * Builds the masters from a bracket set's calibration frames: a bias master; dark
 * masters per exposure (bias-subtracted when a bias exists); a flat master (each
 * flat's offset subtracted, scaled to a median of 1 so that flats of different
 * brightness combine, combined, and normalised to a median of 1 in each plane); a
 * bad-pixel map; and a summary for the report. Raw values are used throughout: the
 * masters measure the offset, so the frames' own blackLevel is not needed.
 * Frames of another size or plane count than the first one, 8-bit frames, darks
 * without an exposure, a dark that saw light and a flat without light are refused,
 * naming the file.
 */
export function buildCalibrationMasters(frames: CalibrationFrames, options: CalibrationOptions = {}): CalibrationMasters {
  const all = [...frames.bias.map((f) => ["bias", f] as const), ...frames.darks.map((f) => ["dark", f] as const), ...frames.flats.map((f) => ["flat", f] as const)];
  if (all.length === 0) throw new ImagingError("too-few-frames", "no bias, dark or flat frames were given");
  const first = all[0][1];
  const shape: FrameShape = { width: first.image.width, height: first.image.height, planeCount: first.image.planes.length, source: `the first calibration frame (${first.name})` };
  if (!(Number.isInteger(shape.width) && Number.isInteger(shape.height) && shape.width > 0 && shape.height > 0 && (shape.planeCount === 1 || shape.planeCount === 3))) {
    throw new ImagingError("size-mismatch", `must be a positive whole size with 1 or 3 planes, got ${shape.width} x ${shape.height} with ${shape.planeCount}`, first.name);
  }
  for (const [kind, f] of all) requireCalibrationFrame(f, shape, kind);
  for (const f of frames.darks) requireExposure(f, "dark");
  const { width, height, planeCount } = shape;
  const size = width * height;
  const clip = options.clip;
  const thresholds: DefectThresholds = { ...DEFAULT_DEFECT_THRESHOLDS, ...options.defects };

  let bias: Float32Array[] | undefined;
  let biasSummary: CalibrationSummary["bias"];
  if (frames.bias.length > 0) {
    const r = combinePlanes(frames.bias, planeCount, clip);
    bias = r.planes;
    biasSummary = { frameNames: frames.bias.map((f) => f.name), rejectedFraction: r.rejectedFraction, medianDn: medianOfPlanes(bias) };
  }

  const darks: DarkMaster[] = [];
  for (const group of groupByExposure(frames.darks)) {
    const exposureS = group.reduce((s, f) => s + f.exposureS, 0) / group.length;
    // Subtracting the bias, the same constant for every frame at a pixel, commutes with clipping and the median.
    const r = combinePlanes(group, planeCount, clip);
    if (bias) r.planes.forEach((p, c) => { for (let i = 0; i < size; i++) p[i] -= bias[c][i]; });
    const master: DarkMaster = { exposureS, planes: r.planes, biasSubtracted: Boolean(bias), frameNames: group.map((f) => f.name), rejectedFraction: r.rejectedFraction };
    if (bias) {
      const signal = medianOfPlanes(master.planes);
      const range = group[0].whiteLevel - (biasSummary?.medianDn ?? 0);
      if (signal > MAX_DARK_SIGNAL_FRACTION * range) {
        throw new ImagingError("bad-levels", `reads ${Math.round(signal)} DN above the bias in the median: a dark frame must be taken with the optics covered`, group[0].name);
      }
    }
    darks.push(master);
  }
  const darkFit = !bias && darks.length >= 2 ? fitDarkModel(darks, planeCount, size) : undefined;
  const darkModel: CalibrationSummary["darkModel"] = darks.length === 0 ? "none" : bias ? "scaled" : darkFit ? "fitted" : "nearest-unscaled";
  const base = { width, height, planeCount, bias, darks, darkFit };

  let flat: Float32Array[] | undefined;
  let flatSummary: CalibrationSummary["flat"];
  let flatSignal: Float32Array[] | undefined;
  if (frames.flats.length > 0) {
    const offsetMethods: (OffsetMethod | "none")[] = [];
    const offsetFree = frames.flats.map((f) => {
      const offset = selectOffset(base, f.exposureS);
      offsetMethods.push(offset?.method ?? "none");
      const planes = f.image.planes.map((p, c) => {
        const out = new Float32Array(size);
        // Without bias or darks, the file's own black level is the best offset there is.
        const o = offset?.planes[c];
        for (let i = 0; i < size; i++) out[i] = p[i] - (o ? o[i] : f.blackLevel);
        return out;
      });
      const levels = planes.map((p) => computeMedian(p));
      const offsetLevel = offset ? medianOfPlanes(offset.planes) : f.blackLevel;
      const range = f.whiteLevel - offsetLevel;
      if (!(Math.min(...levels) > MIN_FLAT_SIGNAL_FRACTION * range)) {
        throw new ImagingError("bad-levels", `holds too little light for a flat (median ${Math.round(Math.min(...levels))} DN above the offset, at least ${Math.round(MIN_FLAT_SIGNAL_FRACTION * 100)} % of the range is needed)`, f.name);
      }
      return { planes, levels };
    });
    const r = combinePlanes(frames.flats, planeCount, clip, (f, c) => {
      const k = frames.flats.indexOf(f);
      const { planes, levels } = offsetFree[k];
      const scaled = new Float32Array(size);
      for (let i = 0; i < size; i++) scaled[i] = planes[c][i] / levels[c];
      return scaled;
    });
    const signalDn = Array.from({ length: planeCount }, (_, c) => offsetFree.reduce((s, o) => s + o.levels[c], 0) / offsetFree.length);
    flat = r.planes.map((p) => {
      const m = computeMedian(p);
      const out = new Float32Array(size);
      for (let i = 0; i < size; i++) out[i] = p[i] / m;
      return out;
    });
    flatSignal = flat.map((p, c) => p.map((v) => v * signalDn[c]));
    let minResponse = Infinity;
    for (const p of flat) for (let i = 0; i < size; i++) if (p[i] >= MIN_FLAT_RESPONSE && p[i] < minResponse) minResponse = p[i];
    flatSummary = { frameNames: frames.flats.map((f) => f.name), rejectedFraction: r.rejectedFraction, signalDn, minResponse, offsetMethods };
  }

  const defects = classifyDefects({ width, height, planeCount, bias, darks, darkFit, flat, flatSignal, frames }, thresholds);
  return {
    ...base,
    flat,
    badPixels: defects.map,
    summary: {
      bias: biasSummary,
      darks: darks.map((d) => ({ exposureS: d.exposureS, frameNames: d.frameNames, rejectedFraction: d.rejectedFraction, biasSubtracted: d.biasSubtracted, medianDn: medianOfPlanes(d.planes) })),
      darkModel,
      flat: flatSummary,
      badPixels: { ...defects.counts, fraction: defects.counts.total / size },
      thresholds,
    },
  };
}

/**
 * Calibrates one light frame: subtracts the offset for its exposure (selectOffset),
 * divides by the normalised flat, and hands on the masks. Returns new planes (the
 * input is not changed) with blackLevel 0 and blackLevelSource "calibrated" when a
 * bias or dark was used; whiteLevel is lowered by the median offset so that the
 * clip test (a share of the white level) keeps its meaning, and `saturated` marks
 * the pixels whose raw value reached the white level in any plane.
 *
 * With a flat but no bias or dark, the flat applies to the light above the frame's
 * own black level: (raw - black) / flat + black, and blackLevel, whiteLevel and
 * blackLevelSource stay the frame's own (the offset step still has to find it).
 * Pixels where the flat is below MIN_FLAT_RESPONSE are not divided and join the
 * bad-pixel map.
 */
export function calibrateLightFrame(frame: LinearFrame, masters: CalibrationMasters): LinearFrame {
  const { width, height, planeCount } = masters;
  requireCalibrationFrame(frame, { width, height, planeCount, source: "the calibration masters" }, "light");
  const size = width * height;
  const offset = selectOffset(masters, frame.exposureS);
  const badPixels = masters.badPixels.slice();
  if (frame.badPixels) for (let i = 0; i < size; i++) if (frame.badPixels[i]) badPixels[i] = 1;
  const saturated = new Uint8Array(size);
  if (frame.saturated) saturated.set(frame.saturated);
  for (const p of frame.image.planes) for (let i = 0; i < size; i++) if (p[i] >= frame.whiteLevel) saturated[i] = 1;
  const base = offset ? 0 : frame.blackLevel;
  const planes = frame.image.planes.map((p, c) => {
    const out = new Float32Array(size);
    const o = offset?.planes[c];
    const f = masters.flat?.[c];
    for (let i = 0; i < size; i++) {
      let v = p[i] - (o ? o[i] : frame.blackLevel);
      if (f) {
        if (f[i] >= MIN_FLAT_RESPONSE) v /= f[i];
        else badPixels[i] = 1;
      }
      out[i] = v + base;
    }
    return out;
  });
  const result: LinearFrame = { ...frame, image: { width, height, planes }, badPixels, saturated };
  if (offset) {
    // A good pixel's offset: hot pixels' large dark current would pull a mean up.
    const good = new Uint8Array(size);
    for (let i = 0; i < size; i++) good[i] = masters.badPixels[i] ? 0 : 1;
    const offsetLevel = Math.max(...offset.planes.map((p) => computeMedian(p, good)));
    result.blackLevel = 0;
    result.whiteLevel = frame.whiteLevel - offsetLevel;
    result.blackLevelSource = "calibrated";
    if (!(result.whiteLevel > 0)) throw new ImagingError("bad-levels", `the calibration offset (${Math.round(offsetLevel)} DN) reaches the white level (${frame.whiteLevel})`, frame.name);
  }
  return result;
}
