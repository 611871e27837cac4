// Light frames through the synthetic sensor and back: calibrateLightFrame removes
// the offset, the vignetting and the dust against the bracket's own light, and
// findBadPixelsFromBracket finds the sensor's defects without calibration frames
// and leaves the limb and the prominences alone. Invented data; analytic checks.
import { beforeAll, describe, expect, it } from "vitest";
import { combineBracketOutliers, findFrameOutliers } from "@/lib/imaging/calibrate-defects";
import { buildCalibrationMasters, calibrateLightFrame, computeMedian, findBadPixelsFromBracket, type CalibrationMasters } from "@/lib/imaging/calibrate";
import { createSensorModel, recordLightFrames, synthesizeBiasFrames, synthesizeDarkFrames, synthesizeFlatFrames, type SensorModel } from "@/lib/imaging/synth-calibration";
import { synthesizeBracket, type SynthFrame, type SynthTruth } from "@/lib/imaging/synth-model";
import type { LinearFrame } from "@/lib/imaging/types";

const W = 256;
const H = 192;
const SIZE = W * H;
const EXPOSURES = [1 / 1000, 1 / 250, 1 / 60, 1 / 15, 1 / 4, 1];

let sensor: SensorModel;
let bracket: { frames: SynthFrame[]; truth: SynthTruth };
let lights: LinearFrame[];
let masters: CalibrationMasters;
let planted: Set<number>;

beforeAll(() => {
  sensor = createSensorModel({ width: W, height: H, channels: 1, seed: 21 });
  planted = new Set([...sensor.hotPixels, ...sensor.deadPixels, ...sensor.stuckPixels.map((s) => s.index)]);
  bracket = synthesizeBracket({
    width: W, height: H, channels: 1, exposuresS: EXPOSURES, sunRadiusPx: 36, seed: 4, prominenceCount: 7, prominenceContrast: 8,
    // The camera drifts a little between frames, as on a real mount.
    shiftsPx: EXPOSURES.map((_, k) => ({ dx: 0.6 * k, dy: -0.35 * k })),
  });
  lights = recordLightFrames(sensor, bracket, { seed: 22 });
  masters = buildCalibrationMasters({
    bias: synthesizeBiasFrames(sensor, 9, 23),
    darks: synthesizeDarkFrames(sensor, [1, 1, 1, 1, 1], 24),
    flats: synthesizeFlatFrames(sensor, 7, { levelDn: 8000, exposureS: 0.5, seed: 25 }),
  });
}, 60_000);

/** Pixels (not defects, not clipped, not under the Moon) whose light in the bracket frame is at least minDn. */
function usablePixels(frame: SynthFrame, minDn: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < SIZE; i++) {
    const v = frame.planes[0][i];
    if (!planted.has(i) && v < bracket.truth.whiteLevel && v - bracket.truth.blackLevel >= minDn) out.push(i);
  }
  return out;
}

describe("recordLightFrames", () => {
  it("puts the sensor's pedestal, vignetting and defects into the bracket's light", () => {
    const last = lights[lights.length - 1];
    expect(last.blackLevel).toBe(0);
    expect(last.blackLevelSource).toBe("none");
    expect(last.captureTimeMs).toBe(bracket.frames[5].captureTimeMs);
    const s = sensor.stuckPixels[0];
    expect(lights.every((f) => f.image.planes[0][s.index] === s.valueDn)).toBe(true);
    const withPedestal = recordLightFrames(sensor, bracket, { seed: 22, blackLevelInFile: true });
    expect(withPedestal[0].blackLevel).toBe(sensor.pedestalDn);
    expect(withPedestal[0].blackLevelSource).toBe("file");
  });
});

describe("calibrateLightFrame", () => {
  it("leaves the light of the bracket, times the flat's median response, everywhere in the field", () => {
    const k = 5;
    const cal = calibrateLightFrame(lights[k], masters);
    const m = computeMedian(sensor.response[0]);
    const src = bracket.frames[k];
    const black = bracket.truth.blackLevel;
    const ratios = (pick: (x: number, y: number) => boolean, planes: Float32Array, offset: number) => {
      const r: number[] = [];
      for (const i of usablePixels(src, 800)) if (pick(i % W, Math.floor(i / W))) r.push((planes[i] - offset) / ((src.planes[0][i] - black) * m));
      return computeMedian(Float32Array.from(r));
    };
    const corner = (x: number, y: number) => Math.hypot(x - W / 2, y - H / 2) > 0.42 * Math.hypot(W, H);
    const middle = (x: number, y: number) => Math.hypot(x - W / 2, y - H / 2) < 0.25 * Math.hypot(W, H);
    const calCorner = ratios(corner, cal.image.planes[0], 0);
    const calMiddle = ratios(middle, cal.image.planes[0], 0);
    const rawCorner = ratios(corner, lights[k].image.planes[0], sensor.pedestalDn);
    const rawMiddle = ratios(middle, lights[k].image.planes[0], sensor.pedestalDn);
    console.log(`light / truth: calibrated corner ${calCorner.toFixed(4)}, middle ${calMiddle.toFixed(4)}; raw corner ${rawCorner.toFixed(4)}, middle ${rawMiddle.toFixed(4)}`);
    // The cos^4 fall-off puts the corners about 20 % under the middle before calibration; after it, within 1 %.
    expect(rawCorner / rawMiddle).toBeLessThan(0.85);
    expect(Math.abs(calCorner - 1)).toBeLessThan(0.01);
    expect(Math.abs(calMiddle - 1)).toBeLessThan(0.01);
  });

  it("takes the offset away: the Moon's disk reads near zero, not the pedestal", () => {
    const cal = calibrateLightFrame(lights[0], masters);
    const src = bracket.frames[0];
    const m = computeMedian(sensor.response[0]);
    const moon = bracket.truth.moonInFrame[0];
    const residual: number[] = [];
    const raw: number[] = [];
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const i = y * W + x;
        if (planted.has(i) || Math.hypot(x - moon.x, y - moon.y) > 0.8 * bracket.truth.moonRadiusPx) continue;
        // The earthshine (about 1 DN here) is light, and stays.
        residual.push(cal.image.planes[0][i] - (src.planes[0][i] - bracket.truth.blackLevel) * m);
        raw.push(lights[0].image.planes[0][i]);
      }
    }
    const median = computeMedian(Float32Array.from(residual));
    console.log(`Moon's disk after calibration: median residual ${median.toFixed(3)} DN over ${residual.length} px; raw median ${computeMedian(Float32Array.from(raw))}`);
    expect(computeMedian(Float32Array.from(raw))).toBeGreaterThan(sensor.pedestalDn - 5);
    // Read noise 3 DN in the sensor and the bracket, bias and dark masters: the median of ~2800 pixels within 0.5 DN of 0.
    expect(Math.abs(median)).toBeLessThan(0.5);
  });

  it("hands on levels and masks and leaves the input alone", () => {
    const frame = lights[5];
    const before = frame.image.planes[0].slice();
    const cal = calibrateLightFrame(frame, masters);
    expect(frame.image.planes[0]).toEqual(before);
    expect(cal.image.planes[0]).not.toBe(frame.image.planes[0]);
    expect(cal.blackLevel).toBe(0);
    expect(cal.blackLevelSource).toBe("calibrated");
    expect(cal.whiteLevel).toBeGreaterThan(sensor.whiteLevel - sensor.pedestalDn - 10);
    expect(cal.whiteLevel).toBeLessThan(sensor.whiteLevel - sensor.pedestalDn + 10);
    let saturated = 0;
    let wrongSaturated = 0;
    let lostBad = 0;
    for (let i = 0; i < SIZE; i++) {
      if (cal.saturated![i] !== (before[i] >= sensor.whiteLevel ? 1 : 0)) wrongSaturated++;
      saturated += cal.saturated![i];
      if (masters.badPixels[i] && !cal.badPixels![i]) lostBad++;
    }
    expect(wrongSaturated).toBe(0);
    expect(lostBad).toBe(0);
    expect(saturated).toBeGreaterThan(100); // the 1 s frame clips the inner corona
    expect(cal.exposureS).toBe(1);
    expect(cal.name).toBe(frame.name);
  });

  it("with a flat alone divides the light above the file's black level and keeps that level", () => {
    const lightsWithPedestal = recordLightFrames(sensor, bracket, { seed: 22, blackLevelInFile: true });
    const flats = synthesizeFlatFrames(sensor, 5, { levelDn: 8000, exposureS: 0.5, seed: 26 }).map((f) => ({ ...f, blackLevel: sensor.pedestalDn, blackLevelSource: "file" as const }));
    const flatOnly = buildCalibrationMasters({ bias: [], darks: [], flats });
    expect(flatOnly.summary.flat?.offsetMethods).toEqual(Array(5).fill("none"));
    const frame = lightsWithPedestal[3];
    const cal = calibrateLightFrame(frame, flatOnly);
    expect(cal.blackLevel).toBe(sensor.pedestalDn);
    expect(cal.blackLevelSource).toBe("file");
    expect(cal.whiteLevel).toBe(frame.whiteLevel);
    const i = usablePixels(bracket.frames[3], 200)[0];
    expect(cal.image.planes[0][i]).toBeCloseTo((frame.image.planes[0][i] - sensor.pedestalDn) / flatOnly.flat![0][i] + sensor.pedestalDn, 2);
  });
});

describe("findBadPixelsFromBracket", () => {
  it("finds the sensor's defects from the lights alone and never flags the limb or a prominence", () => {
    const map = findBadPixelsFromBracket(lights);
    const sun = bracket.truth.sunCentre;
    let found = 0;
    let falseNearSun = 0;
    let falseElsewhere = 0;
    for (let i = 0; i < SIZE; i++) {
      if (!map[i]) continue;
      if (planted.has(i)) found++;
      else if (Math.hypot((i % W) - sun.x, Math.floor(i / W) - sun.y) < 1.4 * bracket.truth.sunRadiusPx) falseNearSun++;
      else falseElsewhere++;
    }
    // A defect can only be found where it stands out: at least 15 sigmas of the light's photon and read
    // noise (both the bracket's and the sensor's) away from its neighbours, unclipped, in two frames or more.
    const visible = [...planted].filter((i) => {
      let frames = 0;
      bracket.frames.forEach((f, k) => {
        const light = (f.planes[0][i + 1] - bracket.truth.blackLevel) * sensor.response[0][i + 1];
        const stuck = sensor.stuckPixels.find((s) => s.index === i);
        const defect = stuck ? stuck.valueDn - sensor.biasDn[i] : sensor.deadPixels.includes(i) ? 0 : light + sensor.darkCurrentDnPerS[i] * EXPOSURES[k];
        const noise = Math.sqrt(Math.max(light, 0) + 2 * sensor.readNoiseDn ** 2);
        if (f.planes[0][i] < bracket.truth.whiteLevel && f.planes[0][i + 1] < bracket.truth.whiteLevel && Math.abs(defect - light) > 15 * noise) frames++;
      });
      return frames >= 2;
    });
    const visibleFound = visible.filter((i) => map[i]).length;
    const hotFound = sensor.hotPixels.filter((i) => map[i]).length;
    console.log(
      `bracket bad pixels: ${found} of ${planted.size} (hot ${hotFound}/${sensor.hotPixels.length}); of the ${visible.length} visible ${visibleFound}; ` +
        `false near the Sun ${falseNearSun}, elsewhere ${falseElsewhere}`,
    );
    expect(falseNearSun).toBe(0);
    expect(falseElsewhere).toBeLessThanOrEqual(2);
    expect(visible.length).toBeGreaterThanOrEqual(25);
    expect(visibleFound / visible.length).toBeGreaterThanOrEqual(0.9);
  });

  it("gives the same map when each frame marks its candidates apart and the marks are counted (the app's flow)", () => {
    const candidates = lights.map((f) => findFrameOutliers(f));
    // Each frame marks some pixels, and not every pixel any frame marks is a defect of the bracket.
    expect(candidates.every((c) => c.length > 0)).toBe(true);
    const whole = findBadPixelsFromBracket(lights);
    expect(new Set(candidates.flatMap((c) => [...c])).size).toBeGreaterThan(whole.reduce((n, v) => n + v, 0));
    expect(combineBracketOutliers(candidates, SIZE)).toEqual(whole);
    // One frame alone proves nothing: no map.
    expect(combineBracketOutliers(candidates.slice(0, 1), SIZE).some((v) => v === 1)).toBe(false);
  });

  it("leaves a sharp limb and bright prominences alone when the camera does not move", () => {
    // The sharpest optics the generator allows (PSF sigma 0.5 px), bright prominences, no drift: the limb and the
    // prominences sit at the same sensor pixels in every frame, as defects do.
    const sharp = synthesizeBracket({ width: W, height: H, channels: 1, exposuresS: EXPOSURES, sunRadiusPx: 36, seed: 9, prominenceCount: 10, prominenceContrast: 12, psfSigmaPx: 0.5 });
    const map = findBadPixelsFromBracket(recordLightFrames(sensor, sharp, { seed: 27 }));
    const sun = sharp.truth.sunCentre;
    let falseNearSun = 0;
    for (let i = 0; i < SIZE; i++) {
      if (map[i] && !planted.has(i) && Math.hypot((i % W) - sun.x, Math.floor(i / W) - sun.y) < 1.4 * sharp.truth.sunRadiusPx) falseNearSun++;
    }
    expect(falseNearSun).toBe(0);
  });

  it("leaves a cosmic-ray hit in one frame alone", () => {
    const hit = 100 * W + 30;
    const frames = lights.map((f, k) => (k === 2 ? { ...f, image: { ...f.image, planes: [f.image.planes[0].slice()] } } : f));
    frames[2].image.planes[0][hit] += 5000;
    expect(findBadPixelsFromBracket(frames)[hit]).toBe(0);
    expect(findBadPixelsFromBracket([lights[0]]).every((v) => v === 0)).toBe(true);
    expect(() => findBadPixelsFromBracket([lights[0], { ...lights[1], name: "odd.fits", image: { width: 10, height: 10, planes: [new Float32Array(100)] } }])).toThrow(/odd\.fits: is 10 x 10/);
  });
});
