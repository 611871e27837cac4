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
 * misregistration does not matter), then spreading `count` picks evenly over the
 * ranks of the reference codes so every part of the curve is sampled.
 */
export function selectResponseSamples(reference: ArrayLike<number>, width: number, height: number, count: number): Int32Array {
  const step = Math.max(2, Math.floor(Math.sqrt((width * height) / (count * 40))));
  const candidates: { index: number; code: number }[] = [];
  for (let y = 2; y < height - 2; y += step) {
    for (let x = 2; x < width - 2; x += step) {
      let lo = 255, hi = 0;
      for (let dy = -2; dy <= 2; dy++) {
        for (let dx = -2; dx <= 2; dx++) {
          const v = reference[(y + dy) * width + x + dx];
          if (v < lo) lo = v;
          if (v > hi) hi = v;
        }
      }
      const code = reference[y * width + x];
      if (hi - lo <= 2 + 0.04 * code) candidates.push({ index: y * width + x, code });
    }
  }
  candidates.sort((a, b) => a.code - b.code || a.index - b.index);
  const picks = Math.min(count, candidates.length);
  const out = new Int32Array(picks);
  for (let k = 0; k < picks; k++) out[k] = candidates[Math.floor(((k + 0.5) * candidates.length) / picks)].index;
  return out;
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

/** exp(g) scaled so that code 255 maps to 1 and code 0 to 0: the linearization table for 8-bit frames. */
export function convertResponseToTable(logResponse: Float64Array): Float64Array {
  const table = new Float64Array(LEVELS);
  const top = Math.exp(logResponse[LEVELS - 1]);
  for (let z = 0; z < LEVELS; z++) table[z] = z === 0 ? 0 : Math.exp(logResponse[z]) / top;
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
