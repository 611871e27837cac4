// The bracket's offsets and transmissions (frame-levels.ts) measured on block
// means (level-samples.ts). The frames are drawn from an analytic corona through
// known similarity maps, with a known pedestal and transmission per frame, photon
// and read noise, and clipping: invented data whose truth is exact.
import { describe, expect, it } from "vitest";
import { dilateMask } from "@/lib/imaging/blur";
import { measureBracketLevels } from "@/lib/imaging/frame-levels";
import { createLevelGrid, measureBlockMeans, sortIndicesByValue, type LevelSource } from "@/lib/imaging/level-samples";
import { createRng, sampleGaussian } from "@/lib/imaging/random";

const W = 400;
const H = 300;
const SUN = { x: 200.3, y: 149.6, radiusPx: 30 };
/** The limb's K+F corona, DN/s (invented); the light falls as r^-3 with four streamers. */
const LIMB_RATE_DN_PER_S = 3e6;
const WHITE = 16383;
const READ_NOISE_DN = 2;

function coronaRate(x: number, y: number): number {
  const r = Math.hypot(x - SUN.x, y - SUN.y) / SUN.radiusPx;
  if (r < 1.05) return 0;
  const theta = Math.atan2(y - SUN.y, x - SUN.x);
  return LIMB_RATE_DN_PER_S * r ** -3 * (1 + 0.4 * Math.cos(4 * theta));
}

interface Truth {
  exposureS: number;
  offsetDn: number;
  transmission: number;
  angleDeg: number;
  shift: { dx: number; dy: number };
}

/** One frame: counts o + tau t E at the master point each frame pixel sees, with photon (1 e/DN) and read noise; clipped at 0.92 of white, widened by a pixel. */
function drawFrame(truth: Truth, seed: number): LevelSource {
  const rng = createRng(seed);
  const angle = (truth.angleDeg * Math.PI) / 180;
  const a = Math.cos(angle), b = Math.sin(angle);
  // master -> frame: (a x - b y + tx, b x + a y + ty), turning about the Sun and then shifting.
  const tx = SUN.x - (a * SUN.x - b * SUN.y) + truth.shift.dx;
  const ty = SUN.y - (b * SUN.x + a * SUN.y) + truth.shift.dy;
  const luminance = new Float32Array(W * H);
  const clipped = new Uint8Array(W * H);
  for (let v = 0; v < H; v++) {
    for (let u = 0; u < W; u++) {
      const x = a * (u - tx) + b * (v - ty);
      const y = -b * (u - tx) + a * (v - ty);
      const signal = truth.transmission * truth.exposureS * coronaRate(x, y);
      const counts = Math.min(WHITE, truth.offsetDn + signal + Math.sqrt(signal + READ_NOISE_DN ** 2) * sampleGaussian(rng));
      luminance[v * W + u] = counts;
      if (counts >= 0.92 * WHITE) clipped[v * W + u] = 1;
    }
  }
  return { width: W, height: H, luminance, excluded: dilateMask(clipped, W, H, 1), masterToFrame: { a, b, tx, ty }, noiseSigma: READ_NOISE_DN };
}

const TRUTH: Truth[] = [
  { exposureS: 1 / 1000, offsetDn: 100, transmission: 1, angleDeg: 0.1, shift: { dx: 1.3, dy: -0.7 } },
  { exposureS: 1 / 250, offsetDn: 102, transmission: 1, angleDeg: -0.15, shift: { dx: -0.4, dy: 1.8 } },
  { exposureS: 1 / 60, offsetDn: 99, transmission: 0.7, angleDeg: 0, shift: { dx: 0, dy: 0 } },
  { exposureS: 1 / 15, offsetDn: 101, transmission: 1, angleDeg: 0.2, shift: { dx: 2.2, dy: 0.9 } },
  { exposureS: 1 / 4, offsetDn: 100, transmission: 1, angleDeg: -0.05, shift: { dx: -1.6, dy: -1.1 } },
];
const SOURCES = TRUTH.map((t, k) => drawFrame(t, 70 + k));
const FRAMES = TRUTH.map((t) => ({ exposureS: t.exposureS, isOffsetKnown: false }));
const MOON = { x: SUN.x, y: SUN.y, radiusPx: 1.06 * 1.05 * SUN.radiusPx + 4 };

describe("offsets and transmissions from the bracket", () => {
  // 120 000 master pixels: one block a pixel by default, and blocks of 4 x 4 pixels when at most 7 500 are allowed.
  for (const maxBlocks of [undefined, 7_500]) {
    it(`recovers every frame's pedestal and the dimmed frame's transmission (${maxBlocks ? "blocks of 4 x 4 pixels" : "single pixels"})`, () => {
      const levels = measureBracketLevels(SOURCES, FRAMES, W, H, MOON, { maxBlocks });
      expect(levels.undetermined).toEqual([]);
      TRUTH.forEach((t, k) => {
        // Within a DN or three stated sigmas. The longest frame is the least sure (measured 1.9 DN with
        // single pixels, 2.1 with blocks): it overlaps the others only where its counts are high.
        expect(Math.abs(levels.offsets[k] - t.offsetDn)).toBeLessThan(Math.max(1, 3 * levels.offsetSigmas[k]));
        expect(levels.offsetSigmas[k]).toBeLessThan(k === TRUTH.length - 1 ? 3 : 1);
      });
      // Transmissions are relative to the weighted median frame (truth 1 here): within 1 %.
      TRUTH.forEach((t, k) => expect(Math.abs(levels.transmissions[k] - t.transmission)).toBeLessThan(0.01));
    });
  }

  it("reads each frame's pixels once, in exposure order, and leaves out a frame it was not given", () => {
    const reads: number[] = [];
    const counted = SOURCES.map((s, k) => (k === 1 ? undefined : {
      ...s,
      get luminance() { reads.push(k); return s.luminance; },
    }));
    // Input order differs from exposure order.
    const order = [3, 0, 4, 2, 1];
    const levels = measureBracketLevels(order.map((k) => counted[k]), order.map((k) => FRAMES[k]), W, H, MOON, { maxBlocks: 7_500 });
    expect(reads).toEqual([0, 2, 3, 4]);
    // Frame 1 (input position 4) has no pixels: undetermined. The others still pair up with their next neighbours but one.
    expect(levels.undetermined).toEqual([4]);
    expect(Math.abs(levels.transmissions[order.indexOf(2)] - 0.7)).toBeLessThan(0.01);
  });
});

describe("block means", () => {
  // An independent reading of the rule: the mean of bilinear samples at every master pixel of
  // a block, NaN when any sample's four pixels leave the frame or touch an excluded pixel, or any pixel is the Moon's.
  function referenceMeans(source: LevelSource, blockPx: number, moon: { x: number; y: number; radiusPx: number }): number[] {
    const { a, b, tx, ty } = source.masterToFrame;
    const out: number[] = [];
    for (let by = 0; by < Math.floor(H / blockPx); by++) {
      for (let bx = 0; bx < Math.floor(W / blockPx); bx++) {
        let sum = 0;
        let ok = true;
        for (let my = by * blockPx; my < (by + 1) * blockPx; my++) {
          for (let mx = bx * blockPx; mx < (bx + 1) * blockPx; mx++) {
            if ((mx - moon.x) ** 2 + (my - moon.y) ** 2 < moon.radiusPx ** 2) ok = false;
            const x = a * mx - b * my + tx, y = b * mx + a * my + ty;
            const x0 = Math.floor(x), y0 = Math.floor(y);
            if (x0 < 0 || y0 < 0 || x0 >= W - 1 || y0 >= H - 1) { ok = false; continue; }
            const at = (u: number, v: number) => source.luminance[v * W + u];
            if ([0, 1, W, W + 1].some((d) => source.excluded[y0 * W + x0 + d])) ok = false;
            const fx = x - x0, fy = y - y0;
            sum += (1 - fy) * ((1 - fx) * at(x0, y0) + fx * at(x0 + 1, y0)) + fy * ((1 - fx) * at(x0, y0 + 1) + fx * at(x0 + 1, y0 + 1));
          }
        }
        out.push(ok ? sum / blockPx ** 2 : NaN);
      }
    }
    return out;
  }

  it("are the mean of the block's bilinear samples where all of it is usable, and unusable elsewhere", () => {
    const source = SOURCES[3]; // turned by 0.2 degrees and shifted; its inner corona is clipped
    const grid = createLevelGrid(W, H, MOON, 7_500);
    expect(grid.blockPx).toBe(4);
    const means = measureBlockMeans(source, grid);
    const reference = referenceMeans(source, grid.blockPx, MOON);
    let usable = 0, unusable = 0, stricter = 0;
    reference.forEach((r, k) => {
      if (Number.isNaN(r)) {
        unusable++;
        expect(means[k]).toBeNaN();
      } else if (Number.isNaN(means[k])) {
        // The frame-side test reads the footprint's bounding box, which may hold a pixel or two no sample reads.
        stricter++;
      } else {
        usable++;
        expect(Math.abs(means[k] - r)).toBeLessThan(1e-5 * Math.abs(r) + 1e-3);
      }
    });
    expect(usable).toBeGreaterThan(3_000);
    expect(unusable).toBeGreaterThan(500);
    expect(stricter).toBeLessThan(0.01 * usable);
  });

  it("leave out a block holding a sensor defect, and every block of a frame without pixels", () => {
    const grid = createLevelGrid(W, H, MOON, 7_500);
    const masked = new Uint8Array(W * H);
    // A defect in the outer corona (clear of clipping): frame pixel (350, 40) of the unturned frame 2.
    masked[40 * W + 350] = 1;
    const clean = measureBlockMeans(SOURCES[2], grid);
    const withDefect = measureBlockMeans({ ...SOURCES[2], masked }, grid);
    const block = Math.floor(40 / 4) * grid.columns + Math.floor(350 / 4);
    expect(clean[block]).toBeGreaterThan(0);
    expect(withDefect[block]).toBeNaN();
    // The blocks whose samples read that pixel: up to the four around it, no more.
    let lost = 0;
    clean.forEach((v, k) => { if (!Number.isNaN(v) && Number.isNaN(withDefect[k])) lost++; });
    expect(lost).toBeGreaterThanOrEqual(1);
    expect(lost).toBeLessThanOrEqual(4);
    expect(measureBlockMeans(undefined, grid).every((v) => Number.isNaN(v))).toBe(true);
  });
});

describe("sortIndicesByValue", () => {
  it("gives the order of a stable comparison sort, negatives, ties and infinities included", () => {
    const rng = createRng(5);
    const values = Float32Array.from({ length: 20_000 }, (_, k) => (k % 7 === 0 ? Math.round(10 * rng()) : (rng() - 0.3) * 1e4));
    values[3] = Infinity;
    values[4] = -Infinity;
    values[5] = -0.5;
    const expected = Array.from(values.keys()).sort((p, q) => values[p] - values[q] || p - q);
    expect(Array.from(sortIndicesByValue(values))).toEqual(expected);
  });
});
