import { describe, expect, it } from "vitest";
import { applyStretch, quantizeToUint16, quantizeToUint8, renderNatural, renderStructure } from "@/lib/imaging/tone";
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
