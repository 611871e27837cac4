import { describe, expect, it } from "vitest";
import { CCDPROC_CLIP_DEFAULTS, combineSigmaClippedMedian, computeMedian, computeRobustStats, MAD_TO_SIGMA } from "@/lib/imaging/calibrate";
import { ImagingError } from "@/lib/imaging/errors";

/** One-pixel planes from a list of values: a stack of n frames of a single pixel. */
function stackOf(values: number[]): Float32Array[] {
  return values.map((v) => Float32Array.of(v));
}

describe("combineSigmaClippedMedian", () => {
  it("uses ccdproc 2.4's defaults: 3 sigma either side of the mean, population std, one round", () => {
    expect(CCDPROC_CLIP_DEFAULTS).toEqual({ lowSigma: 3, highSigma: 3, centre: "mean", spread: "std", maxRounds: 1 });
    // astropy's mad_std constant, 1 / Phi^-1(3/4) (astropy.stats.mad_std).
    expect(MAD_TO_SIGMA).toBeCloseTo(1 / 0.6744897501960817, 12);
  });

  it("cannot reject one outlier among 10 values with the mean and std, as Samuelson's inequality says", () => {
    // Samuelson (1968), Journal of the American Statistical Association 63:1522: no value lies
    // more than sqrt(n - 1) population standard deviations from the mean, so 3 sigma needs n >= 11.
    const ten = [5, 5, 5, 5, 5, 5, 5, 5, 5, 1e6];
    expect(combineSigmaClippedMedian(stackOf(ten)).rejectedFraction).toBe(0);
    const eleven = [5, 5, 5, 5, 5, 5, 5, 5, 5, 5, 1e6];
    const r = combineSigmaClippedMedian(stackOf(eleven));
    expect(r.rejectedFraction).toBeCloseTo(1 / 11, 12);
    expect(r.combined[0]).toBe(5);
  });

  it("rejects with the median and MAD over several rounds, and takes the median of the rest", () => {
    // Median 3, MAD 1 -> sigma 1.4826: 100 lies 65 sigma out; 1 lies 1.35 sigma out and stays.
    const r = combineSigmaClippedMedian(stackOf([1, 2, 3, 4, 100]), { centre: "median", spread: "mad-std", maxRounds: 5 });
    expect(r.rejectedFraction).toBeCloseTo(1 / 5, 12);
    expect(r.combined[0]).toBe(2.5); // numpy's median of an even count: mean of the middle two
    // The mean/std defaults keep 100 (its z-score is 2.0 < 3) and give the plain median 3.
    expect(combineSigmaClippedMedian(stackOf([1, 2, 3, 4, 100])).combined[0]).toBe(3);
  });

  it("lets the last bounds decide over all values, as astropy's C path does", () => {
    // Computed with astropy 5.2 (Debian) sigma_clip(sigma=3, maxiters=5, cenfunc="median", stdfunc="mad_std",
    // axis=0): round 1 bounds 594.55..603.45 drop 594, round 2 bounds 592.83..606.17 take it back; nothing is masked.
    const values = [602, 603, 598, 598, 600, 601, 596, 600, 594, 599, 599, 599, 602];
    const r = combineSigmaClippedMedian(stackOf(values), { centre: "median", spread: "mad-std", maxRounds: 5 });
    expect(r.rejectedFraction).toBe(0);
    expect(r.combined[0]).toBe(599);
    // One round only: 594 stays out.
    const once = combineSigmaClippedMedian(stackOf(values), { centre: "median", spread: "mad-std", maxRounds: 1 });
    expect(once.rejectedFraction).toBeCloseTo(1 / 13, 12);
    expect(once.combined[0]).toBe(599.5);
  });

  it("clips the low side by lowSigma and the high side by highSigma", () => {
    // Median 10, MAD 1: -40 and 60 lie 34 sigma out, 8 and 12 only 1.35.
    const values = [8, 9, 10, 11, 12, 9, 10, 11, 10, 10, -40, 60];
    const both = combineSigmaClippedMedian(stackOf(values), { centre: "median", spread: "mad-std", maxRounds: 3 });
    expect(both.rejectedFraction).toBeCloseTo(2 / 12, 12);
    const highOnly = combineSigmaClippedMedian(stackOf(values), { centre: "median", spread: "mad-std", maxRounds: 3, lowSigma: 100 });
    expect(highOnly.rejectedFraction).toBeCloseTo(1 / 12, 12);
    expect(highOnly.combined[0]).toBe(10);
  });

  it("works pixel by pixel over whole planes", () => {
    const a = Float32Array.of(1, 10, 7);
    const b = Float32Array.of(3, 20, 7);
    const c = Float32Array.of(2, 30, 7);
    expect([...combineSigmaClippedMedian([a, b, c]).combined]).toEqual([2, 20, 7]);
  });

  it("refuses an empty stack, planes of different sizes and options out of range", () => {
    expect(() => combineSigmaClippedMedian([])).toThrow(ImagingError);
    expect(() => combineSigmaClippedMedian([new Float32Array(4), new Float32Array(5)])).toThrow(/plane 1 has 5 pixels, plane 0 has 4/);
    expect(() => combineSigmaClippedMedian(stackOf([1, 2]), { lowSigma: 0 })).toThrow(/lowSigma/);
    expect(() => combineSigmaClippedMedian(stackOf([1, 2]), { maxRounds: Number.NaN })).toThrow(/maxRounds/);
    expect(() => combineSigmaClippedMedian(stackOf([1, 2]), { centre: "mode" as "mean" })).toThrow(/centre/);
  });
});

describe("computeMedian and computeRobustStats", () => {
  it("give numpy's median and astropy's mad_std", () => {
    expect(computeMedian(Float32Array.of(4, 1, 3, 2))).toBe(2.5);
    expect(computeMedian(Float32Array.of(4, 1, 3, 2), Uint8Array.of(1, 1, 1, 0))).toBe(3);
    expect(computeMedian(new Float32Array(0))).toBeNaN();
    // Selection, not sorting, finds the median: the same as a full sort on odd, even, constant and tied data.
    for (const n of [1, 2, 7, 1000, 1001, 4096]) {
      for (const make of [(i: number) => (i * 7919) % 101, () => 5, (i: number) => n - i, (i: number) => (i % 3) - 1]) {
        const values = Float32Array.from({ length: n }, (_, i) => make(i));
        const sorted = values.slice().sort();
        const expected = n % 2 ? sorted[n >> 1] : (sorted[(n >> 1) - 1] + sorted[n >> 1]) / 2;
        expect(computeMedian(values)).toBe(expected);
      }
    }
    const s = computeRobustStats(Float32Array.of(1, 2, 3, 4, 100));
    expect(s.median).toBe(3);
    expect(s.sigma).toBeCloseTo(MAD_TO_SIGMA, 6);
  });
});
