import { describe, expect, it } from "vitest";
import { composeMasters, reprojectMaster, type CompositeResult } from "@/lib/imaging/composite";
import { blurGaussian } from "@/lib/imaging/blur";
import { chooseCompositeGrid, pixelToHelio } from "@/lib/imaging/composite-geometry";
import { createSky, renderMaster, RSUN_ARCSEC, type KitSpec } from "@/lib/imaging/synth-composite";

// One corona through three kits: a long lens (8 arcsec/px, a field of about 2 solar
// radii), a short lens of a third the focal length (24 arcsec/px, out to 6 radii,
// turned 25 deg, a camera of 0.6 the gain, its WCS 1.5 px off), and a second
// observer's middle lens (12 arcsec/px, turned -40 deg, gain 1.7) whose Moon stands
// elsewhere. Invented data: the truth is the model.
const sky = createSky(5);
const KITS: KitSpec[] = [
  { name: "long.fits", width: 560, height: 420, scaleArcsecPerPx: 8, solarNorthDeg: 0, gain: 1, moonArcsec: { lon: 12, lat: -6 }, noiseScale: 4, seed: 1 },
  { name: "short.fits", width: 480, height: 360, scaleArcsecPerPx: 24, solarNorthDeg: 25, gain: 0.6, moonArcsec: { lon: 12, lat: -6 }, wcsErrorPx: { dx: 1.5, dy: -1 }, noiseScale: 40, seed: 2 },
  { name: "middle.fits", width: 400, height: 400, scaleArcsecPerPx: 12, solarNorthDeg: -40, gain: 1.7, moonArcsec: { lon: -30, lat: 25 }, sunOffsetPx: { dx: 10, dy: -6 }, noiseScale: 9, seed: 3 },
];
const rendered = KITS.map((k) => renderMaster(sky, k));
let result: CompositeResult;

function truthOnComposite(r: CompositeResult): Float32Array {
  const { width, height } = r.grid;
  const out = new Float32Array(width * height);
  const area = r.grid.scaleArcsecPerPx ** 2;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const w = pixelToHelio(r.grid, x, y);
      out[y * width + x] = area * sky.radianceAt(w.lonArcsec, w.latArcsec);
    }
  }
  return out;
}

function radiusOf(r: CompositeResult, i: number): number {
  const x = i % r.grid.width, y = Math.floor(i / r.grid.width);
  return Math.hypot(x - r.grid.sunX, y - r.grid.sunY) / r.sunRadiusPx;
}

function percentile(values: number[], p: number): number {
  const s = [...values].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.round((p / 100) * (s.length - 1)))];
}

describe("a composite of three kits and two observers", () => {
  it("takes the finest scale, north up, the Sun in the middle, and every field", () => {
    result = composeMasters(rendered.map((r) => r.input));
    const g = result.grid;
    expect(g.scaleArcsecPerPx).toBe(8);
    expect(g.solarNorthDeg).toBe(0);
    expect(g.sunX).toBe((g.width - 1) / 2);
    expect(g.sunY).toBe((g.height - 1) / 2);
    // The short lens's corners reach about 6.2 solar radii: the canvas holds them.
    expect(result.inputs[1].fieldR.outer).toBeGreaterThan(6);
    expect((g.width / 2) * 8).toBeGreaterThan(0.99 * Math.max(...[0, 1, 2].map((k) => result.inputs[k].fieldR.outer * RSUN_ARCSEC * Math.SQRT1_2)));
    expect(result.inputs[0].isReference).toBe(true);
  });

  it("recovers each camera's gain against the reference within 2 %", () => {
    // Factors multiply an input into the reference's units: 1 / gain.
    expect(result.inputs[1].factors[0]).toBeCloseTo(1 / 0.6, 1);
    expect(Math.abs(result.inputs[1].factors[0] * 0.6 - 1)).toBeLessThan(0.02);
    expect(Math.abs(result.inputs[2].factors[0] * 1.7 - 1)).toBeLessThan(0.02);
  });

  it("measures the short lens's WCS error by phase correlation and corrects it to a tenth of its pixel", () => {
    // Its WCS put the Sun 1.5 px right and 1 px up of the truth (24 arcsec/px, turned 25 deg).
    const ref = result.inputs[1].refinement;
    expect(ref.applied).toBe(true);
    const wrong = rendered[1].input.grid, truth = rendered[1].trueGrid;
    const off = pixelToHelio(wrong, truth.sunX, truth.sunY);
    // The refinement reports where the stated WCS put the true Sun's centre.
    const errorArcsec = Math.hypot(ref.lonArcsec - off.lonArcsec, ref.latArcsec - off.latArcsec);
    expect(Math.hypot(off.lonArcsec, off.latArcsec)).toBeGreaterThan(40);
    expect(errorArcsec).toBeLessThan(0.1 * 24);
  });

  it("matches the model: radiance within 1 %, and no step where the kits hand over", () => {
    const truth = truthOnComposite(result);
    const n = truth.length;
    const { width, height } = result.grid;
    const rel = new Float32Array(n);
    const ok = new Uint8Array(n);
    for (let i = 0; i < n; i++) {
      if (radiusOf(result, i) < 1.1 || result.coverage[i] === 0 || !(truth[i] > 0) || isNearAnyMoon(result, i)) continue;
      rel[i] = result.radiance[0][i] / truth[i] - 1;
      ok[i] = 1;
    }
    // The seam figure of tests/support/bracket-quality.ts: the error smoothed over 3 px, in which noise
    // averages out but a step between inputs does not. Its median in rings of 0.1 solar radii shows a
    // bias wherever one input takes over from another (a gain or a position wrong by 1 % shows as 1 %).
    const smooth = blurGaussian(rel, width, height, 3);
    const okSmooth = blurGaussian(Float32Array.from(ok), width, height, 3);
    const rings: number[][] = Array.from({ length: 20 }, () => []);
    for (let i = 0; i < n; i++) {
      if (!ok[i] || okSmooth[i] < 0.99) continue;
      const ring = Math.floor((radiusOf(result, i) - 1.1) / 0.1);
      if (ring >= 0 && ring < rings.length) rings[ring].push(smooth[i] / okSmooth[i]);
    }
    const medians = rings.map((ring) => percentile(ring, 50));
    // The rings cover 1.1 to 3.1 solar radii: the long lens alone, its hand-over to the middle one, then to the short one.
    expect(Math.min(...rings.map((r) => r.length))).toBeGreaterThan(500);
    for (const m of medians) expect(Math.abs(m)).toBeLessThan(0.005);
    // Within the inner corona, where the signal is strong, pixel by pixel too.
    const inner = rings.slice(0, 9).flat();
    expect(percentile(inner.map(Math.abs), 90)).toBeLessThan(0.01);
  });

  it("keeps the long lens's sharpness at the limb and the short lens's reach far out", () => {
    // Sharpness: the correlation of the fine structure (each image less its 2 px blur) with the model's,
    // from 1.05 to 1.25 solar radii, for the composite and for the long lens's master alone on the same grid.
    const truth = truthOnComposite(result);
    const { width, height } = result.grid;
    const radius = (i: number) => radiusOf(result, i);
    const masked = (i: number) => isNearAnyMoon(result, i);
    const composite = correlateFineStructure(result.radiance[0], truth, width, height, radius, masked);
    const alone = correlateFineStructure(reprojectMaster(rendered[0].input, result.grid).planes[0], truth, width, height, radius, masked);
    expect(alone).toBeGreaterThan(0.5);
    expect(composite).toBeGreaterThan(0.97 * alone);
    // Far out only the short lens reaches: its field's inner circle is 3.75 radii, its corners 6.2.
    let farCovered = 0, farCount = 0;
    for (let i = 0; i < result.coverage.length; i++) {
      const r = radiusOf(result, i);
      if (r > 5 && r < 5.5) {
        farCount++;
        if (result.coverage[i] > 0) farCovered++;
      }
    }
    expect(farCovered / farCount).toBeGreaterThan(0.3);
    // Where the short lens alone reaches, the composite is its light.
    expect(result.inputs[1].fieldR.outer).toBeCloseTo(Math.hypot(240, 180) * 24 / RSUN_ARCSEC, 1);
  });
});

function isNearAnyMoon(r: CompositeResult, i: number): boolean {
  const w = pixelToHelio(r.grid, i % r.grid.width, Math.floor(i / r.grid.width));
  return KITS.some((k) => Math.hypot(w.lonArcsec - k.moonArcsec.lon, w.latArcsec - k.moonArcsec.lat) < 1.1 * RSUN_ARCSEC);
}

function correlateFineStructure(image: Float32Array, truth: Float32Array, width: number, height: number, radius: (i: number) => number, masked: (i: number) => boolean): number {
  const hi = (p: Float32Array) => {
    const low = blurGaussian(p, width, height, 2);
    return p.map((v, i) => v - low[i]);
  };
  const a = hi(image), b = hi(truth);
  let ab = 0, aa = 0, bb = 0;
  for (let i = 0; i < a.length; i++) {
    const r = radius(i);
    if (r < 1.05 || r > 1.25 || masked(i)) continue;
    ab += a[i] * b[i];
    aa += a[i] * a[i];
    bb += b[i] * b[i];
  }
  return ab / Math.sqrt(aa * bb);
}

describe("the composite's grid", () => {
  it("refuses a canvas past its limits and names the plate scale that fits", () => {
    // A 1 arcsec/px lens beside one whose field reaches 30 000 arcsec: 60 000 px a side at the finer scale.
    const fine = { width: 1000, height: 1000, sunX: 499.5, sunY: 499.5, scaleArcsecPerPx: 1, solarNorthDeg: 0 };
    const wide = { width: 1000, height: 1000, sunX: 499.5, sunY: 499.5, scaleArcsecPerPx: 30, solarNorthDeg: 0 };
    expect(() => chooseCompositeGrid([fine, wide])).toThrow(/30001 x 30001 px at 1\.000 arcsec\/px, beyond 16384 px a side or 160 megapixels; choose a plate scale of at least 2\.3\d\d arcsec\/px/);
    const g = chooseCompositeGrid([fine, wide], 2.5);
    expect(g.width).toBeLessThanOrEqual(16_384);
    expect(g.width * g.height).toBeLessThanOrEqual(160e6);
  });
});
