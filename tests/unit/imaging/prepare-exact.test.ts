// The per-frame stages' faster forms give exactly what their definitions give:
// each is compared, value for value, with the plain computation written out here
// (every pixel's full test, a sort, a brute-force dilation, the warp's 4 x 4 sum, the
// merge's outlier score at every pixel).
import { describe, expect, it } from "vitest";
import { dilateMask } from "@/lib/imaging/blur";
import { combineBracketOutliers, findBadPixelsFromBracket, findFrameOutliers } from "@/lib/imaging/calibrate-defects";
import { downsampleMean, downsampleMeanOf } from "@/lib/imaging/coarse-disk";
import { estimateDarkNoiseSigma } from "@/lib/imaging/linearize";
import { addFrameToMerge, createMergeAccumulator, toPilot, type MergeFrameInput } from "@/lib/imaging/merge";
import { createRng } from "@/lib/imaging/random";
import { warpPlanes } from "@/lib/imaging/resample";
import { findKthSmallest } from "@/lib/imaging/select";
import type { LinearFrame } from "@/lib/imaging/types";

function noisyPlane(width: number, height: number, seed: number, level = 1000, sigma = 12): Float32Array {
  const rng = createRng(seed);
  const p = new Float32Array(width * height);
  // A smooth ramp (a corona's gradient) plus noise: both flat and sloped regions.
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) p[y * width + x] = Math.round(level + 3 * x + sigma * (rng() + rng() + rng() - 1.5) * 2);
  return p;
}

function frameOf(name: string, planes: Float32Array[], width: number, height: number): LinearFrame {
  return { name, image: { width, height, planes }, exposureS: 1, blackLevel: 0, whiteLevel: 65535, encoding: "linear" };
}

/** findBadPixelsFromBracket's rule as its comment states it, for every interior pixel. */
function findBadPixelsPlainly(frames: LinearFrame[], contrast = 2, sigmas = 8, minFrames = 2): Uint8Array {
  const { width, height } = frames[0].image;
  const counts = new Uint8Array(width * height);
  for (const frame of frames) {
    const seen = new Uint8Array(width * height);
    for (const p of frame.image.planes) {
      const minExcess = sigmas * Math.max(estimateDarkNoiseSigma(p, width, height), 1 / Math.sqrt(12));
      for (let y = 1; y < height - 1; y++) {
        for (let x = 1; x < width - 1; x++) {
          const i = y * width + x;
          let lo = Infinity;
          let hi = -Infinity;
          for (let dy = -1; dy <= 1; dy++) {
            for (let dx = -1; dx <= 1; dx++) {
              if (dx === 0 && dy === 0) continue;
              const v = p[i + dy * width + dx];
              if (v < lo) lo = v;
              if (v > hi) hi = v;
            }
          }
          const limit = Math.max(minExcess, contrast * (hi - lo));
          if (p[i] - hi > limit || lo - p[i] > limit) seen[i] = 1;
        }
      }
    }
    for (let i = 0; i < seen.length; i++) counts[i] += seen[i];
  }
  return Uint8Array.from(counts, (c) => (frames.length >= minFrames && c >= minFrames ? 1 : 0));
}

/** estimateDarkNoiseSigma's rule written with sorts and a division per pixel. */
function estimateDarkNoisePlainly(plane: Float32Array, width: number, height: number): number {
  const bw = Math.ceil(width / 8);
  const bh = Math.ceil(height / 8);
  const sum = new Float64Array(bw * bh);
  const count = new Uint32Array(bw * bh);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const b = Math.floor(y / 8) * bw + Math.floor(x / 8);
      sum[b] += plane[y * width + x];
      count[b]++;
    }
  }
  const means = Float64Array.from(sum, (s, b) => s / count[b]);
  const darkLimit = Float64Array.from(means).sort()[Math.floor(means.length * 0.25)];
  const step = Math.max(1, Math.round(Math.sqrt((width * height) / 250_000)));
  const responses: number[] = [];
  for (let y = 1; y < height - 1; y += step) {
    for (let x = 1; x < width - 1; x += step) {
      if (means[Math.floor(y / 8) * bw + Math.floor(x / 8)] > darkLimit) continue;
      const at = (dx: number, dy: number) => plane[(y + dy) * width + x + dx];
      const v = at(-1, -1) - 2 * at(0, -1) + at(1, -1) - 2 * at(-1, 0) + 4 * at(0, 0) - 2 * at(1, 0) + at(-1, 1) - 2 * at(0, 1) + at(1, 1);
      responses.push(Math.abs(v));
    }
  }
  if (responses.length === 0) return 0;
  const sorted = Float32Array.from(responses).sort();
  return sorted[responses.length >> 1] / (6 * 0.6745);
}

describe("the bracket's defect search", () => {
  it("flags exactly the pixels the full 8-neighbour test flags, in one and three planes", () => {
    const [width, height] = [61, 47];
    for (const planeCount of [1, 3]) {
      const frames = [0, 1, 2].map((k) => {
        const planes = Array.from({ length: planeCount }, (_, c) => noisyPlane(width, height, 10 * k + c + 1));
        // Hot pixels at fixed places (all frames), a cosmic ray (one frame), a dead pixel, a sharp edge.
        for (const p of planes) {
          p[10 * width + 10] += 4000;
          p[30 * width + 40] -= 900;
          for (let y = 0; y < height; y++) p[y * width + 50] += 3000;
        }
        if (k === 1) planes[0][20 * width + 20] += 5000;
        // A hot pixel beside a NaN (a FITS blank): the full test ignores the NaN neighbour.
        planes[0][25 * width + 25] += 5000;
        if (k === 2) planes[0][25 * width + 26] = NaN;
        return frameOf(`f${k}`, planes, width, height);
      });
      const expected = findBadPixelsPlainly(frames);
      const got = findBadPixelsFromBracket(frames);
      expect(Array.from(got)).toEqual(Array.from(expected));
      expect(got[10 * width + 10]).toBe(1);
      expect(got[20 * width + 20]).toBe(0);
      expect(findFrameOutliers(frames[2])).toContain(25 * width + 25);
      // Searched frame by frame (as worker threads do) and combined: the same map.
      expect(combineBracketOutliers(frames.map((f) => findFrameOutliers(f)), width * height)).toEqual(got);
    }
  });

  it("gives an empty map with fewer frames than the rule needs", () => {
    const frame = frameOf("one", [noisyPlane(20, 20, 5)], 20, 20);
    frame.image.planes[0][50] += 9000;
    expect(findBadPixelsFromBracket([frame]).some((v) => v === 1)).toBe(false);
    expect(findFrameOutliers(frame)).toEqual(Uint32Array.of(50));
  });
});

describe("the dark-noise estimate", () => {
  it.each([[37, 29], [64, 64], [1100, 600]])("is the sorted computation's value at %i x %i", (width, height) => {
    const plane = noisyPlane(width, height, width + height, 200, 7.5);
    expect(estimateDarkNoiseSigma(plane, width, height)).toBe(estimateDarkNoisePlainly(plane, width, height));
  });
});

describe("selection and box means", () => {
  it("finds the value a typed sort puts at k, with ties and NaN", () => {
    const rng = createRng(9);
    const values = Float64Array.from({ length: 501 }, () => Math.round(rng() * 50));
    values[7] = NaN;
    values[300] = NaN;
    const sorted = Float64Array.from(values).sort();
    for (const k of [0, 1, 125, 250, 498, 499, 500]) expect(findKthSmallest(Float64Array.from(values), k)).toBe(sorted[k]);
    expect(findKthSmallest(new Float32Array(0), 0)).toBeUndefined();
  });

  it("box-averages as the per-pixel form does", () => {
    const plane = noisyPlane(53, 31, 4);
    for (const factor of [1, 2, 3, 8]) expect(downsampleMean(plane, 53, 31, factor)).toEqual(downsampleMeanOf(53, 31, factor, (i) => plane[i]));
  });
});

describe("dilation by the 3 x 3 square", () => {
  // Widths of whole 32-bit words take the four-pixels-at-a-time path, where any non-zero byte counts as set.
  it.each([[23, 17], [1, 9], [9, 1], [1, 1], [24, 17], [4, 3], [8, 1], [4, 1]])("equals the brute-force dilation at %i x %i", (width, height) => {
    const rng = createRng(width * 31 + height);
    const mask = Uint8Array.from({ length: width * height }, () => (rng() < 0.06 ? (rng() < 0.5 ? 1 : 128 + Math.floor(rng() * 128)) : 0));
    mask[0] = 1;
    const expected = new Uint8Array(width * height);
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        for (let dy = -1; dy <= 1; dy++) {
          for (let dx = -1; dx <= 1; dx++) {
            const u = x + dx, v = y + dy;
            if (u >= 0 && v >= 0 && u < width && v < height && mask[v * width + u]) expected[y * width + x] = 1;
          }
        }
      }
    }
    expect(dilateMask(mask, width, height, 1)).toEqual(expected);
    expect(dilateMask(mask, width, height, 1.5)).toEqual(expected);
    const scratch: [Uint8Array, Uint8Array] = [new Uint8Array(width * height).fill(7), new Uint8Array(width * height).fill(7)];
    expect(dilateMask(mask, width, height, 1, scratch)).toEqual(expected);
    // A mask that starts one byte into its buffer goes pixel by pixel: the same result.
    const shifted = new Uint8Array(width * height + 1).subarray(1);
    shifted.set(mask);
    expect(dilateMask(shifted, width, height, 1)).toEqual(expected);
  });
});

/** Keys (1981) cubic weight with a = -0.5, as resample.ts cites it. */
function keysPlainly(s: number): number {
  const a = -0.5;
  const u = Math.abs(s);
  return u <= 1 ? ((a + 2) * u - (a + 3)) * u * u + 1 : u < 2 ? ((a * u - 5 * a) * u + 8 * a) * u - 4 * a : 0;
}

describe("the bicubic warp", () => {
  // A rotated, slightly scaled map whose window runs past every edge of the frame.
  const width = 61, height = 47;
  const map = { a: Math.cos(0.2) * 1.01, b: Math.sin(0.2) * 1.01, tx: -6.3, ty: 4.7 };
  const planes = [0, 1, 2].map((c) => noisyPlane(width, height, 30 + c, 500 * (c + 1), 40));

  it("gives, in one and three planes, every value the plain 4 x 4 sum with clamped edges gives", () => {
    for (const used of [planes.slice(0, 1), planes]) {
      const { planes: out, covered } = warpPlanes(used, width, height, map, { width, height }, "bicubic");
      for (let v = 0; v < height; v++) {
        for (let u = 0; u < width; u++) {
          const sx = map.a * u - map.b * v + map.tx;
          const sy = map.b * u + map.a * v + map.ty;
          const inside = sx >= -0.5 && sy >= -0.5 && sx <= width - 0.5 && sy <= height - 0.5;
          expect(covered[v * width + u]).toBe(inside ? 1 : 0);
          const fx = Math.floor(sx), fy = Math.floor(sy);
          used.forEach((p, c) => {
            let sum = 0;
            for (let r = 0; r < 4; r++) {
              const yy = Math.min(height - 1, Math.max(0, fy - 1 + r));
              let line = 0;
              for (let k = 0; k < 4; k++) line += keysPlainly(sx - (fx - 1 + k)) * p[yy * width + Math.min(width - 1, Math.max(0, fx - 1 + k))];
              sum += keysPlainly(sy - (fy - 1 + r)) * line;
            }
            expect(out[c][v * width + u], `plane ${c} at (${u}, ${v})`).toBe(inside ? Math.fround(sum) : 0);
          });
        }
      }
    }
  });
});

describe("the merge's passes", () => {
  // Three planes go through loops written out for three (merge.ts); one plane through the general ones.
  it.each([1, 3])("in %i plane(s): sums, weights and the worst-frame record follow the plain rule, pixel by pixel", (channels) => {
    // Four frames of a smooth scene at one level, photon noise, a few bright hits and dark dips, and a trail.
    const width = 80, height = 60, n = width * height;
    const exposures = [0.01, 0.02, 0.02, 0.04];
    const rng = createRng(7);
    const scene = Float32Array.from({ length: n }, (_, i) => 4e4 + 3e3 * Math.sin(i / 97));
    const frames: MergeFrameInput[] = exposures.map((t, f) => {
      const planes = Array.from({ length: channels }, (_, c) => {
        const plane = Float32Array.from(scene, (e) => {
          const y = e * t * (1 - 0.1 * c);
          return y + Math.sqrt(y) * 2 * (rng() + rng() + rng() - 1.5);
        });
        for (let hit = 0; hit < 40; hit++) plane[Math.floor(rng() * n)] *= rng() < 0.7 ? 1.05 + rng() * 0.2 : 0.9;
        // A trail across the third frame: a bright core with fainter wings on either side.
        if (f === 2) {
          for (let x = 10; x < 60; x++) {
            plane[30 * width + x] *= 1.6;
            plane[29 * width + x] *= 1.15;
            plane[31 * width + x] *= 1.15;
          }
        }
        return plane;
      });
      return { planes, exposureS: t, clipped: new Uint8Array(n), noiseFloor: new Uint8Array(n), clipLevel: 6e4, noiseSigma: 3 + f };
    });
    const first = createMergeAccumulator(width, height, channels, "photon");
    for (const f of frames) addFrameToMerge(first, f);
    const pilot = toPilot(first);
    const second = createMergeAccumulator(width, height, channels, "photon", undefined, pilot);
    for (const f of frames) addFrameToMerge(second, f);

    // Every value sits below 0.6 of the clip level: the clip taper is 1. The first pass adds the
    // counts (float32 sums) and the exposures (float64); the second weighs each frame by its noise
    // share t E / (t E + sigma_r^2) at the pilot's radiance E (its middle plane of three), as float32.
    const lum = pilot.sums[channels === 3 ? 1 : 0];
    for (const i of [0, 1, 17, 2401, n - 1]) {
      let exposure = 0;
      const sums = new Float32Array(channels), sums2 = new Float32Array(channels);
      let exposure2 = 0;
      for (const f of frames) {
        exposure += f.exposureS;
        const expected = (f.exposureS * lum[i]) / pilot.weights[i];
        const w = Math.fround(expected / (expected + f.noiseSigma! ** 2));
        exposure2 += w * f.exposureS;
        for (let c = 0; c < channels; c++) {
          sums[c] += f.planes[c][i];
          sums2[c] += w * f.planes[c][i];
        }
      }
      expect(first.weights[0][i]).toBe(exposure);
      expect(second.weights[0][i]).toBe(exposure2);
      for (let c = 0; c < channels; c++) {
        expect(first.sums[c][i]).toBe(sums[c]);
        expect(second.sums[c][i]).toBe(sums2[c]);
      }
    }

    // The plain rule (merge.ts): leave-one-out z on each plane, the worst plane's kept (the first of
    // equal magnitude); its scale the frame's 1.4826 MAD of |z| at the sampled pixels (every pixel
    // here), negative z at 0.6; the record lists outliers and their own wings.
    const scores = frames.map((f) => {
      const t = f.exposureS, read2 = f.noiseSigma! ** 2;
      const z = Array.from({ length: n }, (_, i) => {
        const taper = 1;
        const tLoo = pilot.weights[i] - taper * t;
        if (!(tLoo > 1e-3 * t)) return 0;
        let worst = 0;
        for (let c = 0; c < channels; c++) {
          const y = f.planes[c][i];
          const eLoo = (pilot.sums[c][i] - taper * y) / tLoo;
          const variance = Math.max(t * eLoo, 0) + read2 + (t * t * Math.max(eLoo, 0)) / tLoo + 1e-6;
          const zc = (y - t * eLoo) / Math.sqrt(variance);
          if (Math.abs(zc) > Math.abs(worst)) worst = zc;
        }
        return Math.fround(worst);
      });
      const sorted = Float32Array.from(z.filter((v) => v !== 0).map(Math.abs)).sort();
      const scale = Math.max(0.25, 1.4826 * sorted[sorted.length >> 1]);
      return z.map((v) => Math.fround(v > 0 ? v / scale : (0.6 * -v) / scale));
    });
    // A frame is listed where it scores above 5, and above 2.5 within 2 px (a square) of its own
    // score above 5; per pixel the listed frame of highest score, the first on a tie.
    const listed = scores.map((s) => s.map((v, i) => {
      if (v > 5) return true;
      if (!(v > 2.5)) return false;
      const x = i % width, y = (i - x) / width;
      for (let v2 = Math.max(0, y - 2); v2 <= Math.min(height - 1, y + 2); v2++) {
        for (let u = Math.max(0, x - 2); u <= Math.min(width - 1, x + 2); u++) if (s[v2 * width + u] > 5) return true;
      }
      return false;
    }));
    const expected: number[] = [];
    for (let i = 0; i < n; i++) if (frames.some((_, f) => listed[f][i])) expected.push(i);
    // The trail's core is listed for its frame all along, and some of its wings are.
    for (let x = 10; x < 60; x++) expect(listed[2][30 * width + x]).toBe(true);
    expect(expected.filter((i) => Math.abs(Math.floor(i / width) - 30) === 1 && listed[2][i]).length).toBeGreaterThan(5);
    // Frames pass the wing's threshold where none of their own outliers is near: those are not listed.
    let noiseOnly = 0;
    for (let i = 0; i < n; i++) if (frames.some((_, f) => scores[f][i] > 2.5) && !frames.some((_, f) => listed[f][i])) noiseOnly++;
    expect(noiseOnly).toBeGreaterThan(0);
    const worst = second.worst!;
    expect(Array.from(worst.pixel)).toEqual(expected);
    for (let j = 0; j < worst.pixel.length; j++) {
      const i = worst.pixel[j];
      const best = Math.max(...scores.map((s, f) => (listed[f][i] ? s[i] : -Infinity)));
      expect(worst.score[j]).toBe(best);
      const f = scores.findIndex((s, g) => listed[g][i] && s[i] === best);
      expect(worst.frame[j]).toBe(f);
    }
  });
});
