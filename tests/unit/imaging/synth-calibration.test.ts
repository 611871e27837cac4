// The synthetic sensor against its own definition (invented data; the checks are
// the model's formulas: cos^4 fall-off, pedestal, dark current x time).
import { describe, expect, it } from "vitest";
import { computeMedian } from "@/lib/imaging/calibrate";
import { ImagingError } from "@/lib/imaging/errors";
import { createSensorModel, synthesizeBiasFrames, synthesizeDarkFrames, synthesizeFlatFrames } from "@/lib/imaging/synth-calibration";

describe("createSensorModel", () => {
  const sensor = createSensorModel({ width: 120, height: 80, channels: 1, seed: 3, dustCount: 0, cornerResponse: 0.6 });

  it("falls off as cos^4 to the corner response asked for", () => {
    const r = sensor.response[0];
    expect(r[0]).toBeCloseTo(0.6, 4); // the corner pixel's centre is the farthest point
    const centre = r[40 * 120 + 60];
    expect(centre).toBeGreaterThan(0.99);
  });

  it("is the same sensor for the same seed, and plants the defects it lists", () => {
    const again = createSensorModel({ width: 120, height: 80, channels: 1, seed: 3, dustCount: 0, cornerResponse: 0.6 });
    expect(again.biasDn).toEqual(sensor.biasDn);
    expect(again.hotPixels).toEqual(sensor.hotPixels);
    expect(sensor.hotPixels).toHaveLength(40);
    expect(sensor.stuckPixels).toHaveLength(12);
    expect(sensor.deadPixels.every((i) => sensor.response[0][i] === 0)).toBe(true);
    expect(sensor.hotPixels.every((i) => sensor.darkCurrentDnPerS[i] >= 300)).toBe(true);
  });

  it("refuses options out of range", () => {
    expect(() => createSensorModel({ width: 8, height: 80, channels: 1, seed: 1 })).toThrow(ImagingError);
    expect(() => createSensorModel({ width: 80, height: 80, channels: 1, seed: 1, cornerResponse: 0 })).toThrow(/cornerResponse/);
    expect(() => createSensorModel({ width: 80, height: 80, channels: 3, seed: 1, planeGains: [1] })).toThrow(/planeGains/);
  });
});

describe("bias, dark and flat frames", () => {
  const sensor = createSensorModel({ width: 100, height: 80, channels: 1, seed: 4, dustCount: 2 });
  const good = new Set([...sensor.hotPixels, ...sensor.deadPixels, ...sensor.stuckPixels.map((s) => s.index)]);
  const mask = Uint8Array.from({ length: 8000 }, (_, i) => (good.has(i) ? 0 : 1));

  it("bias frames read the pedestal and pattern, darks add dark current x time, flats the light x response", () => {
    const [bias] = synthesizeBiasFrames(sensor, 1, 1);
    const [dark] = synthesizeDarkFrames(sensor, [50], 2);
    const [flat] = synthesizeFlatFrames(sensor, 1, { levelDn: 10000, exposureS: 1, seed: 3 });
    expect(computeMedian(bias.image.planes[0], mask)).toBeCloseTo(computeMedian(sensor.biasDn, mask), -0.5);
    const darkSignal = dark.image.planes[0].map((v, i) => v - sensor.biasDn[i]);
    expect(computeMedian(darkSignal, mask)).toBeCloseTo(50 * computeMedian(sensor.darkCurrentDnPerS, mask), -1);
    const flatSignal = flat.image.planes[0].map((v, i) => v - sensor.biasDn[i]);
    expect(computeMedian(flatSignal, mask) / 10000).toBeCloseTo(computeMedian(sensor.response[0], mask), 2);
    const s = sensor.stuckPixels[0];
    expect([bias, dark, flat].every((f) => f.image.planes[0][s.index] === s.valueDn)).toBe(true);
    expect(dark.exposureS).toBe(50);
    expect(dark.encoding).toBe("linear");
  });
});
