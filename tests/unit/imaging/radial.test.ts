import { describe, expect, it } from "vitest";
import { applyMgn, applyNrgf, computeArctan } from "@/lib/imaging/radial";
import { blurGaussian } from "@/lib/imaging/blur";
import { ImagingError } from "@/lib/imaging/errors";
import { createRng, sampleGaussian } from "@/lib/imaging/random";

const W = 240;
const H = 200;
const SUN = { x: 118.3, y: 97.6 };
const DISK = { x: 119.1, y: 97.2, radiusPx: 31 };

describe("NRGF (Morgan, Habbal and Woo 2006)", () => {
  it("maps A(r)(1 + e cos 2 phi) to sqrt(2) cos 2 phi for any A and e (invariant derived in REFERENCES.md)", () => {
    for (const [amplitude, e] of [[5e4, 0.35], [20, 0.8]]) {
      const plane = new Float32Array(W * H);
      for (let y = 0; y < H; y++) {
        for (let x = 0; x < W; x++) {
          const r = Math.hypot(x - SUN.x, y - SUN.y);
          const phi = Math.atan2(y - SUN.y, x - SUN.x);
          plane[y * W + x] = amplitude * Math.pow(Math.max(r, 1) / 30, -3) * (1 + e * Math.cos(2 * phi));
        }
      }
      const { data, valid } = applyNrgf(plane, W, H, { sunCentre: SUN, lunarDisk: DISK });
      let sum2 = 0, count = 0, worst = 0, invalid = 0;
      for (let y = 0; y < H; y++) {
        for (let x = 0; x < W; x++) {
          const r = Math.hypot(x - SUN.x, y - SUN.y);
          if (r < 40 || r > 95) continue; // full rings only
          const i = y * W + x;
          if (!valid[i]) invalid++;
          const expected = Math.SQRT2 * Math.cos(2 * Math.atan2(y - SUN.y, x - SUN.x));
          const d = data[i] - expected;
          sum2 += d * d;
          count++;
          worst = Math.max(worst, Math.abs(d));
        }
      }
      expect(invalid).toBe(0);
      expect(Math.sqrt(sum2 / count)).toBeLessThan(0.01);
      expect(worst).toBeLessThan(0.05);
    }
  });
  it("masks the lunar disk and refuses bad parameters", () => {
    const plane = new Float32Array(W * H).fill(1);
    const { valid } = applyNrgf(plane, W, H, { sunCentre: SUN, lunarDisk: DISK });
    expect(valid[Math.round(DISK.y) * W + Math.round(DISK.x)]).toBe(0);
    expect(() => applyNrgf(plane, W, H, { sunCentre: SUN, binWidthPx: 0 })).toThrow(/binWidthPx/);
    expect(() => applyNrgf(plane, W, H, { sunCentre: { x: Number.NaN, y: 0 } })).toThrow(/sunCentre/);
    expect(() => applyNrgf(plane.subarray(1), W, H, { sunCentre: SUN })).toThrow(ImagingError);
  });
});

describe("MGN (Morgan and Druckmueller 2014)", () => {
  const rng = createRng(77);
  const noise = new Float32Array(W * H);
  for (let i = 0; i < noise.length; i++) noise[i] = sampleGaussian(rng);
  const texture = blurGaussian(noise, W, H, 2);
  const plane = new Float32Array(W * H);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const r = Math.max(1, Math.hypot(x - SUN.x, y - SUN.y) / 30);
      plane[y * W + x] = 1000 * Math.pow(r, -4) * (1 + 0.5 * texture[y * W + x]);
    }
  }

  it("is invariant under B -> a B + b for a > 0 (derived, REFERENCES.md)", () => {
    const base = applyMgn(plane, W, H, { lunarDisk: DISK });
    const shifted = applyMgn(plane.map((v) => 37.5 * v + 1234), W, H, { lunarDisk: DISK });
    let worst = 0;
    let checked = 0;
    for (let i = 0; i < plane.length; i++) {
      if (!base.valid[i]) continue;
      worst = Math.max(worst, Math.abs(base.data[i] - shifted.data[i]));
      checked++;
    }
    expect(checked).toBeGreaterThan(W * H * 0.9);
    expect(worst).toBeLessThan(2e-3);
  });

  it("stays inside its bounds and leaves the lunar disk out", () => {
    const { data, valid } = applyMgn(plane, W, H, { lunarDisk: DISK, h: 0.7 });
    expect(valid[Math.round(DISK.y) * W + Math.round(DISK.x)]).toBe(0);
    let lo = Infinity, hi = -Infinity;
    for (let i = 0; i < data.length; i++) if (valid[i]) { lo = Math.min(lo, data[i]); hi = Math.max(hi, data[i]); }
    // h C'_g lies in [0, h]; each arctan in (-pi/2, pi/2).
    expect(lo).toBeGreaterThan(-0.3 * Math.PI / 2);
    expect(hi).toBeLessThan(0.7 + 0.3 * Math.PI / 2);
    expect(hi - lo).toBeGreaterThan(0.3);
  });

  it("refuses invalid parameters by name", () => {
    expect(() => applyMgn(plane, W, H, { k: 0 })).toThrow(/k must be/);
    expect(() => applyMgn(plane, W, H, { h: 1.5 })).toThrow(/h must be/);
    expect(() => applyMgn(plane, W, H, { gamma: -1 })).toThrow(/gamma/);
    expect(() => applyMgn(plane, W, H, { widthsPx: [] })).toThrow(/widthsPx/);
    expect(() => applyMgn(plane, W, H, { widthsPx: [2, 0.1] })).toThrow(/widthsPx\[1\]/);
  });
});

describe("computeArctan (Abramowitz and Stegun 4.4.49, |error| <= 2e-8)", () => {
  it("matches Math.atan to 2e-8 over a wide range", () => {
    let worst = 0;
    for (let x = -50; x <= 50; x += 0.0137) worst = Math.max(worst, Math.abs(computeArctan(x) - Math.atan(x)));
    expect(worst).toBeLessThan(2.5e-8);
    expect(computeArctan(0)).toBe(0);
  });
});
