// Calibration masters against the synthetic sensor's own truth (invented data:
// the checks are analytic, the standard error of a median of N frames being
// sqrt(pi / 2) sigma / sqrt(N) for large N, Kendall and Stuart, The Advanced
// Theory of Statistics, vol. 1, from memory).
import { beforeAll, describe, expect, it } from "vitest";
import { buildCalibrationMasters, calibrateLightFrame, computeMedian, selectOffset, type CalibrationMasters } from "@/lib/imaging/calibrate";
import { ImagingError } from "@/lib/imaging/errors";
import { createSensorModel, synthesizeBiasFrames, synthesizeDarkFrames, synthesizeFlatFrames, type SensorModel } from "@/lib/imaging/synth-calibration";
import type { LinearFrame } from "@/lib/imaging/types";

const W = 160;
const H = 120;
const SIZE = W * H;
const MEDIAN_EFFICIENCY = Math.sqrt(Math.PI / 2);

function defectSet(sensor: SensorModel): Set<number> {
  return new Set([...sensor.hotPixels, ...sensor.deadPixels, ...sensor.stuckPixels.map((s) => s.index)]);
}

/** Root mean square of a(i) - b(i) over pixels that are not sensor defects. */
function rmsOver(sensor: SensorModel, diff: (i: number) => number): { rms: number; mean: number } {
  const defects = defectSet(sensor);
  let ss = 0;
  let sum = 0;
  let n = 0;
  for (let i = 0; i < SIZE; i++) {
    if (defects.has(i)) continue;
    const d = diff(i);
    ss += d * d;
    sum += d;
    n++;
  }
  return { rms: Math.sqrt(ss / n), mean: sum / n };
}

let sensor: SensorModel;
let bias: LinearFrame[];
let darks: LinearFrame[];
let flats: LinearFrame[];
let masters: CalibrationMasters;
const FLAT_LEVEL = 20000 * 0.4; // DN at the centre, 40 % of a 14-bit range: flats are exposed to mid-range (common practice)

beforeAll(() => {
  sensor = createSensorModel({ width: W, height: H, channels: 1, seed: 7 });
  bias = synthesizeBiasFrames(sensor, 9, 11);
  darks = synthesizeDarkFrames(sensor, [20, 20, 20, 20, 20, 2, 2, 2, 2, 2], 12);
  flats = synthesizeFlatFrames(sensor, 7, { levelDn: FLAT_LEVEL, exposureS: 2, seed: 13 });
  masters = buildCalibrationMasters({ bias, darks, flats });
});

describe("buildCalibrationMasters", () => {
  it("recovers the bias level and pattern to the noise of a median of 9 frames", () => {
    const expected = (MEDIAN_EFFICIENCY * sensor.readNoiseDn) / Math.sqrt(9); // 1.25 DN
    const b = masters.bias![0];
    const { rms, mean } = rmsOver(sensor, (i) => b[i] - sensor.biasDn[i]);
    console.log(`bias master: rms ${rms.toFixed(3)} DN (expected ${expected.toFixed(3)}), mean ${mean.toFixed(3)} DN`);
    expect(rms).toBeLessThan(expected * 1.15);
    expect(Math.abs(mean)).toBeLessThan(0.1);
    expect(masters.summary.bias?.frameNames).toHaveLength(9);
    expect(masters.summary.bias?.medianDn).toBeCloseTo(sensor.pedestalDn, -0.5);
  });

  it("makes bias-subtracted dark masters per exposure that give the dark current", () => {
    expect(masters.darks.map((d) => d.exposureS)).toEqual([2, 20]);
    expect(masters.darks.every((d) => d.biasSubtracted && d.frameNames.length === 5)).toBe(true);
    const d20 = masters.darks[1].planes[0];
    const { rms, mean } = rmsOver(sensor, (i) => d20[i] / 20 - sensor.darkCurrentDnPerS[i]);
    console.log(`dark current from the 20 s master: rms ${rms.toFixed(4)} DN/s, mean ${mean.toFixed(4)} DN/s`);
    // Noise: read noise and the bias master's, plus shot noise of 40 e-: about 9 DN over 20 s.
    expect(rms).toBeLessThan(0.5);
    expect(Math.abs(mean)).toBeLessThan(0.05);
    expect(masters.summary.darkModel).toBe("scaled");
  });

  it("normalises the flat to a median of 1 and recovers the vignetting and the dust shadows", () => {
    const flat = masters.flat![0];
    expect(computeMedian(flat)).toBeCloseTo(1, 6);
    const truth = sensor.response[0];
    const truthMedian = computeMedian(truth);
    const { rms } = rmsOver(sensor, (i) => flat[i] - truth[i] / truthMedian);
    console.log(`flat master: rms ${rms.toFixed(5)} against the truth normalised to its median`);
    // Photon noise of about 8000 e- per flat, 7 flats, median: 1.25 / sqrt(7 x 8000) = 0.53 %.
    expect(rms).toBeLessThan(0.0065);
    // Corner fall-off (cos^4 law) and the deepest dust shadow, averaged over 5 x 5 px.
    const mean5 = (p: Float32Array, x: number, y: number) => {
      let s = 0;
      for (let dy = -2; dy <= 2; dy++) for (let dx = -2; dx <= 2; dx++) s += p[(y + dy) * W + x + dx];
      return s / 25;
    };
    expect(mean5(flat, 3, 3) / mean5(flat, W / 2, H / 2)).toBeCloseTo(mean5(truth, 3, 3) / mean5(truth, W / 2, H / 2), 2);
    // The dust shadow's middle (60 % of its depth): the generator keeps every shadow inside the frame.
    const dust = [...sensor.dust].sort((a, b) => b.depth - a.depth)[0];
    const dx = Math.round(dust.x);
    const dy = Math.round(dust.y);
    expect(dust.depth).toBeGreaterThan(0.03); // a shadow of 1.8 % or more in its middle: well above the 0.5 % tolerance
    expect(mean5(flat, dx, dy)).toBeCloseTo(mean5(truth, dx, dy) / truthMedian, 2);
    expect(masters.summary.flat?.offsetMethods).toEqual(Array(7).fill("matched-dark"));
  });

  it("finds every planted hot, stuck and dead pixel and nothing else", () => {
    const planted = defectSet(sensor);
    let found = 0;
    let falsePositives = 0;
    for (let i = 0; i < SIZE; i++) {
      if (masters.badPixels[i] && planted.has(i)) found++;
      else if (masters.badPixels[i]) falsePositives++;
    }
    console.log(`bad pixels: ${found} of ${planted.size} found, ${falsePositives} false, counts ${JSON.stringify(masters.summary.badPixels)}`);
    expect(found).toBe(planted.size);
    expect(falsePositives).toBeLessThanOrEqual(2);
    const counts = masters.summary.badPixels;
    expect(counts.hot).toBe(sensor.hotPixels.length);
    expect(counts.stuck).toBe(sensor.stuckPixels.length);
    expect(counts.dead).toBe(sensor.deadPixels.length);
  });

  it("scales the nearest dark by time over the bias for an exposure without its own dark", () => {
    const off = selectOffset(masters, 5)!;
    expect(off.method).toBe("scaled-dark");
    expect(off.darkExposureS).toBe(2);
    const { rms, mean } = rmsOver(sensor, (i) => off.planes[0][i] - (sensor.biasDn[i] + 5 * sensor.darkCurrentDnPerS[i]));
    console.log(`offset at 5 s from the 2 s dark scaled: rms ${rms.toFixed(3)} DN, mean ${mean.toFixed(3)} DN`);
    // 2.5 x the 2 s dark (read noise 3 DN and 2 DN of shot noise, median of 5) less 1.5 x the bias master:
    // sqrt((2.5 x 2.0)^2 + (1.5 x 1.25)^2) = 5.3 DN (computed).
    expect(rms).toBeLessThan(6);
    expect(Math.abs(mean)).toBeLessThan(0.3);
    expect(selectOffset(masters, 19.9)?.method).toBe("matched-dark");
  });

  it("fits offset + rate per pixel from darks at two exposures when there is no bias", () => {
    const noBias = buildCalibrationMasters({ bias: [], darks, flats: [] });
    expect(noBias.summary.darkModel).toBe("fitted");
    const off = selectOffset(noBias, 10)!;
    expect(off.method).toBe("fitted-dark");
    const { rms, mean } = rmsOver(sensor, (i) => off.planes[0][i] - (sensor.biasDn[i] + 10 * sensor.darkCurrentDnPerS[i]));
    console.log(`offset at 10 s fitted without bias: rms ${rms.toFixed(3)} DN, mean ${mean.toFixed(3)} DN`);
    expect(rms).toBeLessThan(4);
    expect(Math.abs(mean)).toBeLessThan(0.3);
    const planted = defectSet(sensor);
    let found = 0;
    for (const i of planted) if (noBias.badPixels[i]) found++;
    // Without a flat, dead pixels do not show (they read the offset, like their neighbours in a dark).
    expect(found).toBe(sensor.hotPixels.length + sensor.stuckPixels.length);
    expect(noBias.summary.badPixels.stuck).toBe(sensor.stuckPixels.length);
  });

  it("uses a single dark exposure as it is when there is no bias, and says so", () => {
    const one = buildCalibrationMasters({ bias: [], darks: darks.slice(0, 5), flats: [] });
    expect(one.summary.darkModel).toBe("nearest-unscaled");
    expect(selectOffset(one, 5)?.method).toBe("unscaled-dark");
    expect(selectOffset(buildCalibrationMasters({ bias, darks: [], flats: [] }), 5)?.method).toBe("bias");
  });

  it("normalises each colour plane of a colour sensor to its own median, and maps defects of any plane", () => {
    const colour = createSensorModel({ width: 64, height: 48, channels: 3, seed: 5, planeGains: [1, 0.9, 0.6] });
    const m = buildCalibrationMasters({
      bias: synthesizeBiasFrames(colour, 5, 1),
      darks: synthesizeDarkFrames(colour, [10, 10, 10], 2),
      flats: synthesizeFlatFrames(colour, 5, { levelDn: 9000, exposureS: 1, seed: 3 }),
    });
    expect(m.flat).toHaveLength(3);
    for (const [c, plane] of m.flat!.entries()) {
      expect(computeMedian(plane)).toBeCloseTo(1, 6);
      // Each plane's signal level follows its gain (9000 x gain x the median vignetting).
      expect(m.summary.flat!.signalDn[c] / m.summary.flat!.signalDn[0]).toBeCloseTo([1, 0.9, 0.6][c], 1);
    }
    const planted = defectSet(colour);
    expect([...planted].every((i) => m.badPixels[i] === 1)).toBe(true);
    expect(m.summary.badPixels.total).toBe(planted.size);
  });

  it("refuses frames of another size or plane count, naming the file", () => {
    const small = createSensorModel({ width: 80, height: 60, channels: 1, seed: 3 });
    const wrong = synthesizeDarkFrames(small, [20], 1)[0];
    wrong.name = "dark-from-other-camera.fits";
    expect(() => buildCalibrationMasters({ bias, darks: [...darks, wrong], flats })).toThrow(/dark-from-other-camera\.fits: is 80 x 60 with 1 plane\(s\), but the first calibration frame \(bias-01\.fits\) is 160 x 120/);
    const colour = createSensorModel({ width: W, height: H, channels: 3, seed: 3 });
    const rgbFlat = synthesizeFlatFrames(colour, 1, { levelDn: FLAT_LEVEL, exposureS: 2, seed: 1 })[0];
    try {
      buildCalibrationMasters({ bias, darks, flats: [rgbFlat] });
      expect.unreachable();
    } catch (err) {
      expect(err).toBeInstanceOf(ImagingError);
      expect((err as ImagingError).code).toBe("size-mismatch");
      expect((err as ImagingError).frameName).toBe("flat-01.fits");
    }
    const light = { ...darks[0], name: "light-07.fits", image: { width: 80, height: 60, planes: [new Float32Array(80 * 60)] } };
    expect(() => calibrateLightFrame(light, masters)).toThrow(/light-07\.fits: is 80 x 60/);
  });

  it("refuses 8-bit frames, a dark that saw light and a flat without light", () => {
    const jpeg: LinearFrame = { ...bias[0], name: "bias.jpg", encoding: "srgb8" };
    expect(() => buildCalibrationMasters({ bias: [jpeg], darks: [], flats: [] })).toThrow(/bias\.jpg: is an 8-bit encoded image/);
    const brightDark = { ...flats[0], name: "dark-really-a-flat.fits" };
    expect(() => buildCalibrationMasters({ bias, darks: [brightDark], flats: [] })).toThrow(/dark-really-a-flat\.fits: reads \d+ DN above the bias/);
    const darkFlat = { ...darks[0], name: "flat-with-cap-on.fits" };
    expect(() => buildCalibrationMasters({ bias, darks, flats: [darkFlat] })).toThrow(/flat-with-cap-on\.fits: holds too little light for a flat/);
    expect(() => buildCalibrationMasters({ bias: [], darks: [], flats: [] })).toThrow(/no bias, dark or flat frames/);
    const noExposure = { ...darks[0], name: "dark-x.fits", exposureS: 0 };
    expect(() => buildCalibrationMasters({ bias, darks: [noExposure], flats: [] })).toThrow(/dark-x\.fits: a dark frame needs its exposure time/);
  });
});
