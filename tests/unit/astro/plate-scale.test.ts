import { describe, expect, it } from "vitest";
import {
  AstroError,
  computeExpectedPlateScaleArcsecPerPx,
  computeFieldInSolarRadii,
  computeFocalForReachMm,
  computeMeasuredPlateScaleArcsecPerPx,
  computeSunImageSize,
} from "@/lib/astro";

describe("plate scale", () => {
  it("follows 206.265 x pitch / focal length, with the teleconverter", () => {
    // DESIGN/REFERENCES formula (computed): 4.3 um at 1000 mm = 0.88694 arcsec/px; x1.4 = 0.63353.
    expect(computeExpectedPlateScaleArcsecPerPx({ pixelPitchUm: 4.3, focalMm: 1000 })).toBeCloseTo(0.886939, 5);
    expect(computeExpectedPlateScaleArcsecPerPx({ pixelPitchUm: 4.3, focalMm: 1000, teleconverter: 1.4 })).toBeCloseTo(0.633528, 5);
  });

  it("measures the scale from the Moon's semi-diameter over the fitted radius", () => {
    expect(computeMeasuredPlateScaleArcsecPerPx(1013.05, 1100)).toBeCloseTo(0.920955, 5);
  });

  it("refuses zero or negative optics, naming the field", () => {
    expect(() => computeExpectedPlateScaleArcsecPerPx({ pixelPitchUm: 0, focalMm: 500 })).toThrow(/pixelPitchUm/);
    expect(() => computeExpectedPlateScaleArcsecPerPx({ pixelPitchUm: 4, focalMm: 500, teleconverter: -2 })).toThrow(AstroError);
    expect(() => computeMeasuredPlateScaleArcsecPerPx(1000, Number.NaN)).toThrow(/limbRadiusPx/);
  });
});

describe("the Sun on the sensor", () => {
  it("is about focal length / 109 across (common practice)", () => {
    // Rule of thumb of the trade (no source): 1500 mm gives a little over a centimetre. "About"
    // gets 2%: the mean solar diameter makes it focal length / 107.5.
    const s = computeSunImageSize({ pixelPitchUm: 4.3, focalMm: 1500 });
    expect(Math.abs(s.diameterMm / (1500 / 109) - 1)).toBeLessThan(0.02);
    // Computed: 2 x 1500 x tan(959.63 arcsec) = 13.9574 mm, over 4.3 um = 3245.9 px.
    expect(s.diameterMm).toBeCloseTo(13.9574, 3);
    expect(s.diameterPx).toBeCloseTo(3245.9, 0);
  });

  it("gives the field of view in solar radii", () => {
    // Full frame 36 x 24 mm at 500 mm: atan(12 / 500) = 4949.4 arcsec = 5.1576 Rsun to the short edge (computed).
    const f = computeFieldInSolarRadii({ sensorWidthMm: 36, sensorHeightMm: 24, pixelPitchUm: 6, focalMm: 500 });
    expect(f.reachToEdgeRsun).toBeCloseTo(5.1576, 3);
    expect(f.heightRsun).toBeCloseTo(2 * f.reachToEdgeRsun, 9);
    expect(f.widthRsun).toBeGreaterThan(f.heightRsun);
    expect(f.reachToCornerRsun).toBeGreaterThan(f.widthRsun / 2);
  });

  it("inverts: the focal length for a reach gives back that reach", () => {
    const sensor = { sensorWidthMm: 23.5, sensorHeightMm: 15.6 };
    const focalMm = computeFocalForReachMm(sensor, 3);
    expect(computeFieldInSolarRadii({ ...sensor, pixelPitchUm: 4, focalMm }).reachToEdgeRsun).toBeCloseTo(3, 9);
  });
});
