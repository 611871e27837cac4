import { describe, expect, it } from "vitest";
import { computeLuminance, decodeSrgb, ditherToUint8, encodeSrgb } from "@/lib/imaging/srgb";
import { createRng, sampleGaussian, samplePoisson } from "@/lib/imaging/random";

describe("sRGB transfer (IEC 61966-2-1; check values computed, REFERENCES.md)", () => {
  it("encodes 0.18 and 0.5 to the published values", () => {
    expect(encodeSrgb(0.18)).toBeCloseTo(0.461356, 6);
    expect(encodeSrgb(0.5)).toBeCloseTo(0.735357, 6);
  });
  it("decodes 128/255 and 10/255 to the published values", () => {
    expect(decodeSrgb(128 / 255)).toBeCloseTo(0.215861, 6);
    expect(decodeSrgb(10 / 255)).toBeCloseTo(0.003035, 6);
  });
  it("round-trips every 8-bit code and is continuous at the linear segment", () => {
    for (let code = 0; code < 256; code++) expect(encodeSrgb(decodeSrgb(code / 255))).toBeCloseTo(code / 255, 9);
    expect(Math.abs(encodeSrgb(0.0031308) - encodeSrgb(0.0031309))).toBeLessThan(1e-5);
  });
  it("weights luminance with 0.2126, 0.7152, 0.0722 (IEC 61966-2-1)", () => {
    expect(computeLuminance(1, 0, 0)).toBe(0.2126);
    expect(computeLuminance(0, 1, 0)).toBe(0.7152);
    expect(computeLuminance(1, 1, 1)).toBeCloseTo(1, 12);
  });
});

describe("8-bit dithering", () => {
  it("keeps the mean of a value between two codes and stays in range", () => {
    const n = 200_000;
    const values = new Float32Array(n).fill(100.3 / 255);
    const codes = ditherToUint8(values, createRng(7));
    let sum = 0;
    for (const c of codes) sum += c;
    expect(sum / n).toBeCloseTo(100.3, 1);
    const extremes = ditherToUint8(Float32Array.from([-1, 0, 1, 2]), createRng(1));
    expect(Math.min(...extremes)).toBeGreaterThanOrEqual(0);
    expect(extremes[3]).toBe(255);
  });
});

describe("seeded random sources", () => {
  it("repeats a sequence from the same seed and differs between seeds", () => {
    const a = createRng(42);
    const b = createRng(42);
    const c = createRng(43);
    const seqA = [a(), a(), a()];
    expect([b(), b(), b()]).toEqual(seqA);
    expect(c()).not.toBe(seqA[0]);
  });
  it("draws Gaussian deviates with mean 0 and variance 1", () => {
    const rng = createRng(3);
    const n = 100_000;
    let s = 0;
    let s2 = 0;
    for (let i = 0; i < n; i++) {
      const z = sampleGaussian(rng);
      s += z;
      s2 += z * z;
    }
    // Standard errors: mean 1/sqrt(n) = 0.003, variance sqrt(2/n) = 0.0045.
    expect(Math.abs(s / n)).toBeLessThan(0.015);
    expect(Math.abs(s2 / n - 1)).toBeLessThan(0.025);
  });
  it.each([3.5, 40, 5000])("draws Poisson deviates with mean and variance lambda = %d", (lambda) => {
    const rng = createRng(11);
    const n = 60_000;
    let s = 0;
    let s2 = 0;
    let nonIntegers = 0;
    for (let i = 0; i < n; i++) {
      const k = samplePoisson(rng, lambda);
      if (!Number.isInteger(k)) nonIntegers++;
      s += k;
      s2 += k * k;
    }
    const mean = s / n;
    const variance = s2 / n - mean * mean;
    expect(nonIntegers).toBe(0);
    // Five standard errors: mean sqrt(lambda / n), variance about lambda sqrt(2 / n).
    expect(Math.abs(mean - lambda)).toBeLessThan(5 * Math.sqrt(lambda / n));
    expect(Math.abs(variance / lambda - 1)).toBeLessThan(5 * Math.sqrt(2 / n));
  });
});
