import { describe, expect, it } from "vitest";
import {
  computeCircleResiduals,
  fitCircleGanderAlgebraic,
  fitCircleGeometric,
  fitCircleKasa,
  fitCirclePratt,
  fitCircleTaubin,
  fitCircleThroughThree,
} from "@/lib/imaging/circle-fit";
import { ImagingError } from "@/lib/imaging/errors";
import { createRng, sampleGaussian } from "@/lib/imaging/random";

// Gander, Golub and Strebel (1994), BIT 34:558, the short-arc example (data and
// results from memory, reproduced by computation; REFERENCES.md).
const GGS_X = [1, 2, 5, 7, 9, 3];
const GGS_Y = [7, 6, 8, 7, 5, 7];

describe("circle fits on the Gander-Golub-Strebel (1994) data", () => {
  it("algebraic fit |u| = 1 gives centre (5.3794, 7.2532), R 3.0370 (GGS 1994, from memory)", () => {
    const c = fitCircleGanderAlgebraic(GGS_X, GGS_Y);
    expect(c.cx).toBeCloseTo(5.3794, 3);
    expect(c.cy).toBeCloseTo(7.2532, 3);
    expect(c.r).toBeCloseTo(3.037, 3);
  });
  it("geometric fit gives centre (4.7398, 2.9835), R 4.7142, SSR 1.22760 (GGS 1994, from memory)", () => {
    const c = fitCircleGeometric(GGS_X, GGS_Y);
    expect(c.converged).toBe(true);
    expect(c.cx).toBeCloseTo(4.7398, 3);
    expect(c.cy).toBeCloseTo(2.9835, 3);
    expect(c.r).toBeCloseTo(4.7142, 3);
    expect(c.sumSquaredResiduals).toBeCloseTo(1.2276, 4);
  });
  it("the geometric fit reaches the same minimum from the poor algebraic start", () => {
    const c = fitCircleGeometric(GGS_X, GGS_Y, fitCircleGanderAlgebraic(GGS_X, GGS_Y));
    expect(c.cx).toBeCloseTo(4.7398, 3);
    expect(c.r).toBeCloseTo(4.7142, 3);
  });
  it("Kasa gives centre (4.74233, 3.83512) R 4.10876 (computed, REFERENCES.md)", () => {
    const c = fitCircleKasa(GGS_X, GGS_Y);
    expect(c.cx).toBeCloseTo(4.74233, 4);
    expect(c.cy).toBeCloseTo(3.83512, 4);
    expect(c.r).toBeCloseTo(4.10876, 4);
  });
  it("Pratt gives centre (4.61548, 2.80735) R 4.91130 (computed, REFERENCES.md)", () => {
    const c = fitCirclePratt(GGS_X, GGS_Y);
    expect(c.cx).toBeCloseTo(4.61548, 4);
    expect(c.cy).toBeCloseTo(2.80735, 4);
    expect(c.r).toBeCloseTo(4.9113, 4);
  });
  it("Taubin gives centre (4.61393, 2.79521) R 4.87921 (computed, REFERENCES.md)", () => {
    const c = fitCircleTaubin(GGS_X, GGS_Y);
    expect(c.cx).toBeCloseTo(4.61393, 4);
    expect(c.cy).toBeCloseTo(2.79521, 4);
    expect(c.r).toBeCloseTo(4.87921, 4);
  });
});

describe("circle fits on exact and noisy circles", () => {
  it("every fit recovers an exact circle far from the origin", () => {
    const xs: number[] = [];
    const ys: number[] = [];
    for (let k = 0; k < 12; k++) {
      const t = 0.3 + (k * 2.1) / 12;
      xs.push(2500.25 + 310.5 * Math.cos(t));
      ys.push(1800.75 + 310.5 * Math.sin(t));
    }
    for (const fit of [fitCircleKasa, fitCirclePratt, fitCircleTaubin, fitCircleGeometric]) {
      const c = fit(xs, ys);
      expect(c.cx).toBeCloseTo(2500.25, 6);
      expect(c.cy).toBeCloseTo(1800.75, 6);
      expect(c.r).toBeCloseTo(310.5, 6);
    }
    expect(Math.max(...computeCircleResiduals(xs, ys, { cx: 2500.25, cy: 1800.75, r: 310.5 }).map(Math.abs))).toBeLessThan(1e-9);
  });

  it("geometric fit variance on noisy full circles matches the Cramer-Rao bound (computed, REFERENCES.md)", () => {
    // Bound for N points evenly around a full circle with radial noise sigma:
    // var(cx) = var(cy) = 2 sigma^2 / N, var(R) = sigma^2 / N.
    const rng = createRng(2024);
    const n = 60;
    const sigma = 0.4;
    const trials = 600;
    let sx = 0, sx2 = 0, sr = 0, sr2 = 0;
    for (let t = 0; t < trials; t++) {
      const xs = new Float64Array(n);
      const ys = new Float64Array(n);
      for (let k = 0; k < n; k++) {
        const phi = (2 * Math.PI * k) / n;
        const rad = 150 + sigma * sampleGaussian(rng);
        xs[k] = 200 + rad * Math.cos(phi);
        ys[k] = 180 + rad * Math.sin(phi);
      }
      const c = fitCircleGeometric(xs, ys);
      sx += c.cx - 200;
      sx2 += (c.cx - 200) ** 2;
      sr += c.r - 150;
      sr2 += (c.r - 150) ** 2;
    }
    const varX = sx2 / trials - (sx / trials) ** 2;
    const varR = sr2 / trials - (sr / trials) ** 2;
    // Sample variances of 600 trials have a relative standard error of sqrt(2/600) = 5.8 %: allow about 3.5 of them.
    expect(varX / ((2 * sigma * sigma) / n)).toBeGreaterThan(0.8);
    expect(varX / ((2 * sigma * sigma) / n)).toBeLessThan(1.2);
    expect(varR / ((sigma * sigma) / n)).toBeGreaterThan(0.8);
    expect(varR / ((sigma * sigma) / n)).toBeLessThan(1.2);
    expect(Math.abs(sx / trials)).toBeLessThan(4 * Math.sqrt((2 * sigma * sigma) / n / trials));
  });

  it("the circle through three points is exact and refuses collinear points", () => {
    const c = fitCircleThroughThree(5, 0, 0, 5, -5, 0);
    expect(c).not.toBeNull();
    expect(c!.cx).toBeCloseTo(0, 12);
    expect(c!.r).toBeCloseTo(5, 12);
    expect(fitCircleThroughThree(0, 0, 1, 1, 2, 2)).toBeNull();
  });
});

describe("circle fits refuse bad input", () => {
  it("names the fault for too few points, unequal lengths and collinear points", () => {
    expect(() => fitCircleKasa([1, 2], [1, 2])).toThrow(/at least 3 points, got 2/);
    expect(() => fitCirclePratt([1, 2, 3], [1, 2])).toThrow(/different lengths/);
    expect(() => fitCircleKasa([0, 1, 2, 3], [0, 1, 2, 3])).toThrow(ImagingError);
  });
});
