// The structure rendition's strength (MGN: h = 1 - strength; NRGF blended with
// the gamma-stretched overall image) and the linear-light downscaling of renditions.
import { describe, expect, it } from "vitest";
import { reduceBracket } from "@/lib/imaging/pipeline";
import { ImagingError } from "@/lib/imaging/errors";
import { computeScaledSize, scaleImageLinear } from "@/lib/imaging/pyramid";
import { applyMgn, applyNrgf, blendWithGlobalImage } from "@/lib/imaging/radial";
import { decodeSrgb, encodeSrgb } from "@/lib/imaging/srgb";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { DEFAULT_REDUCTION_PARAMS, type LinearFrame } from "@/lib/imaging/types";

const W = 160;
const H = 140;
const SUN = { x: 80.4, y: 69.6 };
const DISK = { x: 80.4, y: 69.6, radiusPx: 20 };

/** I = A(r)(1 + e cos 2 phi): the NRGF invariant of REFERENCES.md (derived) gives sqrt(2) cos 2 phi for any A and e. */
function makeStreamerPlane(): Float32Array {
  const plane = new Float32Array(W * H);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const r = Math.max(1, Math.hypot(x - SUN.x, y - SUN.y) / 20);
      const phi = Math.atan2(y - SUN.y, x - SUN.x);
      plane[y * W + x] = 1000 * r ** -3 * (1 + 0.4 * Math.cos(2 * phi));
    }
  }
  return plane;
}

/** Mean of the valid values in the ring [r0, r1) px about the Sun. */
function ringMean(data: Float32Array, valid: Uint8Array, r0: number, r1: number): number {
  let sum = 0, n = 0;
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
    const r = Math.hypot(x - SUN.x, y - SUN.y);
    const i = y * W + x;
    if (valid[i] && r >= r0 && r < r1) { sum += data[i]; n++; }
  }
  return sum / n;
}

describe("blendWithGlobalImage (NRGF with a strength)", () => {
  const plane = makeStreamerPlane();
  const nrgf = applyNrgf(plane, W, H, { sunCentre: SUN, lunarDisk: DISK });

  it("is NRGF itself at strength 1", () => {
    expect(blendWithGlobalImage(nrgf, plane, 1)).toBe(nrgf);
  });

  it("stays in 0..1 and keeps more of the radial fall-off as the strength drops", () => {
    const falloff = (strength: number) => {
      const { data, valid } = blendWithGlobalImage(nrgf, plane, strength);
      for (let i = 0; i < data.length; i++) if (valid[i]) { expect(data[i]).toBeGreaterThanOrEqual(0); expect(data[i]).toBeLessThanOrEqual(1); }
      return ringMean(data, valid, 22, 26) - ringMean(data, valid, 50, 54);
    };
    const gentle = falloff(0.05), middle = falloff(0.3), strong = falloff(0.95);
    // NRGF removes the fall-off (ring means equal); the gamma image keeps it.
    expect(gentle).toBeGreaterThan(middle);
    expect(middle).toBeGreaterThan(strong);
    expect(Math.abs(falloff(1 - 1e-9))).toBeLessThan(0.05);
  });

  it("refuses a strength outside 0..1 by name", () => {
    expect(() => blendWithGlobalImage(nrgf, plane, 1.5)).toThrow(/strength must be/);
    expect(() => blendWithGlobalImage(nrgf, plane.subarray(1), 0.5)).toThrow(ImagingError);
  });
});

describe("filterStrength in the pipeline", () => {
  const { frames, truth } = synthesizeBracket({ width: 192, height: 176, channels: 1, exposuresS: [1 / 500, 1 / 60, 1 / 8], sunRadiusPx: 36, seed: 5 });
  const linear: LinearFrame[] = frames.map((f) => ({
    name: f.name, image: { width: 192, height: 176, planes: f.planes }, exposureS: f.exposureS,
    blackLevel: truth.blackLevel, whiteLevel: truth.whiteLevel, encoding: "linear", captureTimeMs: f.captureTimeMs,
  }));
  const params = { ...DEFAULT_REDUCTION_PARAMS, registration: "moon" as const };

  it("keeps MGN's published weighting at the default: h = 1 - 0.3 = 0.7 (Morgan and Druckmueller 2014, from memory)", () => {
    expect(DEFAULT_REDUCTION_PARAMS.filterStrength).toBe(0.3);
    const plane = makeStreamerPlane();
    const ours = applyMgn(plane, W, H, { lunarDisk: DISK, h: 1 - DEFAULT_REDUCTION_PARAMS.filterStrength! });
    const published = applyMgn(plane, W, H, { lunarDisk: DISK, h: 0.7 });
    expect(ours.data).toEqual(published.data);
  });

  it("changes the structure rendition with the strength, not the master or the natural rendition", () => {
    const gentle = reduceBracket(linear, { ...params, filterStrength: 0.05 });
    const strong = reduceBracket(linear, { ...params, filterStrength: 1 });
    expect(strong.master.planes[0]).toEqual(gentle.master.planes[0]);
    expect(strong.natural.planes[0]).toEqual(gentle.natural.planes[0]);
    let differing = 0;
    for (let i = 0; i < strong.structure.planes[0].length; i++) if (Math.abs(strong.structure.planes[0][i] - gentle.structure.planes[0][i]) > 0.01) differing++;
    expect(differing).toBeGreaterThan(strong.structure.planes[0].length / 10);
    expect(strong.overall.parameters.filterStrength).toBe(1);
  }, 60_000);

  it("refuses a strength out of range, naming it", () => {
    expect(() => reduceBracket(linear, { ...params, filterStrength: 0.01 })).toThrow(/filterStrength must be a finite number in \[0.05, 1\]/);
    expect(() => reduceBracket(linear, { ...params, filter: "nrgf", filterStrength: Number.NaN })).toThrow(ImagingError);
  });
});

describe("computeScaledSize and scaleImageLinear", () => {
  it("fits the long side and never enlarges", () => {
    expect(computeScaledSize(6000, 4000, 0)).toEqual({ width: 6000, height: 4000, scale: 1 });
    expect(computeScaledSize(6000, 4000, 2048)).toEqual({ width: 2048, height: 1365, scale: 2048 / 6000 });
    expect(computeScaledSize(3000, 4500, 1024)).toEqual({ width: 683, height: 1024, scale: 1024 / 4500 });
    expect(computeScaledSize(800, 600, 1024)).toEqual({ width: 800, height: 600, scale: 1 });
    expect(() => computeScaledSize(800, 600, 10.5)).toThrow(/longSidePx/);
  });

  it("keeps the mean light of the image (area averaging in linear light)", () => {
    const w = 37, h = 23;
    const plane = new Float32Array(w * h);
    for (let i = 0; i < plane.length; i++) plane[i] = encodeSrgb(((i * 7919) % 101) / 100);
    const meanLight = (p: Float32Array) => p.reduce((s, v) => s + decodeSrgb(v), 0) / p.length;
    const out = scaleImageLinear({ width: w, height: h, planes: [plane] }, 20, 12);
    expect([out.width, out.height]).toEqual([20, 12]);
    // Every output pixel covers the same source area, so the means agree up to float error.
    expect(Math.abs(meanLight(out.planes[0]) - meanLight(plane))).toBeLessThan(1e-5);
  });

  it("averages light, not codes: black and white make mid-grey light, not code 0.5", () => {
    const plane = Float32Array.from({ length: 16 }, (_, i) => ((i + Math.floor(i / 4)) % 2 ? 1 : 0));
    const out = scaleImageLinear({ width: 4, height: 4, planes: [plane] }, 1, 1);
    // sRGB encode of linear 0.5 is 0.735357 (REFERENCES.md, IEC 61966-2-1, computed).
    expect(out.planes[0][0]).toBeCloseTo(0.735357, 5);
    expect(() => scaleImageLinear({ width: 4, height: 4, planes: [plane] }, 5, 4)).toThrow(/cannot enlarge/);
  });
});
