// Small seeded random sources, so synthetic brackets, RANSAC and dithering are
// reproducible from a seed. Not for cryptography.

export type Rng = () => number;

/**
 * mulberry32 (Tommy Ettinger, public domain): a 32-bit state generator with a
 * full 2^32 period, returning uniform numbers in [0, 1).
 */
export function createRng(seed: number): Rng {
  let state = seed >>> 0;
  return () => {
    state = advanceMulberry32(state);
    return mixMulberry32(state);
  };
}

/** mulberry32's state after one draw: a Weyl sequence, so draw k's state is seed + k 0x6d2b79f5 (mod 2^32). */
export function advanceMulberry32(state: number): number {
  return (state + 0x6d2b79f5) >>> 0;
}

/** mulberry32's output for an advanced state, in [0, 1): createRng's draws, for loops that keep the state themselves. */
export function mixMulberry32(state: number): number {
  let t = state;
  t = Math.imul(t ^ (t >>> 15), t | 1);
  t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
  // Times 2^-32, exactly the division by 2^32 (a power of two), and cheaper.
  return ((t ^ (t >>> 14)) >>> 0) * 2.3283064365386963e-10;
}

/** Standard normal deviate by the Box-Muller transform (Box and Muller 1958): z = sqrt(-2 ln u1) cos(2 pi u2). */
export function sampleGaussian(rng: Rng): number {
  let u1 = rng();
  while (u1 <= 0) u1 = rng();
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * rng());
}

// ln Gamma(x) for x > 0 by the Lanczos approximation (g = 7, n = 9), accurate to
// about 1e-15 relative; the Poisson rejection test needs ln k!.
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];
export function computeLnGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - computeLnGamma(1 - x);
  const z = x - 1;
  let a = LANCZOS[0];
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

/**
 * Poisson deviate with mean lambdaMean. Below 10: Knuth's multiplication method
 * (TAOCP vol. 2, 3.4.1). From 10 up: Hoermann (1993), "The transformed rejection
 * method for generating Poisson random variables", Insurance: Mathematics and
 * Economics 12:39 (algorithm PTRS), which stays O(1) for the large counts of a
 * well exposed frame.
 */
export function samplePoisson(rng: Rng, lambdaMean: number): number {
  if (!(lambdaMean > 0)) return 0;
  if (lambdaMean < 10) {
    const limit = Math.exp(-lambdaMean);
    let k = 0;
    let p = rng();
    while (p > limit) {
      k++;
      p *= rng();
    }
    return k;
  }
  const sqrtLam = Math.sqrt(lambdaMean);
  const logLam = Math.log(lambdaMean);
  const b = 0.931 + 2.53 * sqrtLam;
  const a = -0.059 + 0.02483 * b;
  const invAlpha = 1.1239 + 1.1328 / (b - 3.4);
  const vr = 0.9277 - 3.6224 / (b - 2);
  for (;;) {
    const u = rng() - 0.5;
    const v = rng();
    const us = 0.5 - Math.abs(u);
    const k = Math.floor(((2 * a) / us + b) * u + lambdaMean + 0.43);
    if (us >= 0.07 && v <= vr) return k;
    if (k < 0 || (us < 0.013 && v > us)) continue;
    if (Math.log(v) + Math.log(invAlpha) - Math.log(a / (us * us) + b) <= -lambdaMean + k * logLam - computeLnGamma(k + 1)) {
      return k;
    }
  }
}
