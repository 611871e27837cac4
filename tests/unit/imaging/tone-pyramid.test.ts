import { describe, expect, it } from "vitest";
import { applyShoulder, applyStretch, measureWhiteFraction, quantizeToUint16, quantizeToUint8, renderNatural, renderStructure } from "@/lib/imaging/tone";
import { buildPyramid, computePyramidLevelSizes, halveImageLinear } from "@/lib/imaging/pyramid";
import { decodeSrgb, encodeSrgb } from "@/lib/imaging/srgb";

describe("natural rendition", () => {
  const n = 1000;
  const ramp = Float32Array.from({ length: n }, (_, i) => 10 * Math.pow(1e4, i / (n - 1))); // four decades

  it("maps the black point to 0 and the white point to 1 and is monotonic", () => {
    const r = renderNatural({ width: n, height: 1, planes: [ramp] }, { blackPoint: 10, whitePoint: 1e5, shoulderKnee: 1 });
    const out = r.image.planes[0];
    expect(out[0]).toBe(0);
    expect(out[n - 1]).toBeCloseTo(1, 6);
    for (let i = 1; i < n; i++) expect(out[i]).toBeGreaterThanOrEqual(out[i - 1]);
  });

  it("chooses beta so the median lands at the target display light", () => {
    const r = renderNatural({ width: n, height: 1, planes: [ramp] }, { targetMedian: 0.1, curve: "log" });
    const median = r.image.planes[0][n / 2];
    expect(decodeSrgb(median)).toBeCloseTo(0.1, 2);
    expect(applyStretch(1, r.beta, "log")).toBeCloseTo(1, 12);
  });

  it("keeps a colour's hue: equal scaling of every plane", () => {
    const image = { width: 1, height: 3, planes: [Float32Array.of(0, 40, 100), Float32Array.of(0, 20, 50), Float32Array.of(0, 10, 25)] };
    const r = renderNatural(image, { blackPoint: 0, whitePoint: 100, beta: 5 });
    const [red, green] = r.image.planes.map((p) => decodeSrgb(p[1]));
    expect(red / green).toBeCloseTo(2, 4);
  });

  it("refuses a flat image or white below black", () => {
    expect(() => renderNatural({ width: 2, height: 1, planes: [Float32Array.of(5, 5)] })).toThrow(/whitePoint .* must exceed blackPoint/);
    expect(() => renderNatural({ width: 2, height: 1, planes: [Float32Array.of(1, 5)] }, { blackPoint: 3, whitePoint: 2 })).toThrow(/whitePoint/);
  });
});

describe("structure rendition and quantizers", () => {
  it("scales valid values to 0..1 and leaves invalid pixels black", () => {
    const data = Float32Array.from({ length: 201 }, (_, i) => i - 100);
    const valid = new Uint8Array(201).fill(1);
    valid[0] = 0;
    const img = renderStructure({ data, valid }, 201, 1, 0, 100);
    expect(img.planes[0][0]).toBe(0);
    expect(img.planes[0][200]).toBe(1);
    expect(img.planes[0][100]).toBeCloseTo(0.5, 2);
  });
  it("quantizes to 16 bits and to dithered 8 bits, interleaved", () => {
    const img = { width: 2, height: 1, planes: [Float32Array.of(0, 1), Float32Array.of(0.5, 2), Float32Array.of(-1, 0.25)] };
    expect([...quantizeToUint16(img)]).toEqual([0, 32768, 0, 65535, 65535, 16384]);
    const q = quantizeToUint8(img, 3);
    expect(q.length).toBe(6);
    expect(q[3]).toBe(255);
    expect(Math.abs(q[1] - 127.5)).toBeLessThanOrEqual(1.5);
  });
});

describe("pyramid in linear light", () => {
  it("averages light, not codes: a 0/1 checkerboard halves to encode(0.5) = 0.735357 (IEC 61966-2-1, computed)", () => {
    const half = halveImageLinear({ width: 2, height: 2, planes: [Float32Array.of(0, 1, 1, 0)] });
    expect(half.planes[0][0]).toBeCloseTo(0.735357, 5);
  });
  it("keeps a faint star's light through the levels", () => {
    const size = 64;
    const plane = new Float32Array(size * size);
    plane[37 * size + 21] = encodeSrgb(0.8);
    const levels = buildPyramid({ width: size, height: size, planes: [plane] });
    expect(levels.length).toBe(7);
    // Total light is conserved per area: 0.8 spread over 4^k pixels.
    const level3 = levels[3];
    const max = Math.max(...level3.planes[0]);
    expect(decodeSrgb(max)).toBeCloseTo(0.8 / 64, 4);
  });
  it("follows the Deep Zoom level sizes: 5184 x 3456 has 14 levels (computed, REFERENCES.md)", () => {
    const sizes = computePyramidLevelSizes(5184, 3456);
    expect(sizes.length).toBe(14);
    expect(sizes[13]).toEqual({ level: 13, width: 5184, height: 3456 });
    expect(sizes[0]).toEqual({ level: 0, width: 1, height: 1 });
    const built = buildPyramid({ width: 37, height: 20, planes: [new Float32Array(740)] });
    const expected = computePyramidLevelSizes(37, 20).reverse();
    expect(built.map((l) => [l.width, l.height])).toEqual(expected.map((s) => [s.width, s.height]));
  });
});

describe("natural rendition: white point, shoulder and colour", () => {
  it("rolls off above the knee smoothly, never reaching 1, and clips at white with knee 1", () => {
    expect(applyShoulder(0.5, 0.8)).toBe(0.5);
    // Same slope on both sides of the knee (derived: d/ds of k + (1 - k)(1 - exp(-(s - k)/(1 - k))) is 1 at s = k).
    expect((applyShoulder(0.8 + 1e-6, 0.8) - 0.8) / 1e-6).toBeCloseTo(1, 4);
    expect(applyShoulder(1, 0.8)).toBeCloseTo(0.8 + 0.2 * (1 - Math.exp(-1)), 12);
    expect(applyShoulder(50, 0.8)).toBeLessThanOrEqual(1);
    expect(applyShoulder(2, 1)).toBe(1);
  });

  it("takes the white point from the ring outside the limb when given one", () => {
    // A bright ring (radius 10 to 12 px) of 1000 on a field of 1 to 10, and one hot pixel of 1e6 far out.
    const w = 64, h = 64;
    const plane = new Float32Array(w * h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) {
      const r = Math.hypot(x - 32, y - 32);
      plane[y * w + x] = r >= 10 && r <= 12 ? 1000 : 1 + (9 * x) / w;
    }
    plane[3] = 1e6;
    const ring = { x: 32, y: 32, innerPx: 10, outerPx: 12 };
    const r = renderNatural({ width: w, height: h, planes: [plane] }, { limbRing: ring, radialCompression: 0, ringPercentile: 99 });
    expect(r.whitePoint).toBe(1000);
    expect(measureWhiteFraction(r.image, ring)).toBe(0);
    expect(() => renderNatural({ width: w, height: h, planes: [plane] }, { limbRing: { ...ring, outerPx: 5 } })).toThrow(/limbRing/);
    expect(() => renderNatural({ width: w, height: h, planes: [plane] }, { radialCompression: 0.3 })).toThrow(/needs limbRing/);
  });

  it("keeps a saturated colour's hue: far above white, red stays twice green and nothing clips", () => {
    const image = { width: 1, height: 2, planes: [Float32Array.of(0, 4000), Float32Array.of(0, 2000), Float32Array.of(0, 1000)] };
    const r = renderNatural(image, { blackPoint: 0, whitePoint: 100, beta: 5 });
    const [red, green, blue] = r.image.planes.map((p) => decodeSrgb(p[1]));
    expect(red / green).toBeCloseTo(2, 3);
    expect(green / blue).toBeCloseTo(2, 3);
    expect(red).toBeLessThan(1);
    expect(red).toBeGreaterThan(0.8);
  });

  it("compresses the radial fall-off about the ring's centre: light far out gains on light near the limb", () => {
    const w = 120, h = 120;
    const plane = new Float32Array(w * h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) plane[y * w + x] = 1e4 * Math.max(1, Math.hypot(x - 60, y - 60) / 20) ** -4;
    const ring = { x: 60, y: 60, innerPx: 20, outerPx: 22 };
    const flat = renderNatural({ width: w, height: h, planes: [plane] }, { limbRing: ring, radialCompression: 0 });
    const squeezed = renderNatural({ width: w, height: h, planes: [plane] }, { limbRing: ring, radialCompression: 0.5 });
    const near = 60 * w + 82, far = 60 * w + 115;
    // The far field's display value rises relative to the limb's.
    expect(squeezed.image.planes[0][far] / squeezed.image.planes[0][near]).toBeGreaterThan(flat.image.planes[0][far] / flat.image.planes[0][near]);
  });
});
