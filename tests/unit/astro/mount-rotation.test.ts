import { describe, expect, it } from "vitest";
import {
  AstroError,
  computeFieldRotationDeg,
  computeFieldRotationRateArcsecPerS,
  computeNorthAngleInImageDeg,
  computeParallacticAngleDeg,
  computeSunFieldRotationRateArcsecPerS,
  computeSunMoonState,
  computeSunParallacticAngleDeg,
  SIDEREAL_RATE_ARCSEC_PER_S,
} from "@/lib/astro";

const LUXOR = { latDeg: 25.69, lonDeg: 32.64, elevationM: 0 };
const CADIZ = { latDeg: 36.53, lonDeg: -6.29, elevationM: 0 };
const MAX_LUXOR = Date.parse("2027-08-02T10:05:10Z");
const MAX_CADIZ = Date.parse("2027-08-02T08:46:46Z");

function wrap(deg: number): number {
  return ((deg + 540) % 360) - 180;
}

describe("parallactic angle (Meeus eq. 14.1)", () => {
  it("is zero on the meridian south of the zenith and changes sign across it", () => {
    expect(computeParallacticAngleDeg(40, 0, 10)).toBeCloseTo(0, 12);
    expect(computeParallacticAngleDeg(40, 15, 10)).toBeGreaterThan(0);
    expect(computeParallacticAngleDeg(40, -15, 10)).toBeLessThan(0);
    // North of the zenith on the meridian the zenith lies to the south: 180 deg.
    expect(Math.abs(computeParallacticAngleDeg(40, 0, 60))).toBeCloseTo(180, 9);
  });

  it("is 90 deg for an equatorial object seen from the equator in the west (analytic)", () => {
    expect(computeParallacticAngleDeg(0, 30, 0)).toBeCloseTo(90, 9);
  });

  it("refuses an impossible latitude", () => {
    expect(() => computeParallacticAngleDeg(91, 0, 0)).toThrow(/latDeg/);
  });
});

describe("field rotation on a levelled mount", () => {
  it("uses the sidereal rate of 15.04 arcsec/s", () => {
    // REFERENCES: 15.04 arcsec/s (from memory); 360 deg per sidereal day of 86164.09 s is 15.041.
    expect(SIDEREAL_RATE_ARCSEC_PER_S).toBeCloseTo(15.041, 3);
    // Formula magnitude 15.04 cos(lat) cos(az) / cos(alt): at lat 0, az 0, alt 0 it is the sidereal rate.
    expect(Math.abs(computeFieldRotationRateArcsecPerS(0, 0, 0))).toBeCloseTo(SIDEREAL_RATE_ARCSEC_PER_S, 9);
  });

  it("is the time derivative of the parallactic angle (formula against the ephemeris)", () => {
    for (const [site, t] of [
      [LUXOR, MAX_LUXOR],
      [CADIZ, MAX_CADIZ],
      [LUXOR, MAX_LUXOR - 2 * 3600_000],
    ] as const) {
      const rate = computeSunFieldRotationRateArcsecPerS(site, t);
      const dq = wrap(computeSunParallacticAngleDeg(site, t + 30_000) - computeSunParallacticAngleDeg(site, t - 30_000));
      const numeric = (dq * 3600) / 60;
      // Central difference over 60 s: curvature error well under 1% away from the zenith (computed).
      expect(Math.abs(rate - numeric) / Math.abs(numeric)).toBeLessThan(0.01);
    }
  });

  it("adds up over an interval to the integral of the rate", () => {
    const start = MAX_CADIZ - 30 * 60_000;
    const end = MAX_CADIZ + 30 * 60_000;
    const totalDeg = computeFieldRotationDeg(CADIZ, start, end);
    // Simpson's rule on 12 intervals of the rate: the rate is smooth here, 0.5% is ample.
    const n = 12;
    let sum = 0;
    for (let i = 0; i <= n; i++) {
      const w = i === 0 || i === n ? 1 : i % 2 ? 4 : 2;
      sum += w * computeSunFieldRotationRateArcsecPerS(CADIZ, start + ((end - start) * i) / n);
    }
    const integralDeg = ((sum * ((end - start) / 1000 / n)) / 3) / 3600;
    expect(Math.abs(totalDeg - integralDeg) / Math.abs(integralDeg)).toBeLessThan(0.005);
    expect(Math.abs(totalDeg)).toBeGreaterThan(1);
  });

  it("refuses the zenith", () => {
    const bad = () => computeFieldRotationRateArcsecPerS(20, 90, 0);
    expect(bad).toThrow(AstroError);
    expect(bad).toThrow(/altDeg/);
  });
});

describe("north in the image", () => {
  it("stays where the camera was squared on an equatorial mount", () => {
    const a = computeNorthAngleInImageDeg({ mount: "equatorial", cameraRollDeg: 12 }, LUXOR, MAX_LUXOR);
    const b = computeNorthAngleInImageDeg({ mount: "equatorial", cameraRollDeg: 12 }, LUXOR, MAX_LUXOR + 3600_000);
    expect(a).toBeCloseTo(12, 9);
    expect(b).toBeCloseTo(12, 9);
  });

  it("turns opposite to the parallactic angle on a levelled camera", () => {
    const q = computeSunParallacticAngleDeg(CADIZ, MAX_CADIZ);
    const altAz = computeNorthAngleInImageDeg({ mount: "alt-az" }, CADIZ, MAX_CADIZ)!;
    const tripod = computeNorthAngleInImageDeg({ mount: "fixed-tripod" }, CADIZ, MAX_CADIZ)!;
    expect(wrap(altAz + q)).toBeCloseTo(0, 9);
    expect(tripod).toBeCloseTo(altAz, 9);
    // Over an hour the image turns by minus the field rotation.
    const later = computeNorthAngleInImageDeg({ mount: "alt-az" }, CADIZ, MAX_CADIZ + 3600_000)!;
    expect(wrap(later - altAz)).toBeCloseTo(-computeFieldRotationDeg(CADIZ, MAX_CADIZ, MAX_CADIZ + 3600_000), 6);
  });

  it("mirrors with the camera's flips and has no answer for hand-held frames", () => {
    expect(computeNorthAngleInImageDeg({ mount: "equatorial", cameraRollDeg: 30, flipHorizontal: true }, LUXOR, MAX_LUXOR)).toBeCloseTo(330, 9);
    expect(computeNorthAngleInImageDeg({ mount: "equatorial", cameraRollDeg: 30, flipVertical: true }, LUXOR, MAX_LUXOR)).toBeCloseTo(150, 9);
    expect(computeNorthAngleInImageDeg({ mount: "hand-held" }, LUXOR, MAX_LUXOR)).toBeNull();
    expect(computeNorthAngleInImageDeg({ mount: "stabilised" }, LUXOR, MAX_LUXOR)).toBeNull();
  });

  it("names the field of an unknown mount", () => {
    expect(() => computeNorthAngleInImageDeg({ mount: "gimbal" as never }, LUXOR, MAX_LUXOR)).toThrow(/mount must be one of/);
  });

  it("agrees with the Sun's place: the Sun near the meridian has a small parallactic angle", () => {
    // At Luxor's maximum the Sun is about 82 deg high, a little east of the meridian (computed here).
    const s = computeSunMoonState(LUXOR, MAX_LUXOR);
    expect(s.sun.altDeg).toBeGreaterThan(75);
    const q = computeSunParallacticAngleDeg(LUXOR, MAX_LUXOR);
    expect(Math.sign(q)).toBe(s.sun.azDeg > 180 ? 1 : -1);
  });
});
