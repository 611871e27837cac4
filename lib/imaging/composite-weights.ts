// Per-pixel weights of a composite's inputs (composite.ts). Each input's weight
// at a composite pixel is the product of
//  - its inverse noise variance per unit of sky area (measured from the master
//    itself, as a profile in solar radii, and carried into the composite's units);
//  - a taper that falls smoothly to zero towards its field's edge;
//  - a taper that falls to zero inside its own lunar disk (observers' Moons
//    stand in different places);
//  - a taper that falls to zero where its plate scale is coarser than the
//    composite needs at that distance from the Sun (resolutionWeight),
// so that no input switches on or off at a line and no seam marks the hand-over.
import { ImagingError } from "./errors";

/** Cubic smoothstep of t clamped to [0, 1]: 0 and 1 with zero slope at both ends. */
export function smoothStep(t: number): number {
  if (t <= 0) return 0;
  if (t >= 1) return 1;
  return t * t * (3 - 2 * t);
}

/**
 * The plate scale a composite needs at r solar radii, arcsec per pixel: the
 * finest scale at the limb, coarser in proportion to r farther out. Our choice,
 * from the corona's own make: streamers, plumes and rays keep their widths in
 * position angle, so their size on the sky grows with r, while near the limb
 * prominences and loops are arcseconds across. With the step of
 * computeResolutionWeight, a lens of two thirds the longest's focal length
 * comes in from 1.2 solar radii, one of a third from 2.4.
 */
export function computeNeededScale(finestArcsecPerPx: number, rSun: number): number {
  return finestArcsecPerPx * Math.max(1, rSun);
}

/**
 * Weight of an input of plate scale s where the composite needs `needed`: 1 when
 * s is at least as fine, 0 when s is a quarter coarser or more, a smooth step
 * between (our choice: narrow enough that a coarser lens adds no blur at the
 * limb, wide enough, tens of pixels in r, that its arrival is no edge).
 */
export function computeResolutionWeight(scaleArcsecPerPx: number, needed: number): number {
  return smoothStep((needed / scaleArcsecPerPx - 0.8) / 0.2);
}

/**
 * Pixels of an input kept clear of its edges (bicubic reach and the merge's thin
 * edge), and the taper's length beyond them: a tenth of the field's shorter side
 * (at least 32 px). Where an input ends, the composite's noise changes grain and
 * level (the ending input's pixels leave the mix); a narrow taper showed that as
 * a line in the structure rendition, whose filter brings noise up to view.
 */
export function computeEdgeTaper(width: number, height: number): { marginPx: number; taperPx: number } {
  return { marginPx: 4, taperPx: Math.max(32, Math.round(0.1 * Math.min(width, height))) };
}

/** Weight of an input pixel at (x, y) for its distance to the field's nearest edge. */
export function computeEdgeWeight(x: number, y: number, width: number, height: number, taper: { marginPx: number; taperPx: number }): number {
  const d = Math.min(x, y, width - 1 - x, height - 1 - y);
  return smoothStep((d - taper.marginPx) / taper.taperPx);
}

/** The lunar disk an input masks, in its own pixels: masked within radiusPx, full weight from radiusPx + rampPx. */
export interface MoonMask {
  x: number;
  y: number;
  radiusPx: number;
  rampPx: number;
}

/** The Moon's disk and a margin of 1 % and 2 px (the limb's fit and the merge's own margin), with a ramp of 3 % of the radius. */
export function createMoonMask(moon: { x: number; y: number; radiusPx: number }): MoonMask {
  return { x: moon.x, y: moon.y, radiusPx: moon.radiusPx * 1.01 + 2, rampPx: Math.max(2, 0.03 * moon.radiusPx) };
}

export function computeMoonWeight(mask: MoonMask, x: number, y: number): number {
  return smoothStep((Math.hypot(x - mask.x, y - mask.y) - mask.radiusPx) / mask.rampPx);
}

/** A master's noise against distance from the Sun: sigma (its units) per annulus of stepR solar radii from 1. */
export interface NoiseProfile {
  stepR: number;
  sigma: Float64Array;
}

/**
 * The master's noise per annulus, from the luminance's second difference along
 * rows, d = v(x) - (v(x - 1) + v(x + 1)) / 2: for white noise of sigma, d has
 * sigma sqrt(1.5); 1.4826 times the median |d| estimates that for normal noise
 * (Rousseeuw and Croux 1993, JASA 88:1273, the MAD's consistency factor). The
 * corona's own curvature adds to it near the limb, which only makes an input
 * there count for a little less. Annuli with too few pixels take their
 * neighbour's value; the profile never decreases outward less than the median
 * allows (no smoothing beyond that).
 */
export function measureNoiseProfile(
  luminance: Float32Array, width: number, height: number,
  sun: { x: number; y: number; radiusPx: number }, moon: MoonMask, stepR = 0.05,
): NoiseProfile {
  if (luminance.length !== width * height) throw new ImagingError("size-mismatch", `noise profile: ${luminance.length} values for ${width} x ${height}`);
  const rMax = Math.hypot(Math.max(sun.x, width - sun.x), Math.max(sun.y, height - sun.y)) / sun.radiusPx;
  const bins = Math.max(1, Math.ceil((rMax - 1) / stepR) + 1);
  const samples: number[][] = Array.from({ length: bins }, () => []);
  // Every pixel of small masters; a regular thinning of large ones (about a million samples).
  const stride = Math.max(1, Math.floor(Math.sqrt((width * height) / 1e6)));
  for (let y = 2; y < height - 2; y += stride) {
    for (let x = 2; x < width - 2; x += stride) {
      if (computeMoonWeight(moon, x, y) < 1) continue;
      const i = y * width + x;
      const v = luminance[i], l = luminance[i - 1], r = luminance[i + 1];
      if (!(Number.isFinite(v) && Number.isFinite(l) && Number.isFinite(r))) continue;
      const rr = Math.hypot(x - sun.x, y - sun.y) / sun.radiusPx;
      const bin = Math.floor(Math.max(0, rr - 1) / stepR);
      if (bin < bins) samples[bin].push(Math.abs(v - (l + r) / 2));
    }
  }
  const sigma = new Float64Array(bins).fill(NaN);
  for (let b = 0; b < bins; b++) {
    const s = samples[b];
    if (s.length < 64) continue;
    s.sort((p, q) => p - q);
    sigma[b] = (1.4826 * s[s.length >> 1]) / Math.sqrt(1.5);
  }
  // Fill the empty annuli from the nearest measured one.
  let last = NaN;
  for (let b = 0; b < bins; b++) if (Number.isNaN(sigma[b])) sigma[b] = last; else last = sigma[b];
  last = NaN;
  for (let b = bins - 1; b >= 0; b--) if (Number.isNaN(sigma[b])) sigma[b] = last; else last = sigma[b];
  if (sigma.some((v) => !(v > 0))) {
    const floor = Math.max(...Array.from(sigma).filter((v) => v > 0), 0) * 1e-3 || 1e-12;
    for (let b = 0; b < bins; b++) if (!(sigma[b] > 0)) sigma[b] = floor;
  }
  return { stepR, sigma };
}

/** Sigma at r solar radii, linear between annuli' centres. */
export function lookUpNoise(profile: NoiseProfile, rSun: number): number {
  const f = Math.max(0, rSun - 1) / profile.stepR - 0.5;
  const n = profile.sigma.length;
  if (f <= 0) return profile.sigma[0];
  if (f >= n - 1) return profile.sigma[n - 1];
  const k = Math.floor(f);
  return profile.sigma[k] + (f - k) * (profile.sigma[k + 1] - profile.sigma[k]);
}
