// The radial brightness profile and the coverage summary of lib/imaging/profile.ts,
// on synthetic radially symmetric images whose profile is known analytically.
import { describe, expect, it } from "vitest";
import { ImagingError } from "@/lib/imaging/errors";
import { computeRadialProfile, fitRadialPowerLaw, summarizeCoverage } from "@/lib/imaging/profile";

const W = 400;
const H = 300;
const SUN = { x: 180.3, y: 141.7 };
const R_SUN = 40;
const MOON = { x: 182.1, y: 140.2, radiusPx: 42 };

/** An image of f(r in solar radii) about SUN, with the Moon's disk filled with a huge value that must be left out. */
function makeImage(f: (r: number) => number): Float32Array {
  const out = new Float32Array(W * H);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const inMoon = Math.hypot(x - MOON.x, y - MOON.y) <= MOON.radiusPx;
      out[y * W + x] = inMoon ? 1e30 : f(Math.hypot(x - SUN.x, y - SUN.y) / R_SUN);
    }
  }
  return out;
}

describe("computeRadialProfile", () => {
  it("recovers a power law's exponent from a radially symmetric image", () => {
    // Exponent 2.5, the K-corona term of Baumbach (1937) as given in REFERENCES.md (from memory).
    const image = makeImage((r) => 1e-6 * Math.pow(r, -2.5));
    const rings = computeRadialProfile(image, W, H, { centre: SUN, solarRadiusPx: R_SUN, exclude: MOON });
    expect(rings.length).toBeGreaterThan(50);
    expect(rings[0].innerR).toBeCloseTo(1, 12);
    expect(rings[1].innerR - rings[0].innerR).toBeCloseTo(0.05, 12);
    // The farthest ring reaches the farthest corner of the frame.
    const cornerR = Math.hypot(SUN.x, SUN.y) / R_SUN;
    expect(rings[rings.length - 1].outerR).toBeGreaterThan(cornerR - 0.3);
    const fit = fitRadialPowerLaw(rings, 1.2, 4);
    expect(fit).not.toBeNull();
    // Tolerance 0.01 in the exponent: rings of 2 px hold whole pixels, so their mean radius carries sampling error.
    expect(Math.abs(fit!.exponent - 2.5)).toBeLessThan(0.01);
    // Nothing of the Moon's fill value leaks in.
    expect(Math.max(...rings.map((r) => r.meanLuminance))).toBeLessThan(1e-6);
  });

  it("gives Baumbach's K+F corona at 2.0 solar radii (REFERENCES.md: I(2.0) = 2.06e-8, computed)", () => {
    const baumbach = (r: number) => 1e-6 * (0.0532 * r ** -2.5 + 1.425 * r ** -7 + 2.565 * r ** -17);
    const rings = computeRadialProfile(makeImage(baumbach), W, H, { centre: SUN, solarRadiusPx: R_SUN, exclude: MOON, startR: 1.975, stepR: 0.05 });
    // The ring 1.975 to 2.025 is centred on 2.0; its mean differs from I(2.0) by the curvature over the ring, well under 1 %.
    expect(Math.abs(rings[0].meanLuminance / 2.06e-8 - 1)).toBeLessThan(0.01);
  });

  it("leaves out the Moon, invalid pixels and rings too thin to speak for all angles", () => {
    const image = makeImage(() => 1);
    const valid = new Uint8Array(W * H).fill(1);
    for (let i = 0; i < W * 10; i++) valid[i] = 0; // the top ten rows: no frame covered them
    const rings = computeRadialProfile(image, W, H, { centre: SUN, solarRadiusPx: R_SUN, exclude: MOON, valid });
    for (const r of rings) expect(r.meanLuminance).toBe(1);
    // The Moon (42 px, 2.3 px off the Sun's centre) covers most of the first ring (40 to 42 px).
    expect(rings[0].innerR).toBeCloseTo(1, 12);
    expect(rings[0].ringFraction).toBeLessThan(0.5);
    // A ring cut by the frame edge says so.
    expect(rings[rings.length - 1].ringFraction).toBeLessThan(0.5);
    const full = rings.find((r) => r.innerR > 1.5 && r.outerR < 2.5)!;
    expect(full.ringFraction).toBeGreaterThan(0.9);
    expect(full.ringFraction).toBeLessThanOrEqual(1);
  });

  it("refuses bad parameters by name", () => {
    const image = new Float32Array(W * H);
    expect(() => computeRadialProfile(image, W, H, { centre: SUN, solarRadiusPx: 0 })).toThrow(/solarRadiusPx/);
    expect(() => computeRadialProfile(image, W, H, { centre: { x: Number.NaN, y: 0 }, solarRadiusPx: 10 })).toThrow(/centre/);
    expect(() => computeRadialProfile(image, W, H, { centre: SUN, solarRadiusPx: 10, stepR: 0 })).toThrow(/stepR/);
    expect(() => computeRadialProfile(image.subarray(1), W, H, { centre: SUN, solarRadiusPx: 10 })).toThrow(ImagingError);
  });

  it("fits no power law to fewer than three rings", () => {
    expect(fitRadialPowerLaw([])).toBeNull();
  });
});

describe("summarizeCoverage", () => {
  it("counts pixels by contributing frames and averages blocks into a small map", () => {
    const w = 1030, h = 10, frames = 4;
    const coverage = new Uint16Array(w * h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) coverage[y * w + x] = x < 515 ? 4 : x < 1000 ? 2 : 0;
    const s = summarizeCoverage(coverage, w, h, frames, 512);
    expect(s.pixelsByFrames).toEqual([300, 0, 4850, 0, 5150]);
    expect(s.pixelsByFrames.reduce((a, b) => a + b, 0)).toBe(w * h);
    expect(s.uncoveredFraction).toBeCloseTo(300 / (w * h), 12);
    expect(s.meanFrames).toBeCloseTo((5150 * 4 + 4850 * 2) / (w * h), 12);
    // 1030 px at most 512 wide: blocks of 3 px, 344 columns.
    expect([s.map.blockPx, s.map.width, s.map.height]).toEqual([3, 344, 4]);
    expect(s.map.values[0]).toBe(1);
    expect(s.map.values[200]).toBe(0.5);
    expect(s.map.values[343]).toBe(0);
    // Block 171 holds columns 513, 514 (4 frames) and 515 (2 frames).
    expect(s.map.values[171]).toBeCloseTo((4 + 4 + 2) / 3 / 4, 6);
  });

  it("refuses a frame count below one and a map of the wrong size", () => {
    expect(() => summarizeCoverage(new Uint16Array(4), 2, 2, 0)).toThrow(/frameCount/);
    expect(() => summarizeCoverage(new Uint16Array(3), 2, 2, 1)).toThrow(/coverage has 3 values/);
  });
});
