// The two renditions of a reduced synthetic bracket: the natural one keeps the
// inner corona below white and the prominences pink; the structure one does
// not turn photon noise into grain and masks what no frame covered.
import { describe, expect, it } from "vitest";
import { blurGaussian } from "@/lib/imaging/blur";
import { reduceBracket } from "@/lib/imaging/pipeline";
import { applyMgn } from "@/lib/imaging/radial";
import { applyAffine, toAffine } from "@/lib/imaging/similarity";
import { decodeSrgb, computeLuminancePlane } from "@/lib/imaging/srgb";
import { createStructureMask } from "@/lib/imaging/structure-noise";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { measureWhiteFraction, renderNatural, renderStructure } from "@/lib/imaging/tone";
import { DEFAULT_REDUCTION_PARAMS, type LinearFrame } from "@/lib/imaging/types";

const W = 320;
const H = 256;
const R_SUN = 48;
const EXPOSURES = [1 / 2000, 1 / 250, 1 / 30, 1 / 4, 2];
const SHIFTS = [{ dx: 2.2, dy: -1.6 }, { dx: -1.4, dy: 2.1 }, { dx: 0, dy: 0 }, { dx: 1.8, dy: 1.2 }, { dx: -2.4, dy: -1.9 }];

function reduce(noise: boolean) {
  const { frames, truth } = synthesizeBracket({
    width: W, height: H, channels: 3, exposuresS: EXPOSURES, sunRadiusPx: R_SUN, seed: 21, shiftsPx: SHIFTS,
    prominenceCount: 6, noise,
  });
  const linear: LinearFrame[] = frames.map((f) => ({
    name: f.name, image: { width: W, height: H, planes: f.planes }, exposureS: f.exposureS,
    blackLevel: truth.blackLevel, whiteLevel: truth.whiteLevel, encoding: "linear", captureTimeMs: f.captureTimeMs,
  }));
  const result = reduceBracket(linear, DEFAULT_REDUCTION_PARAMS);
  // The master is in the reference frame's pixels: carry the Sun there.
  const ref = linear.findIndex((f) => f.name === result.overall.referenceFrame);
  const sun = applyAffine(toAffine(truth.transforms[ref], W, H), truth.sunCentre.x, truth.sunCentre.y);
  return { result, truth, sun, ref };
}

const noisy = reduce(true);
const { result, truth, sun } = noisy;
const moon = { x: result.overall.moonCentre.x, y: result.overall.moonCentre.y, radiusPx: result.overall.moonRadiusPx };
/** Off the Moon by a margin: the lunar limb itself is the merge's business. */
const offMoon = (x: number, y: number, margin = 2) => Math.hypot(x - moon.x, y - moon.y) > moon.radiusPx + margin;
const limbRing = { x: sun.x, y: sun.y, innerPx: R_SUN, outerPx: 1.1 * R_SUN };
const outsideMoon = new Uint8Array(W * H).map((_, i) => (offMoon(i % W, Math.floor(i / W), 0) ? 1 : 0));

describe("natural rendition of a reduced bracket", () => {
  it("keeps the inner corona from 1.0 to 1.1 solar radii below full white (issue aim: at most 1 %)", () => {
    const white = measureWhiteFraction(result.natural, limbRing, undefined, outsideMoon);
    expect(white).toBeLessThanOrEqual(0.01); // measured 0
    // Nor does it sit just below white, where gradations would be lost too (measured: 0 at 0.97, 3.7 % at 0.9).
    expect(measureWhiteFraction(result.natural, limbRing, 0.97, outsideMoon)).toBeLessThan(0.01);
    // A hard clip at the frame's 99th percentile (white set by the whole field, not by the inner corona) burns much of it.
    const lum = computeLuminancePlane(result.master.planes);
    const former = renderNatural(result.master, { valid: outsideMoon, luminance: lum, whitePercentile: 99, shoulderKnee: 1 });
    // Measured 2.5 % (5.4 % before the Moon's radius came from the limb's mean profile, which moved the masked disk); the aim is 1 %.
    expect(measureWhiteFraction(former.image, limbRing, undefined, outsideMoon)).toBeGreaterThan(0.02);
  });

  it("shows prominences pink-red: red clearly above green and blue, not white", () => {
    // Prominence pixels: where the model's own light is mostly prominence (red over green above 1.5; the corona's is 1.04).
    const toMaster = toAffine(truth.transforms[noisy.ref], W, H);
    const [tr, tg] = truth.radiance;
    const ratios: number[] = [];
    let notWhite = 0;
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const i = y * W + x;
        if (!(tr[i] > 1.5 * tg[i] && tg[i] > 0)) continue;
        const p = applyAffine(toMaster, x, y);
        const px = Math.round(p.x), py = Math.round(p.y);
        if (px < 0 || py < 0 || px >= W || py >= H || !offMoon(px, py, 4)) continue;
        const j = py * W + px;
        // Within about 3 px of the limb the merge may have no well-exposed frame and gives a grey lower bound.
        if (!result.coverage[j]) continue;
        const [r, g, b] = result.natural.planes.map((plane) => decodeSrgb(plane[j]));
        ratios.push(r / Math.max(g, b));
        if (Math.min(g, b) < 0.9) notWhite++;
      }
    }
    expect(ratios.length).toBeGreaterThan(20);
    ratios.sort((a, b) => a - b);
    // Linear light, red over the larger of green and blue: 1 would be grey or white.
    expect(ratios[ratios.length >> 1]).toBeGreaterThan(1.4);
    expect(ratios[Math.floor(0.1 * ratios.length)]).toBeGreaterThan(1.1);
    expect(notWhite / ratios.length).toBeGreaterThan(0.95);
  });
});

/** Pixel-scale grain: RMS of the rendition less its Gaussian blur (2 px) in an annulus, solar radii. */
function measureGrain(plane: Float32Array, valid: Uint8Array, r0: number, r1: number): number {
  const smooth = blurGaussian(plane, W, H, 2);
  let sum = 0, count = 0;
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const i = y * W + x;
      const r = Math.hypot(x - sun.x, y - sun.y) / R_SUN;
      if (r < r0 || r > r1 || !valid[i]) continue;
      sum += (plane[i] - smooth[i]) ** 2;
      count++;
    }
  }
  return Math.sqrt(sum / count);
}

describe("structure rendition of a reduced bracket", () => {
  const clean = reduce(false);
  const disk = { ...moon, radiusPx: moon.radiusPx + 1 };
  const render = (r: typeof result, snrWeighting: boolean) => {
    const valid = createStructureMask(W, H, r.coverage, { lunarDisk: disk, edgeBandPx: 6 });
    const lum = computeLuminancePlane(r.master.planes);
    return { plane: renderStructure(applyMgn(lum, W, H, { lunarDisk: disk, valid, h: 0.7, snrWeighting }), W, H).planes[0], valid };
  };

  it("weights the enhancement by the local signal-to-noise ratio: photon noise stays out of the outer field", () => {
    const figures = [false, true].map((snr) => {
      const a = render(clean.result, snr), b = render(result, snr);
      // Grain measured on the same pixels in both.
      const both = a.valid.map((v, i) => v & b.valid[i]);
      return { clean: measureGrain(a.plane, both, 2.2, 3.2), noisy: measureGrain(b.plane, both, 2.2, 3.2) };
    });
    const [published, weighted] = figures;
    // The noise's own share of the pixel-scale grain, sqrt(noisy^2 - clean^2).
    const excess = (f: { clean: number; noisy: number }) => Math.sqrt(Math.max(0, f.noisy ** 2 - f.clean ** 2));
    // Measured: grain 0.055 noiseless and 0.061 noisy with the published filter (excess 0.025); weighted, 0.053 and
    // 0.047 (excess 0: what the weighting removes in the noisy master is noise and the faintest rays below it).
    expect(excess(weighted)).toBeLessThan(excess(published) / 2.5);
    // Structure of a noiseless master is kept: its grain figure moves by a few per cent at most.
    expect(Math.abs(weighted.clean / published.clean - 1)).toBeLessThan(0.1);
  });

  it("masks the canvas edge and uncovered pixels instead of enhancing them", () => {
    const plane = result.structure.planes[0];
    // The frames are shifted by up to 3 px: the pipeline's band is at least that plus 2 px of bicubic reach.
    for (let y = 0; y < H; y++) {
      for (const x of [0, 2, 4, W - 5, W - 3, W - 1]) expect(plane[y * W + x]).toBe(0);
    }
    for (let x = 0; x < W; x++) {
      for (const y of [0, 2, 4, H - 5, H - 3, H - 1]) expect(plane[y * W + x]).toBe(0);
    }
    let uncoveredShown = 0;
    for (let i = 0; i < plane.length; i++) if (!result.coverage[i] && plane[i] !== 0) uncoveredShown++;
    expect(uncoveredShown).toBe(0);
    // Inside the band the field is shown.
    let shown = 0, inside = 0;
    for (let y = 12; y < H - 12; y++) for (let x = 12; x < W - 12; x++) if (offMoon(x, y, 3)) { inside++; if (plane[y * W + x] > 0) shown++; }
    expect(shown / inside).toBeGreaterThan(0.99);
  });
});
