// The Moon's limb in one frame: coarse disk, radial rays, sub-pixel edges, a
// robust circle fit. Works on a linear luminance plane (black subtracted).
import { computeCircleResiduals, fitCircleGeometric, fitCircleTaubin, fitCircleThroughThree, type Circle } from "./circle-fit";
import { findCoarseDisk } from "./coarse-disk";
import { fitLimbProfile } from "./limb-profile";
import { createRng } from "./random";

export type LimbVerdict = "sound" | "doubtful" | "failed";

export interface LimbFit {
  x: number;
  y: number;
  radiusPx: number;
  /** RMS orthogonal residual of the inlier edge points, px. */
  rmsPx: number;
  /** Inlier edge points over rays cast, not counting clipped rays when they were left out. */
  inlierFraction: number;
  rayCount: number;
  inlierCount: number;
  /** Rays whose edge ran into clipped light (their edge is biased into the disk, so they are left out when enough others remain). */
  clippedRayCount: number;
  verdict: LimbVerdict;
  reasons: string[];
}

export interface LimbFitOptions {
  /** Values at and above this count as clipped (planes' units). */
  clipLevel?: number;
  /** Clipped mask of the frame (1 = clipped). */
  clipped?: Uint8Array;
  /** Dark noise sigma, planes' units; edges weaker than a few sigma are ignored. */
  noiseSigma?: number;
  seed?: number;
}

/** Bilinear sample with edge clamping. */
export function sampleBilinear(plane: Float32Array, width: number, height: number, x: number, y: number): number {
  const xc = x < 0 ? 0 : x > width - 1 ? width - 1 : x;
  const yc = y < 0 ? 0 : y > height - 1 ? height - 1 : y;
  const x0 = Math.min(width - 2, Math.floor(xc));
  const y0 = Math.min(height - 2, Math.floor(yc));
  const fx = xc - x0;
  const fy = yc - y0;
  const i = y0 * width + x0;
  const top = plane[i] + fx * (plane[i + 1] - plane[i]);
  const bottom = plane[i + width] + fx * (plane[i + width + 1] - plane[i + width]);
  return top + fy * (bottom - top);
}

interface EdgePoints {
  xs: Float64Array;
  ys: Float64Array;
  /** Index of the ray each point came from. */
  rays: Uint32Array;
  clipped: Uint8Array;
  count: number;
  rayCount: number;
}

// Samples a radial profile per ray at 1 px steps, each sample the mean of three
// bilinear samples across the ray (1 px apart) to lower noise; the edge is the
// maximum of the central-difference gradient, refined by fitting a Gaussian
// through the three gradient samples about it (log-parabola; exact for a
// Gaussian-blurred step), with an ordinary parabola when a sample is not positive.
//
// Known bias of this edge definition: the gradient maximum of a blurred step is
// the step only when the light beyond it is flat. The inner corona falls off
// outward (about r^-17 in solar radii near the limb, log slope k = 17 / R_sun px^-1),
// and for light e^(-k x) H(x) blurred by a kernel of variance s^2 the maximum moves
// inward by about k s^2. s^2 here is the PSF's variance plus about 0.6 px^2 of our
// own sampling (pixel area 1/12, bilinear 1/6, central difference 1/3). Measured on
// noiseless synthetic frames, radius minus the model's: -0.28, -0.50 and -0.90 px for
// PSF sigma 0, 1 and 2 px at a 32 px Sun; -0.15, -0.27 and -0.51 px at 80 px. The
// centre stays within 0.02 px (the bias is the same all round), but the radius, and
// the plate scale the WCS takes from it, does not. So each edge is moved outward by
// k s^2 measured on its own ray (correctFalloffBias): s^2 from the width of the
// gradient peak (the log-parabola's curvature is -1 / s^2), k from the light's
// logarithmic fall beyond the edge, above the dark level inside it. That
// correction still left -0.22 to -0.37 px at 32 px and -0.11 to -0.19 px at
// 80 px (the light is a power law, not an exponential, and a blurred round
// disk shrinks by s^2 / 2R besides), so the final radius comes from the limb's
// mean profile fitted with a forward model (limb-profile.ts); the ray edges
// give the centre and the rays to trust.
function traceEdges(plane: Float32Array, width: number, height: number, centre: Circle, halfWindowPx: number, options: LimbFitOptions): EdgePoints {
  const rayCount = Math.max(90, Math.min(1440, Math.round((2 * Math.PI * centre.r) / 1.5)));
  const steps = Math.max(5, Math.ceil(2 * halfWindowPx)) + 1;
  // The profile runs FALLOFF_SAMPLES beyond the window, where correctFalloffBias measures the light's fall.
  const profile = new Float64Array(steps + FALLOFF_SAMPLES);
  const xs = new Float64Array(rayCount);
  const ys = new Float64Array(rayCount);
  const rays = new Uint32Array(rayCount);
  const clipped = new Uint8Array(rayCount);
  const clipLevel = options.clipLevel ?? Infinity;
  const minGradient = 4 * (options.noiseSigma ?? 0);
  let count = 0;
  const rStart = centre.r - (steps - 1) / 2;
  for (let k = 0; k < rayCount; k++) {
    const theta = (2 * Math.PI * k) / rayCount;
    const c = Math.cos(theta);
    const s = Math.sin(theta);
    for (let j = 0; j < profile.length; j++) {
      const r = rStart + j;
      const x = centre.cx + r * c;
      const y = centre.cy + r * s;
      profile[j] =
        (sampleBilinear(plane, width, height, x - s, y + c) + sampleBilinear(plane, width, height, x, y) + sampleBilinear(plane, width, height, x + s, y - c)) / 3;
    }
    let best = -1;
    let bestGradient = -Infinity;
    for (let j = 1; j < steps - 1; j++) {
      const g = (profile[j + 1] - profile[j - 1]) / 2;
      if (g > bestGradient) {
        bestGradient = g;
        best = j;
      }
    }
    if (best < 2 || best > steps - 3 || !(bestGradient > minGradient)) continue;
    const gm = (profile[best] - profile[best - 2]) / 2;
    const gp = (profile[best + 2] - profile[best]) / 2;
    let delta: number;
    if (gm > 0 && gp > 0) {
      const lm = Math.log(gm), l0 = Math.log(bestGradient), lp = Math.log(gp);
      const den = lm - 2 * l0 + lp;
      delta = den < 0 ? (0.5 * (lm - lp)) / den : 0;
    } else {
      const den = gm - 2 * bestGradient + gp;
      delta = den < 0 ? (0.5 * (gm - gp)) / den : 0;
    }
    if (Math.abs(delta) > 1) continue;
    const rEdge = rStart + best + delta + correctFalloffBias(profile, best, gm, bestGradient, gp, clipLevel);
    xs[count] = centre.cx + rEdge * c;
    ys[count] = centre.cy + rEdge * s;
    rays[count] = k;
    // Clipped light within three samples outside the edge moves the gradient maximum inward.
    let isClipped = false;
    for (let j = best; j <= Math.min(steps - 1, best + 3); j++) if (profile[j] >= clipLevel) isClipped = true;
    if (!isClipped && options.clipped) {
      for (let j = best; j <= Math.min(steps - 1, best + 3) && !isClipped; j++) {
        const xi = Math.round(centre.cx + (rStart + j) * c);
        const yi = Math.round(centre.cy + (rStart + j) * s);
        if (xi >= 0 && yi >= 0 && xi < width && yi < height && options.clipped[yi * width + xi]) isClipped = true;
      }
    }
    clipped[count] = isClipped ? 1 : 0;
    count++;
  }
  return { xs, ys, rays, clipped, count, rayCount };
}

/**
 * Outward shift, px, that undoes the inward bias k s^2 of a gradient maximum in
 * front of light falling off as e^(-k x) (see the notes above traceEdges). s^2
 * is the variance of the measured gradient peak (three gradient samples spaced
 * one pixel apart about the maximum, log-parabola curvature -1 / s^2); k is the
 * fall of ln(light - dark) over the samples from 2 s beyond the edge, the dark
 * level taken from the samples inside. Zero where it cannot be measured (clipped
 * or noisy light, a peak that is not Gaussian), and at most half a pixel.
 */
/** Samples beyond the search window, for the fall of the light outside the edge. */
const FALLOFF_SAMPLES = 8;

function correctFalloffBias(profile: Float64Array, best: number, gm: number, g0: number, gp: number, clipLevel: number): number {
  if (!(gm > 0 && gp > 0 && g0 > 0)) return 0;
  const curvature = Math.log(gm) - 2 * Math.log(g0) + Math.log(gp);
  if (!(curvature < 0)) return 0;
  const s2 = -1 / curvature;
  const steps = Math.min(profile.length, best + Math.max(2, Math.ceil(2 * Math.sqrt(s2))) + FALLOFF_SAMPLES);
  let dark = Infinity;
  for (let j = 0; j <= Math.max(0, best - 3); j++) dark = Math.min(dark, profile[j]);
  if (!Number.isFinite(dark)) return 0;
  const from = best + Math.max(2, Math.ceil(2 * Math.sqrt(s2)));
  if (from + 2 >= steps) return 0;
  // Least-squares slope of ln(light - dark) against radius over the samples beyond the edge.
  let n = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
  for (let j = from; j < steps; j++) {
    const v = profile[j] - dark;
    if (!(v > 0) || profile[j] >= clipLevel) return 0;
    const y = Math.log(v);
    n++; sx += j; sy += y; sxx += j * j; sxy += j * y;
  }
  if (n < 3) return 0;
  const slope = (n * sxy - sx * sy) / (n * sxx - sx * sx);
  const k = -slope;
  if (!(k > 0)) return 0;
  return Math.min(1, solveFalloffShift(k, s2));
}

/** Standard normal cumulative distribution (Abramowitz and Stegun 7.1.26 for erf, error under 1.5e-7). */
function normalCdf(z: number): number {
  const x = Math.abs(z) / Math.SQRT2;
  const t = 1 / (1 + 0.3275911 * x);
  const erf = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
  return z >= 0 ? 0.5 * (1 + erf) : 0.5 * (1 - erf);
}

/**
 * The exact inward shift of the gradient maximum of H(x) e^(-k x) blurred by a
 * Gaussian of variance s^2, where k s is not small. The blurred gradient is
 * g(x) = G(x) - k E(x), E(x) = e^(-k x + k^2 s^2 / 2) Phi((x - k s^2) / s), and
 * E' = g, so the maximum solves h(x) = G'(x) - k g(x) = 0, found by bisection
 * (to first order x = -k s^2). The measured peak width is that of g, a little
 * narrower than s when k s nears one: s^2 is adjusted once so that the model's
 * peak has the measured width. Returns -x (px, outward).
 */
export function solveFalloffShift(k: number, measuredS2: number): number {
  const locate = (s2: number) => {
    const s = Math.sqrt(s2);
    const gauss = (x: number) => Math.exp((-0.5 * x * x) / s2) / (s * Math.sqrt(2 * Math.PI));
    const e = (x: number) => Math.exp(-k * x + 0.5 * k * k * s2) * normalCdf((x - k * s2) / s);
    const g = (x: number) => gauss(x) - k * e(x);
    const h = (x: number) => (-x / s2) * gauss(x) - k * g(x);
    let lo = -(2 * k * s2 + 2 * s);
    let hi = 0;
    if (!(h(lo) > 0)) return { x: -k * s2, g };
    for (let it = 0; it < 50; it++) {
      const mid = 0.5 * (lo + hi);
      if (h(mid) > 0) lo = mid;
      else hi = mid;
    }
    return { x: 0.5 * (lo + hi), g };
  };
  let s2 = measuredS2;
  const first = locate(s2);
  const [gm, g0, gp] = [first.g(first.x - 1), first.g(first.x), first.g(first.x + 1)];
  if (gm > 0 && g0 > 0 && gp > 0) {
    const curvature = Math.log(gm) - 2 * Math.log(g0) + Math.log(gp);
    if (curvature < 0) s2 *= measuredS2 / (-1 / curvature);
  }
  return -locate(s2).x;
}

function selectPoints(points: EdgePoints, keep: (i: number) => boolean): { xs: Float64Array; ys: Float64Array; rays: number[] } {
  const xs: number[] = [];
  const ys: number[] = [];
  const rays: number[] = [];
  for (let i = 0; i < points.count; i++) {
    if (keep(i)) {
      xs.push(points.xs[i]);
      ys.push(points.ys[i]);
      rays.push(points.rays[i]);
    }
  }
  return { xs: Float64Array.from(xs), ys: Float64Array.from(ys), rays };
}

function computeMedian(values: ArrayLike<number>): number {
  const s = Float64Array.from(values).sort();
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/**
 * Robust circle fit: RANSAC (Fischler and Bolles 1981, CACM 24:381) over
 * three-point circles with a seeded generator, then rounds of MAD clipping
 * (reject |d| > 3 x 1.4826 MAD, Rousseeuw and Croux 1993) each finished by a
 * geometric Levenberg-Marquardt fit. Returns the circle and the inlier flags.
 */
export function fitCircleRobust(xs: Float64Array, ys: Float64Array, seed = 1): { circle: Circle; inliers: Uint8Array; rmsPx: number } {
  const n = xs.length;
  const rng = createRng(seed);
  const ransacThresholdPx = 1.0;
  let bestInliers = -1;
  let bestCircle: Circle = fitCircleTaubin(xs, ys);
  for (let iter = 0; iter < 300; iter++) {
    const i = Math.floor(rng() * n), j = Math.floor(rng() * n), k = Math.floor(rng() * n);
    if (i === j || j === k || i === k) continue;
    const c = fitCircleThroughThree(xs[i], ys[i], xs[j], ys[j], xs[k], ys[k]);
    if (!c) continue;
    let inl = 0;
    for (let m = 0; m < n; m++) if (Math.abs(Math.hypot(xs[m] - c.cx, ys[m] - c.cy) - c.r) < ransacThresholdPx) inl++;
    if (inl > bestInliers) {
      bestInliers = inl;
      bestCircle = c;
    }
  }
  let inliers = new Uint8Array(n);
  let residuals = computeCircleResiduals(xs, ys, bestCircle);
  for (let m = 0; m < n; m++) inliers[m] = Math.abs(residuals[m]) < 2 * ransacThresholdPx ? 1 : 0;
  let circle = bestCircle;
  let rmsPx = Infinity;
  for (let round = 0; round < 8; round++) {
    const kx: number[] = [];
    const ky: number[] = [];
    for (let m = 0; m < n; m++) if (inliers[m]) { kx.push(xs[m]); ky.push(ys[m]); }
    if (kx.length < 3) break;
    const fit = fitCircleGeometric(kx, ky, circle);
    circle = fit;
    rmsPx = fit.rmsPx;
    residuals = computeCircleResiduals(xs, ys, circle);
    const inlierResiduals: number[] = [];
    for (let m = 0; m < n; m++) if (inliers[m]) inlierResiduals.push(residuals[m]);
    const med = computeMedian(inlierResiduals);
    const mad = 1.4826 * computeMedian(inlierResiduals.map((d) => Math.abs(d - med)));
    const limit = Math.max(3 * mad, 0.05);
    const next = new Uint8Array(n);
    let changed = false;
    for (let m = 0; m < n; m++) {
      next[m] = Math.abs(residuals[m]) <= limit ? 1 : 0;
      if (next[m] !== inliers[m]) changed = true;
    }
    inliers = next;
    if (!changed) break;
  }
  return { circle, inliers, rmsPx };
}

const MIN_INLIERS = 24;

/**
 * Fits the lunar limb in a linear luminance plane. Two passes: rays from the
 * coarse disk, then again from the first fit with a narrower window, so that
 * every ray crosses the limb square on.
 */
export function fitLimb(plane: Float32Array, width: number, height: number, options: LimbFitOptions = {}): LimbFit {
  const coarse = findCoarseDisk(plane, width, height);
  const failed = (reason: string, rayCount = 0): LimbFit => ({
    x: NaN, y: NaN, radiusPx: NaN, rmsPx: NaN, inlierFraction: 0, rayCount, inlierCount: 0, clippedRayCount: 0, verdict: "failed", reasons: [reason],
  });
  if (!coarse) return failed("no dark round region enclosed by bright corona");
  let circle: Circle = { cx: coarse.x, cy: coarse.y, r: coarse.radiusPx };
  let halfWindow = Math.max(8, 0.12 * coarse.radiusPx, (3 * Math.max(width, height)) / 384);
  let result: LimbFit | null = null;
  for (let pass = 0; pass < 2; pass++) {
    const points = traceEdges(plane, width, height, circle, halfWindow, options);
    if (points.count < MIN_INLIERS) return failed(`only ${points.count} of ${points.rayCount} rays found an edge`, points.rayCount);
    let clippedCount = 0;
    for (let i = 0; i < points.count; i++) clippedCount += points.clipped[i];
    const unclipped = points.count - clippedCount;
    const useUnclipped = unclipped >= Math.max(MIN_INLIERS, 0.2 * points.count);
    const chosen = selectPoints(points, (i) => !useUnclipped || points.clipped[i] === 0);
    const robust = fitCircleRobust(chosen.xs, chosen.ys, options.seed ?? 1);
    let inlierCount = 0;
    for (const f of robust.inliers) inlierCount += f;
    circle = robust.circle;
    const reasons: string[] = [];
    // Rays left out on purpose (clipped) do not count against the fit; rays without an edge do.
    const inlierFraction = inlierCount / (points.rayCount - (useUnclipped ? clippedCount : 0));
    if (!useUnclipped) reasons.push(`limb clipped on ${clippedCount} of ${points.count} rays; radius biased inward`);
    if (inlierFraction < 0.5) reasons.push(`only ${(100 * inlierFraction).toFixed(0)} % of rays agree on one circle`);
    if (robust.rmsPx > 0.5) reasons.push(`edge scatter ${robust.rmsPx.toFixed(2)} px RMS`);
    if (inlierCount < MIN_INLIERS) reasons.push(`only ${inlierCount} edge points kept`);
    let verdict: LimbVerdict = "sound";
    if (inlierCount < MIN_INLIERS || inlierFraction < 0.2 || robust.rmsPx > 2 || !Number.isFinite(circle.r)) verdict = "failed";
    else if (reasons.length > 0) verdict = "doubtful";
    result = {
      x: circle.cx, y: circle.cy, radiusPx: circle.r, rmsPx: robust.rmsPx, inlierFraction, rayCount: points.rayCount,
      inlierCount, clippedRayCount: clippedCount, verdict, reasons,
    };
    if (verdict === "failed") return result;
    if (pass === 1 && useUnclipped) {
      // The radius from the limb's mean profile, which models the bias of the ray edges away (see limb-profile.ts).
      const usableRays = new Uint8Array(points.rayCount);
      chosen.rays.forEach((ray, i) => { usableRays[ray] = robust.inliers[i]; });
      const profile = fitLimbProfile(plane, width, height, circle, {
        innerPx: Math.min(12, 0.4 * circle.r), outerPx: Math.min(16, 0.5 * circle.r), usableRays, clipped: options.clipped, clipLevel: options.clipLevel,
      });
      if (profile) result.radiusPx = profile.radiusPx;
    }
    halfWindow = Math.max(5, 4 * robust.rmsPx + 3);
  }
  return result!;
}
