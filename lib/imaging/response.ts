// Camera response recovery for 8-bit brackets: Debevec and Malik (1997),
// "Recovering high dynamic range radiance maps from photographs", SIGGRAPH,
// section 2.1 and appendix (gsolve). Minimizes
//   sum_i sum_j [w(Z_ij) (g(Z_ij) - ln E_i - ln t_j)]^2 + lambda sum_z [w(z) g''(z)]^2
// with g(128) = 0, for g (256 values) and ln E_i (one per sample pixel).
import { ImagingError } from "./errors";
import { solveCholesky } from "./linalg";
import { computeHatWeight } from "./merge";

const LEVELS = 256;

/**
 * Picks sample pixels deterministically: a grid over the frame, keeping points
 * whose 5 x 5 neighbourhood is smooth in the reference frame (so slight
 * misregistration does not matter) where it can, then for `count` target codes
 * spread evenly over 1..254 a candidate within 3 codes (smooth ones first, each
 * used once), so every part of the curve is sampled even when most of the frame
 * is black or clipped.
 */
export function selectResponseSamples(reference: ArrayLike<number>, width: number, height: number, count: number): Int32Array {
  const step = Math.max(2, Math.floor(Math.sqrt((width * height) / (count * 40))));
  const smooth: number[][] = Array.from({ length: LEVELS }, () => []);
  const rough: number[][] = Array.from({ length: LEVELS }, () => []);
  for (let y = 2; y < height - 2; y += step) {
    for (let x = 2; x < width - 2; x += step) {
      const code = Math.round(reference[y * width + x]);
      if (code < 1 || code > 254) continue;
      let lo = 255, hi = 0;
      for (let dy = -2; dy <= 2; dy++) {
        for (let dx = -2; dx <= 2; dx++) {
          const v = reference[(y + dy) * width + x + dx];
          if (v < lo) lo = v;
          if (v > hi) hi = v;
        }
      }
      (hi - lo <= 2 + 0.04 * code ? smooth : rough)[code].push(y * width + x);
    }
  }
  const takenSmooth = new Int32Array(LEVELS);
  const takenRough = new Int32Array(LEVELS);
  // Nearest code within maxDistance that still has an unused candidate in the bucket set.
  const pick = (target: number, buckets: number[][], taken: Int32Array, maxDistance: number): number | null => {
    for (let d = 0; d <= maxDistance; d++) {
      for (const c of [target - d, target + d]) {
        if (c >= 1 && c <= 254 && taken[c] < buckets[c].length) return buckets[c][taken[c]++];
      }
    }
    return null;
  };
  const out: number[] = [];
  for (let k = 0; k < count; k++) {
    const target = Math.round(1 + (253 * k) / Math.max(1, count - 1));
    // Prefer a smooth spot near the target code, then any spot near it, then the nearest smooth one.
    const index = pick(target, smooth, takenSmooth, 3) ?? pick(target, rough, takenRough, 3) ?? pick(target, smooth, takenSmooth, LEVELS);
    if (index !== null) out.push(index);
  }
  return Int32Array.from(out);
}

/**
 * Solves for g by least squares through the normal equations (Cholesky);
 * 256 + N unknowns. Returns g with g(128) = 0 (natural log of relative exposure).
 */
export function recoverResponseCurve(codesPerFrame: ArrayLike<number>[], exposuresS: number[], samples: Int32Array, lambda = 10): Float64Array {
  const frames = codesPerFrame.length;
  if (frames < 2 || frames !== exposuresS.length) throw new ImagingError("bad-parameter", `response recovery needs 2 or more frames with one exposure each, got ${frames} and ${exposuresS.length}`);
  if (!(lambda >= 0)) throw new ImagingError("bad-parameter", `lambda must be >= 0, got ${lambda}`);
  if (samples.length < 2) throw new ImagingError("bad-parameter", `response recovery needs sample pixels, got ${samples.length}`);
  const n = LEVELS + samples.length;
  const ata = new Float64Array(n * n);
  const atb = new Float64Array(n);
  // Adds the row r (given as index/coefficient pairs) with right-hand side b to the normal equations.
  const addRow = (idx: number[], coef: number[], b: number) => {
    for (let p = 0; p < idx.length; p++) {
      atb[idx[p]] += coef[p] * b;
      for (let q = 0; q < idx.length; q++) ata[idx[p] * n + idx[q]] += coef[p] * coef[q];
    }
  };
  for (let i = 0; i < samples.length; i++) {
    for (let j = 0; j < frames; j++) {
      const z = Math.round(codesPerFrame[j][samples[i]]);
      const w = computeHatWeight(z);
      if (w === 0) continue;
      addRow([z, LEVELS + i], [w, -w], w * Math.log(exposuresS[j]));
    }
  }
  addRow([128], [1], 0);
  for (let z = 1; z < LEVELS - 1; z++) {
    const w = lambda * computeHatWeight(z);
    addRow([z - 1, z, z + 1], [w, -2 * w, w], 0);
  }
  // A tiny ridge keeps samples that no frame exposed usefully from making the system singular.
  for (let k = 0; k < n; k++) ata[k * n + k] += 1e-9;
  const x = solveCholesky(ata, atb, n);
  return x.slice(0, LEVELS);
}

/**
 * exp(g) as the linearization table for 8-bit frames, code 0 mapped to 0. The
 * scale is arbitrary; we pin code 128 to the sRGB value there (0.2158605) so
 * that both 8-bit paths give comparable numbers, rather than pinning code 255,
 * whose g only the smoothness term decides (its hat weight is zero).
 */
export function convertResponseToTable(logResponse: Float64Array): Float64Array {
  const table = new Float64Array(LEVELS);
  const pin = 0.2158605 / Math.exp(logResponse[128]);
  for (let z = 0; z < LEVELS; z++) table[z] = z === 0 ? 0 : Math.exp(logResponse[z]) * pin;
  // Keep the table strictly increasing so that it can be inverted.
  for (let z = 1; z < LEVELS; z++) if (table[z] <= table[z - 1]) table[z] = table[z - 1] * (1 + 1e-6) + 1e-12;
  return table;
}

/** Inverse of an increasing 256-entry table: the code whose value is nearest (binary search). */
export function createCodeLookup(table: ArrayLike<number>): (linear: number) => number {
  return (v: number) => {
    let lo = 0;
    let hi = LEVELS - 1;
    if (v <= table[0]) return 0;
    if (v >= table[hi]) return hi;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (table[mid] <= v) lo = mid;
      else hi = mid;
    }
    return v - table[lo] < table[hi] - v ? lo : hi;
  };
}
