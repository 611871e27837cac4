// A composite: two or more finished masters of one eclipse (a long and a short
// lens, or several observers), reprojected onto one helioprojective grid
// (composite-geometry.ts), their WCS refined by phase correlation of the corona
// where they overlap, cross-calibrated by a robust fit of brightness in the
// overlap, and merged with inverse-variance weights that fall smoothly to zero at
// each input's field edge, inside its own lunar disk and where its plate scale is
// too coarse (composite-weights.ts).
//
// Units: the composite is in the reference input's DN/s per composite pixel.
// The reference is the finest input; the grid takes its plate scale, so its
// values pass unchanged. Another input's values are first carried to the
// composite's pixel area, times (s_out / s_in)^2, and then multiplied by its
// factor (per plane), which then holds only the cameras' difference in gain and
// spectral response.
import { blurGaussian, blurGaussianMasked } from "./blur";
import { ImagingError } from "./errors";
import { correlatePhase } from "./fft";
import { applyPixelMap, chooseCompositeGrid, helioToPixel, mapBetweenGrids, type HelioGrid, type PixelMap } from "./composite-geometry";
import { computeEdgeTaper, computeEdgeWeight, computeMoonWeight, computeNeededScale, computeResolutionWeight, createMoonMask, lookUpNoise, measureNoiseProfile, type MoonMask, type NoiseProfile } from "./composite-weights";
import { SERIAL_PLANE_RUNNER, type PlaneRunner } from "./plane-runner";
import { warpPlanes, type ResampleKernel, type WarpTarget } from "./resample";
import type { AffineSimilarity } from "./similarity";

export interface CompositeInput {
  name: string;
  /** Radiance planes (1 or 3), the master's units (DN/s per its pixel). */
  planes: Float32Array[];
  grid: HelioGrid;
  /** The lunar disk the master shows, its pixels. */
  moon: { x: number; y: number; radiusPx: number };
  /** Apparent solar radius, arcsec. */
  rsunArcsec: number;
}

export interface CompositeOptions {
  /** The composite's plate scale; default the finest input's. */
  scaleArcsecPerPx?: number;
  /** Refine each input's WCS by phase correlation against the reference; default true. */
  refine?: boolean;
  /** Composite rows merged at a time (memory); default 128. */
  bandRows?: number;
  /**
   * Allocates the composite's planes (radiance and noise variance), so that the
   * renditions' kernels may run on its threads (renditions.ts); plain arrays when absent.
   */
  runner?: PlaneRunner;
  onProgress?: (stage: string, fraction: number) => void;
}

export interface CompositeRefinement {
  /**
   * Where the input's WCS put the true Sun's centre (the point its corona
   * says), arcsec west and north of its own (0, 0): the WCS error measured, and
   * taken out when applied.
   */
  lonArcsec: number;
  latArcsec: number;
  /** Height of the correlation peak (1 a perfect match). */
  peak: number;
  applied: boolean;
  note?: string;
}

export interface CompositeInputReport {
  name: string;
  isReference: boolean;
  scaleArcsecPerPx: number;
  solarNorthDeg: number;
  /** Radius of the largest circle about the Sun inside the field, and the farthest corner, solar radii. */
  fieldR: { inner: number; outer: number };
  /** Multiplies the input (after the pixel-area factor) into the reference's units, per plane. */
  factors: number[];
  /** Robust spread (1.4826 MAD) of ln(reference / input) per plane in the overlap: how well one factor fits. */
  factorSpreads: number[];
  overlapSamples: number;
  refinement: CompositeRefinement;
  /** This input's share of all weight over the composite. */
  weightShare: number;
}

export interface CompositeResult {
  grid: HelioGrid;
  radiance: Float32Array[];
  /** Inputs that contribute at each pixel. */
  coverage: Uint16Array;
  /**
   * Noise variance of the luminance at each pixel (the composite's units
   * squared), from the inputs' measured noise and their weights: the structure
   * filter's SNR weighting needs it, since an estimate from the image itself
   * misses noise that reprojection has spread over neighbouring pixels.
   */
  noiseVariance: Float32Array;
  /** Per input, its share of the weight at each pixel, 0..255. */
  shares: Uint8Array[];
  inputs: CompositeInputReport[];
  sunRadiusPx: number;
  /** A disk about the Sun's centre that holds every input's lunar disk, composite pixels. */
  moonCover: { x: number; y: number; radiusPx: number };
  timingsMs: Record<string, number>;
}

const SURVEY_SIZE_PX = 512;
/** Shifts the refinement accepts: a WCS off by more than this is a wrong input, not an error to correct. */
const MAX_REFINEMENT_R = 0.05;
const MIN_REFINEMENT_PEAK = 0.02;
/** The overlap's samples must stand this far above their noise to count in the brightness fit. */
const MIN_FIT_SNR = 10;
const MIN_FIT_SAMPLES = 200;

function requireInputs(inputs: CompositeInput[]): number {
  if (inputs.length < 2) throw new ImagingError("too-few-frames", `a composite needs at least two masters, got ${inputs.length}`);
  const channels = Math.max(...inputs.map((m) => m.planes.length));
  for (const m of inputs) {
    const n = m.grid.width * m.grid.height;
    if (m.planes.length !== 1 && m.planes.length !== 3) throw new ImagingError("bad-parameter", `${m.name}: a master has 1 or 3 planes, not ${m.planes.length}`);
    if (m.planes.some((p) => p.length !== n)) throw new ImagingError("size-mismatch", `${m.name}: its planes are not ${m.grid.width} x ${m.grid.height}`);
    if (!(m.grid.scaleArcsecPerPx > 0) || !(m.rsunArcsec > 0) || !(m.moon.radiusPx > 0)) throw new ImagingError("bad-parameter", `${m.name}: its plate scale, solar radius and lunar disk must be positive`);
  }
  return channels;
}

/** The similarity warpPlanes takes for a map between two unmirrored grids (both helioprojective, rows down). */
function toSimilarity(m: PixelMap, name: string): AffineSimilarity {
  const scale = Math.hypot(m.a, m.d);
  if (Math.abs(m.e - m.a) > 1e-9 * scale || Math.abs(m.d + m.b) > 1e-9 * scale) throw new ImagingError("bad-parameter", `${name}: its WCS is mirrored against the composite's`);
  return { a: m.a, b: m.d, tx: m.c, ty: m.f };
}

/** Mean of the planes (the luminance the weights and the refinement use). */
function meanPlane(planes: Float32Array[]): Float32Array {
  if (planes.length === 1) return planes[0];
  const out = new Float32Array(planes[0].length);
  for (const p of planes) for (let i = 0; i < out.length; i++) out[i] += p[i] / planes.length;
  return out;
}

interface Prepared {
  input: CompositeInput;
  /** The grid after refinement. */
  grid: HelioGrid;
  noise: NoiseProfile;
  moonMask: MoonMask;
  taper: { marginPx: number; taperPx: number };
  /** (s_out / s_in)^2: its values per composite pixel's area. */
  areaFactor: number;
  factors: number[];
}

function describeField(g: HelioGrid, rsunArcsec: number): { inner: number; outer: number } {
  const inner = Math.min(g.sunX + 0.5, g.sunY + 0.5, g.width - 0.5 - g.sunX, g.height - 0.5 - g.sunY);
  const outer = Math.hypot(Math.max(g.sunX + 0.5, g.width - 0.5 - g.sunX), Math.max(g.sunY + 0.5, g.height - 0.5 - g.sunY));
  const toR = (px: number) => Number(((px * g.scaleArcsecPerPx) / rsunArcsec).toFixed(3));
  return { inner: toR(Math.max(0, inner)), outer: toR(outer) };
}

/**
 * An input's planes on the survey grid, each blurred first to `resolutionArcsec`
 * (at least the survey's pixel): two inputs compared at one resolution, so that
 * the coarser one's pixels do not stand against the finer one's detail.
 */
function sampleOnSurvey(planes: Float32Array[], from: HelioGrid, survey: HelioGrid, name: string, resolutionArcsec: number): WarpTarget {
  const sigma = (0.5 * Math.max(resolutionArcsec, survey.scaleArcsecPerPx)) / from.scaleArcsecPerPx;
  const smooth = sigma >= 0.5 ? planes.map((p) => blurGaussian(p, from.width, from.height, sigma)) : planes;
  return warpPlanes(smooth, from.width, from.height, toSimilarity(mapBetweenGrids(survey, from), name), { width: survey.width, height: survey.height }, "bilinear");
}

/** Survey pixels where an input is fully weighted: inside its field's taper and clear of its Moon. */
function markClear(p: Prepared, survey: HelioGrid, covered: Uint8Array): Uint8Array {
  const m = mapBetweenGrids(survey, p.grid);
  const out = new Uint8Array(survey.width * survey.height);
  for (let y = 0; y < survey.height; y++) {
    for (let x = 0; x < survey.width; x++) {
      const i = y * survey.width + x;
      if (!covered[i]) continue;
      const q = applyPixelMap(m, x, y);
      if (computeEdgeWeight(q.x, q.y, p.grid.width, p.grid.height, p.taper) < 1 || computeMoonWeight(p.moonMask, q.x, q.y) < 1) continue;
      out[i] = 1;
    }
  }
  return out;
}

/**
 * High-passed log luminance in a smooth window, for the phase correlation. The
 * low pass is the masked blur (blurGaussianMasked: only valid pixels count), so
 * the window's edge leaves no step in the high pass that both inputs share.
 */
function prepareForCorrelation(lum: Float32Array, valid: Uint8Array, window: Float32Array, size: number): Float64Array {
  const logs = new Float32Array(lum.length);
  for (let i = 0; i < lum.length; i++) logs[i] = valid[i] && lum[i] > 0 ? Math.log(lum[i]) : 0;
  const low = blurGaussianMasked(logs, valid, size, size, 4);
  const out = new Float64Array(lum.length);
  let sum = 0, weight = 0;
  for (let i = 0; i < lum.length; i++) {
    if (!(window[i] > 0) || !(lum[i] > 0)) continue;
    out[i] = (logs[i] - low[i]) * window[i];
    sum += out[i];
    weight += window[i];
  }
  const mean = weight > 0 ? sum / weight : 0;
  for (let i = 0; i < lum.length; i++) out[i] -= mean * window[i];
  return out;
}

/** Moves a grid's Sun centre so that it shows at world W what it showed at W + (dLon, dLat). */
function shiftGrid(g: HelioGrid, dLonArcsec: number, dLatArcsec: number): HelioGrid {
  const o = helioToPixel(g, 0, 0), p = helioToPixel(g, dLonArcsec, dLatArcsec);
  return { ...g, sunX: g.sunX + (p.x - o.x), sunY: g.sunY + (p.y - o.y) };
}

/** Phase correlation of an input against the reference on the survey grid: where the input's corona sits against its WCS. */
function refineAgainst(ref: Prepared, refSurvey: WarpTarget, p: Prepared, survey: HelioGrid, rsunSurveyPx: number): CompositeRefinement {
  let total = { lon: 0, lat: 0 };
  let peak = 0;
  for (let pass = 0; pass < 2; pass++) {
    const grid = shiftGrid(p.grid, total.lon, total.lat);
    const mine = sampleOnSurvey([meanPlane(p.input.planes)], grid, survey, p.input.name, 0);
    const clearRef = markClear(ref, survey, refSurvey.covered);
    const clearMine = markClear({ ...p, grid }, survey, mine.covered);
    const both = new Uint8Array(survey.width * survey.height);
    for (let i = 0; i < both.length; i++) both[i] = clearRef[i] && clearMine[i] ? 1 : 0;
    // A window that rises from 0 at the common sky's edge to 1 about 8 px inside it.
    const window = blurGaussian(Float32Array.from(both), survey.width, survey.height, 4);
    for (let i = 0; i < both.length; i++) window[i] = both[i] ? Math.max(0, 2 * window[i] - 1) : 0;
    const a = prepareForCorrelation(meanPlane(refSurvey.planes), both, window, survey.width);
    const b = prepareForCorrelation(mine.planes[0], both, window, survey.width);
    const found = correlatePhase(a, b, survey.width, survey.height, 1, MAX_REFINEMENT_R * rsunSurveyPx);
    peak = found.peak;
    if (!(peak >= MIN_REFINEMENT_PEAK)) {
      return { lonArcsec: 0, latArcsec: 0, peak, applied: false, note: `not refined: the corona of this input and the reference correlate too weakly (peak ${peak.toFixed(3)})` };
    }
    // b(x) = a(x - d): the input shows at survey pixel x what the reference shows at x - d.
    total = { lon: total.lon + survey.scaleArcsecPerPx * found.dx, lat: total.lat - survey.scaleArcsecPerPx * found.dy };
  }
  return { lonArcsec: total.lon, latArcsec: total.lat, peak, applied: true };
}

/** Robust brightness factor per plane of an input against the reference, from their overlap on the survey grid. */
function fitFactors(ref: Prepared, p: Prepared, survey: HelioGrid, channels: number): { factors: number[]; spreads: number[]; samples: number } {
  const resolution = Math.max(ref.grid.scaleArcsecPerPx, p.grid.scaleArcsecPerPx);
  const refSurvey = sampleOnSurvey(ref.input.planes, ref.grid, survey, ref.input.name, resolution);
  const mine = sampleOnSurvey(p.input.planes, p.grid, survey, p.input.name, resolution);
  const clearRef = markClear(ref, survey, refSurvey.covered);
  const clearMine = markClear(p, survey, mine.covered);
  const rsunPx = ref.input.rsunArcsec / survey.scaleArcsecPerPx;
  const lumRef = meanPlane(refSurvey.planes), lumMine = meanPlane(mine.planes);
  // The blur lowers each input's noise by about its pixels per blurred pixel's side.
  const cutRef = (r: number) => (MIN_FIT_SNR * lookUpNoise(ref.noise, r) * ref.grid.scaleArcsecPerPx) / Math.max(resolution, survey.scaleArcsecPerPx);
  const cutMine = (r: number) => (MIN_FIT_SNR * lookUpNoise(p.noise, r) * p.grid.scaleArcsecPerPx) / Math.max(resolution, survey.scaleArcsecPerPx);
  const logs: number[][] = Array.from({ length: channels }, () => []);
  for (let y = 0; y < survey.height; y++) {
    for (let x = 0; x < survey.width; x++) {
      const i = y * survey.width + x;
      if (!clearRef[i] || !clearMine[i]) continue;
      const r = Math.hypot(x - survey.sunX, y - survey.sunY) / rsunPx;
      if (r < 1.05 || !(lumRef[i] > cutRef(r)) || !(lumMine[i] > cutMine(r))) continue;
      for (let c = 0; c < channels; c++) {
        const vr = refSurvey.planes[Math.min(c, refSurvey.planes.length - 1)][i];
        const vm = mine.planes[Math.min(c, mine.planes.length - 1)][i] * p.areaFactor;
        if (vr > 0 && vm > 0) logs[c].push(Math.log(vr / vm));
      }
    }
  }
  const samples = Math.min(...logs.map((l) => l.length));
  if (samples < MIN_FIT_SAMPLES) {
    throw new ImagingError("bad-parameter", `${p.input.name} and ${ref.input.name} share too little well-exposed corona to match their brightness (${samples} survey pixels, at least ${MIN_FIT_SAMPLES} needed): their fields or their Moons leave no common sky`);
  }
  const factors: number[] = [], spreads: number[] = [];
  for (const l of logs) {
    l.sort((u, v) => u - v);
    const median = l[l.length >> 1];
    const dev = l.map((v) => Math.abs(v - median)).sort((u, v) => u - v);
    factors.push(Math.exp(median));
    spreads.push(1.4826 * dev[dev.length >> 1]);
  }
  return { factors, spreads, samples };
}

/**
 * Composes the masters. The reference is the finest input (the first of equal
 * scale); every other input is refined against it (unless options.refine is
 * false) and its factors are fitted against it.
 */
export function composeMasters(inputs: CompositeInput[], options: CompositeOptions = {}): CompositeResult {
  const clock = performance.now();
  const timingsMs: Record<string, number> = {};
  const progress = (stage: string, f: number) => options.onProgress?.(stage, f);
  const channels = requireInputs(inputs);
  const grid = chooseCompositeGrid(inputs.map((m) => m.grid), options.scaleArcsecPerPx);
  const refIndex = inputs.reduce((best, m, k) => (m.grid.scaleArcsecPerPx < inputs[best].grid.scaleArcsecPerPx ? k : best), 0);
  const rsunArcsec = inputs[refIndex].rsunArcsec;
  const sunRadiusPx = rsunArcsec / grid.scaleArcsecPerPx;

  progress("measure", 0);
  const prepared: Prepared[] = inputs.map((input, k) => {
    const g = input.grid;
    const moonMask = createMoonMask(input.moon);
    const noise = measureNoiseProfile(meanPlane(input.planes), g.width, g.height, { x: g.sunX, y: g.sunY, radiusPx: input.rsunArcsec / g.scaleArcsecPerPx }, moonMask);
    progress("measure", (k + 1) / inputs.length);
    return { input, grid: g, noise, moonMask, taper: computeEdgeTaper(g.width, g.height), areaFactor: (grid.scaleArcsecPerPx / g.scaleArcsecPerPx) ** 2, factors: Array(channels).fill(1) };
  });
  timingsMs.measure = performance.now() - clock;

  // The survey grid: 512 px square about the Sun, over the reference's field out to 3 solar radii.
  const ref = prepared[refIndex];
  const refField = describeField(ref.grid, rsunArcsec);
  const spanArcsec = Math.max(1.6, Math.min(3, refField.outer)) * rsunArcsec;
  const survey: HelioGrid = { width: SURVEY_SIZE_PX, height: SURVEY_SIZE_PX, sunX: SURVEY_SIZE_PX / 2, sunY: SURVEY_SIZE_PX / 2, scaleArcsecPerPx: (2 * spanArcsec) / SURVEY_SIZE_PX, solarNorthDeg: 0 };
  const refSurvey = sampleOnSurvey([meanPlane(ref.input.planes)], ref.grid, survey, ref.input.name, 0);

  const reports: CompositeInputReport[] = [];
  let lap = performance.now();
  for (const [k, p] of prepared.entries()) {
    const report: CompositeInputReport = {
      name: p.input.name, isReference: k === refIndex, scaleArcsecPerPx: p.grid.scaleArcsecPerPx, solarNorthDeg: p.grid.solarNorthDeg,
      fieldR: describeField(p.grid, p.input.rsunArcsec), factors: Array(channels).fill(1), factorSpreads: Array(channels).fill(0), overlapSamples: 0,
      refinement: { lonArcsec: 0, latArcsec: 0, peak: 1, applied: false, note: k === refIndex ? "the reference" : "not refined: refinement was switched off" }, weightShare: 0,
    };
    if (k !== refIndex) {
      if (options.refine !== false) {
        report.refinement = refineAgainst(ref, refSurvey, p, survey, rsunArcsec / survey.scaleArcsecPerPx);
        if (report.refinement.applied) p.grid = shiftGrid(p.grid, report.refinement.lonArcsec, report.refinement.latArcsec);
      }
      const fit = fitFactors(ref, p, survey, channels);
      p.factors = fit.factors;
      report.factors = fit.factors;
      report.factorSpreads = fit.spreads;
      report.overlapSamples = fit.samples;
    }
    reports.push(report);
    progress("match", (k + 1) / prepared.length);
  }
  timingsMs.match = performance.now() - lap;

  lap = performance.now();
  const merged = mergeOnGrid(prepared, grid, channels, sunRadiusPx, options.bandRows ?? 128, (f) => progress("merge", f), options.runner ?? SERIAL_PLANE_RUNNER);
  timingsMs.merge = performance.now() - lap;
  const totalWeight = merged.weightTotals.reduce((s, w) => s + w, 0);
  reports.forEach((r, k) => (r.weightShare = totalWeight > 0 ? merged.weightTotals[k] / totalWeight : 0));

  // A disk about the Sun holding every input's Moon, for the renditions' filter.
  let moonReach = 0;
  for (const p of prepared) {
    const m = mapBetweenGrids(p.grid, grid);
    const c = applyPixelMap(m, p.moonMask.x, p.moonMask.y);
    const rPx = (p.moonMask.radiusPx * p.grid.scaleArcsecPerPx) / grid.scaleArcsecPerPx;
    moonReach = Math.max(moonReach, Math.hypot(c.x - grid.sunX, c.y - grid.sunY) + rPx);
  }
  timingsMs.total = performance.now() - clock;
  return {
    grid, radiance: merged.radiance, coverage: merged.coverage, noiseVariance: merged.variance, shares: merged.shares, inputs: reports, sunRadiusPx,
    moonCover: { x: grid.sunX, y: grid.sunY, radiusPx: moonReach }, timingsMs,
  };
}

/** The inputs' pixels on the composite's grid, band by band: weighted sums, coverage and each input's share. */
function mergeOnGrid(prepared: Prepared[], grid: HelioGrid, channels: number, sunRadiusPx: number, bandRows: number, onProgress: (f: number) => void, runner: PlaneRunner) {
  const { width, height } = grid;
  const n = width * height;
  const sums = Array.from({ length: channels }, () => runner.float32(n));
  const weightSum = new Float32Array(n);
  // Sum of w^2 times each input's pixel variance: the composite's noise variance, once divided by the weight sum squared.
  const variance = runner.float32(n);
  const coverage = new Uint16Array(n);
  const shares = prepared.map(() => new Uint8Array(n));
  const weightTotals = prepared.map(() => 0);
  const rows = Math.max(1, Math.min(height, Math.floor(bandRows)));
  const maps = prepared.map((p) => mapBetweenGrids(grid, p.grid));
  const similarities = prepared.map((p, k) => toSimilarity(maps[k], p.input.name));
  const scratch = prepared.map((p) => ({ planes: p.input.planes.map(() => new Float32Array(rows * width)), covered: new Uint8Array(rows * width) }));
  const weights = prepared.map(() => new Float32Array(rows * width));
  // Per input, its weight against distance: inverse noise variance, and apart from it the resolution taper.
  const stepR = 0.005;
  const rTop = Math.hypot(width, height) / sunRadiusPx + 1;
  const stepCount = Math.ceil(rTop / stepR) + 2;
  // Noise of an input's value at a composite pixel (its pixel's noise, in the composite's units), and
  // that times the input's pixels per composite pixel's side: its noise per unit of sky area.
  const pixelVariance = prepared.map((p) => {
    const lum = p.factors.reduce((s, f) => s + f, 0) / p.factors.length;
    return Float64Array.from({ length: stepCount }, (_, j) => (lum * p.areaFactor * lookUpNoise(p.noise, j * stepR)) ** 2);
  });
  const inverseVariance = prepared.map((p, k) => {
    const ratio = p.grid.scaleArcsecPerPx / grid.scaleArcsecPerPx;
    return pixelVariance[k].map((v) => 1 / (v * ratio * ratio));
  });
  const resolution = prepared.map((p) => Float64Array.from({ length: stepCount }, (_, j) => computeResolutionWeight(p.grid.scaleArcsecPerPx, computeNeededScale(grid.scaleArcsecPerPx, j * stepR))));
  // The inputs finer than each one: where they are all absent, its resolution taper is lifted.
  const finer = prepared.map((p) => prepared.flatMap((q, k) => (q.grid.scaleArcsecPerPx < p.grid.scaleArcsecPerPx ? [k] : [])));
  // Each input's place in the band (edge and Moon tapers), before noise and resolution.
  const reach = prepared.map(() => new Float32Array(rows * width));
  // Each band pixel's step in r (the tables' index), shared by the inputs.
  const steps = new Int32Array(rows * width);
  for (let y0 = 0; y0 < height; y0 += rows) {
    const y1 = Math.min(height, y0 + rows);
    const len = (y1 - y0) * width;
    const bands = prepared.map((p, k) => warpPlanes(p.input.planes, p.grid.width, p.grid.height, similarities[k], { width, height: y1 - y0, originX: 0, originY: y0 }, "bicubic", scratch[k]));
    for (const [k, p] of prepared.entries()) {
      const out = bands[k];
      const m = maps[k];
      const into = reach[k];
      for (let v = 0; v < y1 - y0; v++) {
        const y = y0 + v;
        for (let x = 0; x < width; x++) {
          const j = v * width + x;
          let place = 0;
          if (out.covered[j]) {
            const qx = m.a * x + m.b * y + m.c, qy = m.d * x + m.e * y + m.f;
            place = computeEdgeWeight(qx, qy, p.grid.width, p.grid.height, p.taper);
            if (place > 0) place *= computeMoonWeight(p.moonMask, qx, qy);
            for (let c = 0; c < out.planes.length && place > 0; c++) if (!Number.isFinite(out.planes[c][j])) place = 0;
          }
          into[j] = place;
        }
      }
    }
    for (const [k, p] of prepared.entries()) {
      const out = bands[k];
      const w = weights[k];
      for (let v = 0; v < y1 - y0; v++) {
        const y = y0 + v;
        for (let x = 0; x < width; x++) {
          const j = v * width + x;
          const place = reach[k][j];
          if (!(place > 0)) { w[j] = 0; continue; }
          const step = Math.round(Math.hypot(x - grid.sunX, y - grid.sunY) / sunRadiusPx / stepR);
          // The resolution taper, lifted as far as the finer inputs are missing here.
          let finerHere = 0;
          for (const f of finer[k]) finerHere = Math.max(finerHere, reach[f][j]);
          const res = resolution[k][step];
          w[j] = place * inverseVariance[k][step] * (res + (1 - res) * (1 - finerHere));
          steps[j] = step;
        }
      }
      for (let j = 0; j < len; j++) {
        const wj = w[j];
        if (!(wj > 0)) continue;
        const i = y0 * width + j;
        for (let c = 0; c < channels; c++) sums[c][i] += wj * p.factors[c] * p.areaFactor * out.planes[Math.min(c, out.planes.length - 1)][j];
        weightSum[i] += wj;
        variance[i] += wj * wj * pixelVariance[k][steps[j]];
        coverage[i]++;
      }
    }
    for (let j = 0; j < len; j++) {
      const i = y0 * width + j;
      const total = weightSum[i];
      if (!(total > 0)) continue;
      for (let k = 0; k < prepared.length; k++) {
        const share = weights[k][j] / total;
        shares[k][i] = Math.round(255 * share);
        weightTotals[k] += share;
      }
    }
    onProgress(y1 / height);
  }
  for (let i = 0; i < n; i++) {
    const total = weightSum[i];
    for (let c = 0; c < channels; c++) sums[c][i] = total > 0 ? sums[c][i] / total : 0;
    variance[i] = total > 0 ? variance[i] / (total * total) : 0;
  }
  return { radiance: sums, coverage, shares, weightTotals, variance };
}

/**
 * One master on another grid, by the composite's own resampling (Keys bicubic,
 * resample.ts, unless told bilinear): what the composite takes from it before
 * weights. `covered` marks the pixels whose source point lies in the master.
 */
export function reprojectMaster(input: Pick<CompositeInput, "name" | "planes" | "grid">, onto: HelioGrid, kernel: ResampleKernel = "bicubic"): WarpTarget {
  return warpPlanes(input.planes, input.grid.width, input.grid.height, toSimilarity(mapBetweenGrids(onto, input.grid), input.name), { width: onto.width, height: onto.height }, kernel);
}
