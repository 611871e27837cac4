// Summaries of a master for the report and the reduction page: the radial
// brightness profile (mean luminance in rings about the Sun's centre, in solar
// radii, the Moon left out) and how many frames contributed to each pixel.
import { ImagingError, requireNumberInRange } from "./errors";
import type { LunarDisk } from "./radial";

export interface RadialProfileOptions {
  /** The Sun's centre in master pixels (0-based pixel centres). */
  centre: { x: number; y: number };
  /** One solar radius in master pixels. */
  solarRadiusPx: number;
  /** Pixels inside this disk (the Moon, with any margin) are left out. */
  exclude?: LunarDisk;
  /** 1 = pixel counts (e.g. some frame contributed); all pixels when absent. */
  valid?: Uint8Array;
  /** Inner edge of the first ring, solar radii; default 1. */
  startR?: number;
  /** Ring width, solar radii; default 0.05. */
  stepR?: number;
  /** Rings with fewer pixels are dropped; default 8. */
  minPixels?: number;
}

export interface RadialProfileRing {
  /** Inner and outer edge, solar radii. */
  innerR: number;
  outerR: number;
  /** Mean distance of the pixels counted, solar radii. */
  meanR: number;
  meanLuminance: number;
  pixelCount: number;
  /** Pixels counted over the ring's full area: below 1 where the frame edge or the Moon cuts the ring. */
  ringFraction: number;
}

/**
 * Mean luminance in rings of stepR solar radii from startR out to the farthest
 * pixel. Each pixel counts whole in the ring its centre falls in; rings left
 * with fewer than minPixels pixels are dropped.
 */
export function computeRadialProfile(luminance: Float32Array, width: number, height: number, options: RadialProfileOptions): RadialProfileRing[] {
  const { centre, solarRadiusPx } = options;
  const startR = options.startR ?? 1;
  const stepR = options.stepR ?? 0.05;
  const minPixels = options.minPixels ?? 8;
  if (luminance.length !== width * height) throw new ImagingError("size-mismatch", `luminance has ${luminance.length} values, expected ${width} x ${height}`);
  if (!Number.isFinite(centre.x) || !Number.isFinite(centre.y)) throw new ImagingError("bad-parameter", `centre must be finite, got (${centre.x}, ${centre.y})`);
  requireNumberInRange("solarRadiusPx", solarRadiusPx, 1e-3, 1e7);
  requireNumberInRange("startR", startR, 0, 1e3);
  requireNumberInRange("stepR", stepR, 1e-3, 10);
  if (options.valid && options.valid.length !== width * height) throw new ImagingError("size-mismatch", `valid mask has ${options.valid.length} values, expected ${width} x ${height}`);
  const maxR = Math.hypot(Math.max(centre.x, width - 1 - centre.x), Math.max(centre.y, height - 1 - centre.y)) / solarRadiusPx;
  const rings = Math.max(0, Math.ceil((maxR - startR) / stepR));
  const count = new Float64Array(rings), sum = new Float64Array(rings), sumR = new Float64Array(rings);
  const ex = options.exclude;
  const exR2 = ex ? ex.radiusPx * ex.radiusPx : 0;
  for (let y = 0; y < height; y++) {
    const dy = y - centre.y;
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (options.valid && !options.valid[i]) continue;
      if (ex && (x - ex.x) ** 2 + (y - ex.y) ** 2 <= exR2) continue;
      const v = luminance[i];
      if (!Number.isFinite(v)) continue;
      const r = Math.hypot(x - centre.x, dy) / solarRadiusPx;
      const b = Math.floor((r - startR) / stepR);
      if (b < 0 || b >= rings) continue;
      count[b]++;
      sum[b] += v;
      sumR[b] += r;
    }
  }
  const out: RadialProfileRing[] = [];
  for (let b = 0; b < rings; b++) {
    if (count[b] < minPixels) continue;
    const innerR = startR + b * stepR;
    const outerR = innerR + stepR;
    const areaPx = Math.PI * (outerR * outerR - innerR * innerR) * solarRadiusPx * solarRadiusPx;
    out.push({ innerR, outerR, meanR: sumR[b] / count[b], meanLuminance: sum[b] / count[b], pixelCount: count[b], ringFraction: Math.min(1, count[b] / areaPx) });
  }
  return out;
}

/**
 * Least-squares line through (ln meanR, ln meanLuminance) of the rings with a
 * positive mean between fromR and toR: I = A r^-exponent. Null with fewer than
 * three such rings.
 */
export function fitRadialPowerLaw(rings: RadialProfileRing[], fromR = 0, toR = Infinity): { exponent: number; amplitude: number; ringCount: number } | null {
  const pts = rings.filter((r) => r.meanLuminance > 0 && r.meanR >= fromR && r.meanR <= toR).map((r) => [Math.log(r.meanR), Math.log(r.meanLuminance)]);
  if (pts.length < 3) return null;
  const n = pts.length;
  const mx = pts.reduce((s, p) => s + p[0], 0) / n;
  const my = pts.reduce((s, p) => s + p[1], 0) / n;
  let sxx = 0, sxy = 0;
  for (const [x, y] of pts) {
    sxx += (x - mx) ** 2;
    sxy += (x - mx) * (y - my);
  }
  if (!(sxx > 0)) return null;
  const slope = sxy / sxx;
  return { exponent: -slope, amplitude: Math.exp(my - slope * mx), ringCount: n };
}

export interface CoverageSummary {
  frameCount: number;
  /** pixelsByFrames[k]: pixels to which exactly k frames contributed, k = 0..frameCount. */
  pixelsByFrames: number[];
  meanFrames: number;
  uncoveredFraction: number;
  /** Downscaled map: mean frames per pixel over each block, as 0..1 of frameCount. */
  map: { width: number; height: number; blockPx: number; values: Float32Array };
}

/** Counts of the coverage map and a block-averaged copy no larger than maxSidePx on its long side. */
export function summarizeCoverage(coverage: Uint16Array, width: number, height: number, frameCount: number, maxSidePx = 512): CoverageSummary {
  if (coverage.length !== width * height) throw new ImagingError("size-mismatch", `coverage has ${coverage.length} values, expected ${width} x ${height}`);
  if (!(Number.isInteger(frameCount) && frameCount >= 1)) throw new ImagingError("bad-parameter", `frameCount must be a whole number >= 1, got ${frameCount}`);
  requireNumberInRange("maxSidePx", maxSidePx, 1, 1e5);
  const pixelsByFrames = new Array<number>(frameCount + 1).fill(0);
  let total = 0;
  for (let i = 0; i < coverage.length; i++) {
    const k = Math.min(frameCount, coverage[i]);
    pixelsByFrames[k]++;
    total += k;
  }
  const blockPx = Math.max(1, Math.ceil(Math.max(width, height) / maxSidePx));
  const mw = Math.ceil(width / blockPx), mh = Math.ceil(height / blockPx);
  const values = new Float32Array(mw * mh);
  const counts = new Float32Array(mw * mh);
  for (let y = 0; y < height; y++) {
    const row = Math.floor(y / blockPx) * mw;
    for (let x = 0; x < width; x++) {
      const j = row + Math.floor(x / blockPx);
      values[j] += Math.min(frameCount, coverage[y * width + x]);
      counts[j]++;
    }
  }
  for (let j = 0; j < values.length; j++) values[j] = values[j] / counts[j] / frameCount;
  const n = width * height;
  return { frameCount, pixelsByFrames, meanFrames: total / n, uncoveredFraction: pixelsByFrames[0] / n, map: { width: mw, height: mh, blockPx, values } };
}
