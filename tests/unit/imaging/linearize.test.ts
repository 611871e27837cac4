import { describe, expect, it } from "vitest";
import { estimateDarkNoiseSigma, linearizeFrame, patchDefects, repairDefects, validateFrame } from "@/lib/imaging/linearize";
import { ImagingError } from "@/lib/imaging/errors";
import { createRng, sampleGaussian } from "@/lib/imaging/random";
import type { LinearFrame } from "@/lib/imaging/types";

function makeFrame(values: number[], width: number, height: number, extra: Partial<LinearFrame> = {}): LinearFrame {
  return {
    name: "frame-a.tif",
    image: { width, height, planes: [Float32Array.from(values)] },
    exposureS: 0.01,
    blackLevel: 100,
    whiteLevel: 1100,
    encoding: "linear",
    ...extra,
  };
}

describe("linearizeFrame", () => {
  it("subtracts the black level and marks clipped pixels dilated by one pixel", () => {
    const values = new Array(25).fill(300);
    values[12] = 1100; // centre of 5 x 5
    values[0] = 1019; // just below 0.92 x (1100 - 100) + 100 = 1020
    const lin = linearizeFrame(makeFrame(values, 5, 5), 0.92);
    expect(lin.planes[0][1]).toBe(200);
    expect(lin.clipLevel).toBeCloseTo(920, 9);
    const marked = [...lin.clipped].map((v, i) => (v ? i : -1)).filter((i) => i >= 0);
    expect(marked).toEqual([6, 7, 8, 11, 12, 13, 16, 17, 18]);
  });

  it("decodes 8-bit codes with the sRGB curve (IEC 61966-2-1; 128/255 -> 0.215861, computed)", () => {
    const lin = linearizeFrame(makeFrame([0, 128, 255, 10], 2, 2, { encoding: "srgb8", blackLevel: 0, whiteLevel: 255 }), 0.92);
    expect(lin.planes[0][1]).toBeCloseTo(0.215861, 6);
    expect(lin.planes[0][3]).toBeCloseTo(0.003035, 6);
    expect(lin.clipped[2]).toBe(1);
    expect(lin.noiseFloor[0]).toBe(1);
    expect(lin.noiseFloor[1]).toBe(0);
  });

  it("estimates Gaussian dark noise (Immerkaer 1996) within 5 %", () => {
    const rng = createRng(21);
    const plane = new Float32Array(200 * 200);
    for (let i = 0; i < plane.length; i++) plane[i] = 50 + 4 * sampleGaussian(rng);
    expect(estimateDarkNoiseSigma(plane, 200, 200) / 4).toBeGreaterThan(0.95);
    expect(estimateDarkNoiseSigma(plane, 200, 200) / 4).toBeLessThan(1.05);
  });

  it("names the frame and the fault on bad input", () => {
    expect(() => validateFrame(makeFrame([1, 2, 3, 4], 2, 2, { exposureS: 0 }))).toThrow(/frame-a\.tif: exposureS must be a positive/);
    expect(() => validateFrame(makeFrame([1, 2, 3, 4], 2, 2, { exposureS: Number.NaN }))).toThrow(ImagingError);
    expect(() => validateFrame(makeFrame([1, 2, 3], 2, 2))).toThrow(/plane 0 has 3 values/);
    expect(() => validateFrame(makeFrame([1, 2, 3, 4], 2, 2, { whiteLevel: 50 }))).toThrow(/whiteLevel \(50\) must exceed blackLevel/);
    expect(() => linearizeFrame(makeFrame([1, 2, 3, 4], 2, 2), 1.5)).toThrow(/clipFraction/);
    expect(() => linearizeFrame(makeFrame([1, 300, 3, 4], 2, 2, { encoding: "srgb8" }), 0.9)).toThrow(/8-bit codes must be 0\.\.255/);
  });
});

describe("repairing defects for a warp", () => {
  // 4 x 3 plane with two defects side by side (5 and 6) and one in a corner (11).
  const plane = () => Float32Array.from([1, 2, 3, 4, 5, 900, -7, 8, 9, 10, 11, 1e6]);
  const masked = Uint8Array.from([0, 0, 0, 0, 0, 1, 1, 0, 0, 0, 0, 1]);

  it("repairDefects fills each defect with the median of its sound neighbours", () => {
    const out = repairDefects(plane(), masked, 4, 3);
    // Pixel 5 (x 1, y 1): sound neighbours 1, 2, 3, 5, 9, 10, 11 -> median 5. Pixel 6: 2, 3, 4, 8, 10, 11 -> 8 (upper median).
    // Pixel 11 (x 3, y 2): sound neighbours 8 and 11 -> 11.
    expect(Array.from(out)).toEqual([1, 2, 3, 4, 5, 5, 8, 8, 9, 10, 11, 11]);
  });

  it("finds defects four pixels at a time as it does one at a time: after the last whole word, and in a map not aligned to words", () => {
    // 5 x 3: the last pixel lies beyond the three whole words; the shifted map is read byte by byte.
    const wide = Float32Array.from([1, 2, 3, 4, 5, 6, 70, 8, 9, 10, 11, 12, 13, 14, 1e6]);
    const defects = Uint8Array.from([0, 0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0, 0, 0, 1]);
    // Pixel 6 (x 1, y 1): 1, 2, 3, 8, 11, 12, 13, 6 -> sorted 1 2 3 6 8 11 12 13, upper median 8. Pixel 14 (x 4, y 2): 9, 10, 14 -> 10.
    const expected = [1, 2, 3, 4, 5, 6, 8, 8, 9, 10, 11, 12, 13, 14, 10];
    expect(Array.from(repairDefects(wide, defects, 5, 3))).toEqual(expected);
    const shifted = new Uint8Array(16).subarray(1);
    shifted.set(defects);
    expect(Array.from(repairDefects(wide, shifted, 5, 3))).toEqual(expected);
  });

  it("patchDefects gives the same plane in place and puts the defects' values back", () => {
    const p = plane();
    const restore = patchDefects(p, masked, 4, 3);
    expect(Array.from(p)).toEqual(Array.from(repairDefects(plane(), masked, 4, 3)));
    restore();
    expect(Array.from(p)).toEqual(Array.from(plane()));
  });
});
