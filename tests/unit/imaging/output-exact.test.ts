// The output side's faster forms against their plain definitions, written out
// here: the quantizers give the same codes as a plane-by-plane dither with the
// seeded generator and a per-sample rounding; the pyramid's halving, through
// sRGB tables, stays within its stated 2e-7 of the halving computed with the
// transfer functions of IEC 61966-2-1 themselves.
import { describe, expect, it } from "vitest";
import { halveImageLinear } from "@/lib/imaging/pyramid";
import { advanceMulberry32, createRng, mixMulberry32 } from "@/lib/imaging/random";
import { createSrgbDecoder, createSrgbEncoder, decodeSrgb, ditherPlaneInto, ditherToUint8, encodeSrgb } from "@/lib/imaging/srgb";
import { quantizeToUint16, quantizeToUint8 } from "@/lib/imaging/tone";
import type { PlaneImage } from "@/lib/imaging/types";

/** Display values with every case a quantizer or a halving meets: out of range, 0, 1, the knees, codes' midpoints, and a spread. */
function displayPlane(length: number, seed: number): Float32Array {
  const rng = createRng(seed);
  const p = new Float32Array(length);
  for (let i = 0; i < length; i++) {
    const r = rng();
    if (r < 0.05) p[i] = -0.5 * rng();
    else if (r < 0.1) p[i] = 1 + rng();
    else if (r < 0.15) p[i] = r < 0.125 ? 0 : 1;
    // Around the decode knee (V = 0.04045) and the encode knee's code (encode(0.0031308)).
    else if (r < 0.2) p[i] = 0.04045 + (rng() - 0.5) * 2e-4;
    // Halfway between two 16-bit codes: rounding must go the same way.
    else if (r < 0.25) p[i] = (Math.floor(rng() * 65535) + 0.5) / 65535;
    else if (r < 0.4) p[i] = 0.05 * rng();
    else p[i] = rng();
  }
  return p;
}

function imageOf(width: number, height: number, planes: number, seed: number): PlaneImage {
  return { width, height, planes: Array.from({ length: planes }, (_, c) => displayPlane(width * height, seed + c)) };
}

/** Interleaves per-plane codes (RGBRGB...). */
function interleavePlain<T extends Uint8Array | Uint16Array>(planes: T[], out: T): T {
  const channels = planes.length;
  planes.forEach((p, c) => p.forEach((v, i) => { out[i * channels + c] = v; }));
  return out;
}

/** The halving as pyramid.ts defines it, with decodeSrgb and encodeSrgb per pixel. */
function halvePlainly(image: PlaneImage): Float32Array[] {
  const { width, height } = image;
  const w = Math.ceil(width / 2), h = Math.ceil(height / 2);
  return image.planes.map((src) => {
    const out = new Float32Array(w * h);
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        let sum = 0, count = 0;
        for (const yy of [2 * y, 2 * y + 1]) for (const xx of [2 * x, 2 * x + 1]) {
          if (yy >= height || xx >= width) continue;
          sum += decodeSrgb(src[yy * width + xx]);
          count++;
        }
        out[y * w + x] = encodeSrgb(sum / count);
      }
    }
    return out;
  });
}

describe("8-bit dither written interleaved", () => {
  it("draws createRng's numbers: mulberry32's state is a Weyl sequence and its output the same mix", () => {
    const rng = createRng(2027);
    let state = 2027;
    for (let k = 0; k < 1000; k++) {
      state = advanceMulberry32(state);
      expect(mixMulberry32(state)).toBe(rng());
    }
  });

  it("gives ditherToUint8's codes plane after plane, one generator through all planes (tiles)", () => {
    const image = imageOf(301, 97, 3, 11);
    const rng = createRng(7);
    const plain = interleavePlain(image.planes.map((p) => ditherToUint8(p, rng)), new Uint8Array(301 * 97 * 3));
    expect(quantizeToUint8(image, 7)).toEqual(plain);
    const grey = imageOf(64, 33, 1, 5);
    expect(quantizeToUint8(grey, 3)).toEqual(ditherToUint8(grey.planes[0], createRng(3)));
  });

  it("gives each plane its own generator when given a seed per plane (the preview)", () => {
    const image = imageOf(120, 80, 3, 21);
    const plain = interleavePlain(image.planes.map((p, k) => ditherToUint8(p, createRng(101 + k))), new Uint8Array(120 * 80 * 3));
    expect(quantizeToUint8(image, [101, 102, 103])).toEqual(plain);
    expect(() => quantizeToUint8(image, [101])).toThrow(/one seed per plane \(3\), got 1/);
  });

  it("returns the generator's state after a plane, so planes chain", () => {
    const values = displayPlane(1000, 9);
    const out = new Uint8Array(1000);
    const after = ditherPlaneInto(values, 5, out);
    const rng = createRng(5);
    for (let k = 0; k < 2000; k++) rng();
    let state = after;
    state = advanceMulberry32(state);
    expect(mixMulberry32(state)).toBe(rng());
  });
});

describe("16-bit quantization written interleaved", () => {
  it("rounds each sample as round(65535 v) of v clamped to 0..1, for RGB and grey", () => {
    for (const planes of [3, 1]) {
      const image = imageOf(211, 53, planes, 31);
      const codes = image.planes.map((p) => Uint16Array.from(p, (v) => Math.round(65535 * Math.min(1, Math.max(0, v)))));
      expect(quantizeToUint16(image)).toEqual(interleavePlain(codes, new Uint16Array(211 * 53 * planes)));
    }
  });
});

describe("sRGB tables", () => {
  it("decode within 1e-10 of IEC 61966-2-1 (the stated bound), and exactly at the knee's interval", () => {
    const decode = createSrgbDecoder();
    let worst = 0;
    for (let k = 0; k <= 200_000; k++) {
      const v = k / 200_000;
      worst = Math.max(worst, Math.abs(decode(v) - decodeSrgb(v)));
    }
    expect(worst).toBeLessThan(1e-10);
    // The interval [2650, 2651] / 65536 holds the knee V = 0.04045.
    for (const v of [0.04045, 0.04044, 0.040436, 0.04045099]) expect(decode(v)).toBe(decodeSrgb(v));
    expect([decode(-1), decode(0), decode(1), decode(2), decode(NaN)]).toEqual([0, 0, 1, 1, 0]);
  });

  it("encode within 1.2e-7 of IEC 61966-2-1 with the knee's interval exact, and up to 8e-7 there without", () => {
    const exact = createSrgbEncoder({ exactKnee: true });
    const plain = createSrgbEncoder();
    let worst = 0;
    for (let k = 0; k <= 400_000; k++) {
      const l = (k / 400_000) ** 3; // dense near the knee (L = 0.0031308)
      worst = Math.max(worst, Math.abs(exact(l) - encodeSrgb(l)));
    }
    expect(worst).toBeLessThan(1.2e-7);
    let kneeWorst = 0;
    for (let k = 0; k <= 1000; k++) {
      const l = (205 + k / 1000) / 65536;
      expect(exact(l)).toBe(encodeSrgb(l));
      kneeWorst = Math.max(kneeWorst, Math.abs(plain(l) - encodeSrgb(l)));
    }
    // h |12.92 - 12.70| / 4 with h = 1 / 65536 (derived in srgb.ts).
    expect(kneeWorst).toBeGreaterThan(1e-7);
    expect(kneeWorst).toBeLessThan(8.5e-7);
  });
});

describe("the pyramid's halving through the tables", () => {
  it("stays within 2e-7 of the halving computed with the transfer functions, odd edges included", () => {
    for (const [width, height, planes] of [[257, 131, 3], [2, 2, 1], [1, 1, 1], [1, 7, 1], [9, 1, 3]]) {
      const image = imageOf(width, height, planes, width + height);
      const fast = halveImageLinear(image);
      const plain = halvePlainly(image);
      expect([fast.width, fast.height]).toEqual([Math.ceil(width / 2), Math.ceil(height / 2)]);
      let worst = 0;
      fast.planes.forEach((p, c) => p.forEach((v, i) => { worst = Math.max(worst, Math.abs(v - plain[c][i])); }));
      expect(worst).toBeLessThan(2e-7);
    }
  });
});
