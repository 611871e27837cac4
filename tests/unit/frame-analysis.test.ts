// Triage measures on synthetic frames whose truth we set: a dark lunar disk of
// known centre and radius inside a corona falling off as r^-3, a blurred copy,
// and histograms of frames with known values.
import { describe, expect, it } from "vitest";
import { HISTOGRAM_BINS, markBlurred, measureHistogram, measureLimb, measureSharpness, shrinkLuminance } from "@/lib/bracket-sets/frame-analysis";
import { blurGaussian } from "@/lib/imaging/blur";
import type { PlaneImage } from "@/lib/imaging/types";

const W = 1200;
const H = 900;
const MOON = { x: 611.3, y: 437.8, r: 150 };
const WHITE = 16383;
const BLACK = 256;

/** Dark disk (earthshine) in a corona of brightness A (R/r)^3, the edge anti-aliased by 4x4 supersampling. */
function makeEclipseFrame(): PlaneImage {
  const plane = new Float32Array(W * H);
  const value = (x: number, y: number) => {
    const r = Math.hypot(x - MOON.x, y - MOON.y);
    return r < MOON.r ? 40 : 9000 * (MOON.r / r) ** 3;
  };
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const r = Math.hypot(x - MOON.x, y - MOON.y);
      let v = 0;
      if (Math.abs(r - MOON.r) < 2) {
        for (let sy = 0; sy < 4; sy++) for (let sx = 0; sx < 4; sx++) v += value(x - 0.375 + sx * 0.25, y - 0.375 + sy * 0.25);
        v /= 16;
      } else v = value(x, y);
      plane[y * W + x] = BLACK + v;
    }
  }
  return { width: W, height: H, planes: [plane] };
}

const frame = makeEclipseFrame();

describe("measureLimb", () => {
  it("finds a disk of known centre and radius, in the original's pixels", () => {
    const limb = measureLimb(frame, { encoding: "linear", blackLevel: BLACK, whiteLevel: WHITE });
    expect(limb.quality).toBe("good");
    // Tolerance: the fit runs on a 3x shrunk copy (1200 px -> 400 px), and lib/imaging/limb-fit.ts
    // documents an inward radius bias of about 0.3 px there for a sharp edge, so 3 x 0.3 px plus
    // the shrinking's own averaging; 1.5 px is 1 % of the radius. The centre has no such bias.
    expect(Math.abs(limb.radiusPx - MOON.r)).toBeLessThan(1.5);
    expect(Math.abs(limb.cx - MOON.x)).toBeLessThan(0.5);
    expect(Math.abs(limb.cy - MOON.y)).toBeLessThan(0.5);
    expect(limb.rmsPx).toBeLessThan(1);
  });

  it("finds the same disk in an 8-bit sRGB colour frame (decoded to linear light first)", () => {
    // IEC 61966-2-1 encoding (REFERENCES.md, sRGB) of the linear frame scaled to its white level.
    const encode = (l: number) => Math.round(255 * (l <= 0.0031308 ? 12.92 * l : 1.055 * l ** (1 / 2.4) - 0.055));
    const codes = frame.planes[0].map((v) => encode(Math.min(1, (v - BLACK) / (WHITE - BLACK))));
    const limb = measureLimb({ width: W, height: H, planes: [codes, codes, codes] }, { encoding: "srgb8", blackLevel: 0, whiteLevel: 255 });
    expect(limb.quality).not.toBe("failed");
    // Same tolerance as above; 8-bit quantization adds well under a pixel on a 150 px limb.
    expect(Math.abs(limb.radiusPx - MOON.r)).toBeLessThan(1.5);
    expect(Math.hypot(limb.cx - MOON.x, limb.cy - MOON.y)).toBeLessThan(0.5);
  });

  it("reports a failed fit on a frame without a disk, with finite numbers", () => {
    const flat = { width: 300, height: 200, planes: [new Float32Array(300 * 200).fill(1000)] };
    const limb = measureLimb(flat, { encoding: "linear", blackLevel: 0, whiteLevel: WHITE });
    expect(limb.quality).toBe("failed");
    expect(Number.isFinite(limb.cx) && Number.isFinite(limb.radiusPx)).toBe(true);
  });
});

describe("measureSharpness", () => {
  it("is lower for a blurred copy of the same frame", () => {
    const blurred = { width: W, height: H, planes: [blurGaussian(frame.planes[0], W, H, 6)] };
    const sharp = measureSharpness(frame);
    const soft = measureSharpness(blurred);
    expect(sharp).toBeGreaterThan(0);
    expect(soft).toBeLessThan(0.5 * sharp);
  });

  it("does not depend on exposure or black level: S(a Y + b) = S(Y) (derived from the Laplacian's linearity)", () => {
    const scaled = { width: W, height: H, planes: [frame.planes[0].map((v) => 0.25 * v + 500)] };
    expect(measureSharpness(scaled)).toBeCloseTo(measureSharpness(frame), 4);
  });

  it("is 0 for a flat frame", () => {
    expect(measureSharpness({ width: 64, height: 64, planes: [new Float32Array(64 * 64).fill(7)] })).toBe(0);
  });
});

describe("measureHistogram", () => {
  it("has 64 bins that add up to the pixel count", () => {
    const h = measureHistogram(frame, WHITE);
    expect(h).toHaveLength(HISTOGRAM_BINS);
    expect(h.reduce((s, n) => s + n, 0)).toBe(W * H);
  });

  it("puts values in bins of equal width from 0 to the white level, clipped values in the last", () => {
    // Luminance of RGB uses 0.2126, 0.7152, 0.0722 (REFERENCES.md, sRGB): grey stays grey.
    const n = 8;
    const plane = Float32Array.from([0, 3.9, 4, 128, 255, 300, -5, 127.9]);
    const img = { width: n, height: 1, planes: [plane, plane, plane] };
    const h = measureHistogram(img, 256);
    // 256 / 64 = 4 units a bin.
    expect(h[0]).toBe(3); // 0, 3.9 and -5
    expect(h[1]).toBe(1); // 4
    expect(h[31]).toBe(1); // 127.9
    expect(h[32]).toBe(1); // 128
    expect(h[63]).toBe(2); // 255 and 300
  });

  it("takes the brightest value as the range when the white level is not finite (float data)", () => {
    const img = { width: 4, height: 1, planes: [Float32Array.from([0, 0.5, 1, 2])] };
    const h = measureHistogram(img, Number.POSITIVE_INFINITY);
    expect(h[0]).toBe(1);
    expect(h[16]).toBe(1);
    expect(h[32]).toBe(1);
    expect(h[63]).toBe(1);
  });
});

describe("shrinkLuminance", () => {
  it("shrinks by a whole factor to at most the given side, keeping the mean", () => {
    const lum = shrinkLuminance(frame, 512);
    expect(lum.factor).toBe(3);
    expect(lum.width).toBe(400);
    expect(lum.height).toBe(300);
    const mean = (a: Float32Array) => a.reduce((s, v) => s + v, 0) / a.length;
    expect(mean(lum.data)).toBeCloseTo(mean(frame.planes[0]), 0);
  });
});

describe("markBlurred", () => {
  it("marks light frames below half the median of the set's light frames", () => {
    const marks = markBlurred([
      { sharpness: 1.0, isLight: true },
      { sharpness: 0.9, isLight: true },
      { sharpness: 0.4, isLight: true },
      { sharpness: 1.1, isLight: true },
      { sharpness: 0.01, isLight: false },
      { isLight: true },
    ]);
    // Median of 1.0, 0.9, 0.4, 1.1 is 0.95; half is 0.475.
    expect(marks).toEqual([false, false, true, false, false, false]);
  });

  it("compares a long exposure with its peers within two stops, not with the short ones", () => {
    // A ladder 1/1000 .. 1 s: the two long frames are smooth, as their purpose makes them, and sharp among themselves.
    const ladder = [
      { sharpness: 1.0, isLight: true, exposureS: 1 / 1000 },
      { sharpness: 0.95, isLight: true, exposureS: 1 / 250 },
      { sharpness: 0.9, isLight: true, exposureS: 1 / 60 },
      { sharpness: 0.3, isLight: true, exposureS: 1 / 4 },
      { sharpness: 0.28, isLight: true, exposureS: 1 },
    ];
    expect(markBlurred(ladder)).toEqual([false, false, false, false, false]);
    // Three frames at 1/250 s: the one at a third of its peers' median is soft.
    const repeated = [
      { sharpness: 1.0, isLight: true, exposureS: 1 / 250 },
      { sharpness: 0.98, isLight: true, exposureS: 1 / 250 },
      { sharpness: 0.33, isLight: true, exposureS: 1 / 250 },
    ];
    expect(markBlurred(repeated)).toEqual([false, false, true]);
  });

  it("marks nothing with fewer than three measured light frames", () => {
    expect(markBlurred([{ sharpness: 1, isLight: true }, { sharpness: 0.01, isLight: true }])).toEqual([false, false]);
  });
});
