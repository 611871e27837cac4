// Figures of merit of a reduction against the synthetic model's truth, shared by
// the tests of real-camera brackets and the benchmark:
// - radiance error: master / truth - 1 per pixel, where a frame exposed the pixel
//   well and clear of every lunar limb; median and 90th percentile of |error|;
// - seam figure: the error smoothed over a few pixels (a Gaussian of SEAM_SIGMA_PX),
//   90th percentile of its size in the annulus 1.3 to 2.8 solar radii, where the
//   merge hands over from one exposure to the next. Noise averages out in the
//   smoothing; a step between exposures does not;
// - defects left: planted sensor defects and trail pixels whose master value stands
//   out of the smoothed truth by more than DEFECT_SIGMAS of the local noise.
import { blurGaussian } from "@/lib/imaging/blur";
import type { ReductionResult } from "@/lib/imaging/pipeline";
import { applyAffine, invertAffine, toAffine } from "@/lib/imaging/similarity";
import type { SynthDefect, SynthTruth } from "@/lib/imaging/synth-model";

export const SEAM_SIGMA_PX = 3;
const DEFECT_SIGMAS = 6;

export interface BracketQuality {
  medianError: number;
  p90Error: number;
  seamP90: number;
  /** Pixels measured. */
  count: number;
}

function percentile(sorted: Float64Array, p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.round((p / 100) * (sorted.length - 1))))];
}

/** Pixels to measure: covered well by the merge, outside every Moon of the bracket by a margin, with truth above zero. */
function measurable(result: ReductionResult, truth: SynthTruth, plane: number, marginPx: number): Uint8Array {
  const { width, height } = result.master;
  const ok = new Uint8Array(width * height);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (!result.coverage[i] || !(truth.radiance[plane][i] > 0)) continue;
      if (truth.moonScene.some((m) => Math.hypot(x - m.x, y - m.y) < truth.moonRadiusPx + marginPx)) continue;
      ok[i] = 1;
    }
  }
  return ok;
}

/**
 * The master is in reference-frame pixels; the truth in scene pixels. The tests
 * build brackets whose reference frame has no pointing error, so the two agree.
 */
export function measureBracketQuality(result: ReductionResult, truth: SynthTruth, plane = truth.radiance.length === 3 ? 1 : 0, marginPx = 6): BracketQuality {
  const { width, height } = result.master;
  const ok = measurable(result, truth, plane, marginPx);
  const master = result.master.planes[plane];
  const rel = new Float32Array(width * height);
  for (let i = 0; i < rel.length; i++) if (ok[i]) rel[i] = master[i] / truth.radiance[plane][i] - 1;
  const errors: number[] = [];
  for (let i = 0; i < rel.length; i++) if (ok[i]) errors.push(Math.abs(rel[i]));
  const sorted = Float64Array.from(errors).sort();
  // Smooth the error on measured pixels only (normalized convolution).
  const num = blurGaussian(rel, width, height, SEAM_SIGMA_PX);
  const den = blurGaussian(Float32Array.from(ok), width, height, SEAM_SIGMA_PX);
  const seams: number[] = [];
  const { x: cx, y: cy } = truth.sunCentre;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      const r = Math.hypot(x - cx, y - cy) / truth.sunRadiusPx;
      if (!ok[i] || r < 1.3 || r > 2.8 || den[i] < 0.5) continue;
      seams.push(Math.abs(num[i] / den[i]));
    }
  }
  const seamSorted = Float64Array.from(seams).sort();
  return { medianError: percentile(sorted, 50), p90Error: percentile(sorted, 90), seamP90: percentile(seamSorted, 90), count: errors.length };
}

/** Local noise of the relative error: 1.4826 x median |error| over the measured pixels. */
function noiseOf(result: ReductionResult, truth: SynthTruth, plane: number, ok: Uint8Array): number {
  const master = result.master.planes[plane];
  const values: number[] = [];
  for (let i = 0; i < ok.length; i += 7) if (ok[i]) values.push(Math.abs(master[i] / truth.radiance[plane][i] - 1));
  values.sort((a, b) => a - b);
  return 1.4826 * values[values.length >> 1];
}

/**
 * Planted defects still standing out in the master: each hot or stuck pixel is
 * followed into master pixels through every frame's transform (a defect moves
 * with the camera's pointing), and counted when the master within a pixel of it
 * exceeds the truth by more than DEFECT_SIGMAS of the noise. Returns how many
 * (frame, defect) places were visible out of how many were measurable.
 */
export function countDefectsLeft(result: ReductionResult, truth: SynthTruth, defects: SynthDefect[], plane = truth.radiance.length === 3 ? 1 : 0): { left: number; measured: number } {
  const { width, height } = result.master;
  const ok = measurable(result, truth, plane, 6);
  const sigma = noiseOf(result, truth, plane, ok);
  const master = result.master.planes[plane];
  let left = 0;
  let measured = 0;
  const seen = new Set<number>();
  truth.transforms.forEach((t) => {
    const toScene = invertAffine(toAffine(t, width, height));
    for (const d of defects) {
      const p = applyAffine(toScene, d.x, d.y);
      const x0 = Math.round(p.x), y0 = Math.round(p.y);
      const key = y0 * width + x0;
      if (seen.has(key) || x0 < 1 || y0 < 1 || x0 >= width - 1 || y0 >= height - 1 || !ok[key]) continue;
      seen.add(key);
      measured++;
      let worst = 0;
      for (let v = y0 - 1; v <= y0 + 1; v++) for (let u = x0 - 1; u <= x0 + 1; u++) worst = Math.max(worst, master[v * width + u] / truth.radiance[plane][v * width + u] - 1);
      if (worst > DEFECT_SIGMAS * sigma) left++;
    }
  });
  return { left, measured };
}

/**
 * What a trail leaves in the master: along the trail's pixels (its light above half
 * its peak in its frame, followed into master pixels), the median excess of the
 * master over the truth, relative to the median light the trail added there.
 */
export function measureTrailLeft(result: ReductionResult, truth: SynthTruth, frameIndex: number, exposureS: number, plane = truth.radiance.length === 3 ? 1 : 0): number {
  const trail = truth.trailDn;
  if (!trail) return 0;
  const { width, height } = result.master;
  const ok = measurable(result, truth, plane, 6);
  let peak = 0;
  for (const v of trail) peak = Math.max(peak, v);
  const toScene = invertAffine(toAffine(truth.transforms[frameIndex], width, height));
  const excess: number[] = [];
  const added: number[] = [];
  const master = result.master.planes[plane];
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const v = trail[y * width + x];
      if (v < 0.5 * peak) continue;
      const p = applyAffine(toScene, x, y);
      const k = Math.round(p.y) * width + Math.round(p.x);
      if (k < 0 || k >= ok.length || !ok[k]) continue;
      excess.push(master[k] - truth.radiance[plane][k]);
      // The trail's light spread over the exposure, as radiance (DN/s) in the frame that holds it.
      added.push(v / exposureS);
    }
  }
  if (excess.length === 0) return 0;
  excess.sort((a, b) => a - b);
  added.sort((a, b) => a - b);
  return excess[excess.length >> 1] / added[added.length >> 1];
}
