// The kit's plate scale against the one the frames show. The expected scale is
// 206.265 x pitch (um) / focal length (mm) (DESIGN.md, Kit: 5 um behind 600 mm
// gives 1.719 arcsec/px); the measured one is the Moon's semi-diameter from the
// ephemeris over the limb radius, so a limb radius chosen from that same
// semi-diameter must give back the ratio it was made with.
import { describe, expect, it } from "vitest";
import { checkKitScale, computeMoonToSun, describeScaleMismatch, SCALE_WARNING_FRACTION } from "@/lib/bracket-sets/scale-check";

const LUXOR = { latDeg: 25.69, lonDeg: 32.64, elevationM: 80 };
// Mid-totality at Luxor on 2027 August 2 (DESIGN.md section 7).
const AT = Date.UTC(2027, 7, 2, 10, 5, 0);
const KIT = { pixelPitchUm: 5, focalMm: 600, teleconverter: 1 };
// 206.26480624709636 arcsec per milliradian: 648000 / pi / 1000.
const EXPECTED = (206.26480624709636 * 5) / 600;

describe("kit scale check", () => {
  it("says nothing within 10 % and warns beyond, with both numbers", () => {
    const { moonArcsec, sunArcsec, ratio } = computeMoonToSun(LUXOR, AT);
    // In totality the Moon looks larger than the Sun (that is why it is total): a few per cent at this eclipse.
    expect(ratio).toBeGreaterThan(1);
    expect(ratio).toBeLessThan(1.1);
    const radiusFor = (scaleFactor: number) => moonArcsec / (EXPECTED * scaleFactor);
    const close = checkKitScale([radiusFor(1.05), radiusFor(1.04), radiusFor(1.06)], KIT, LUXOR, AT)!;
    expect(close.expectedArcsecPerPx).toBeCloseTo(EXPECTED, 6);
    expect(close.difference).toBeCloseTo(0.05, 6);
    expect(close.isOff).toBe(false);
    const far = checkKitScale([radiusFor(1 + SCALE_WARNING_FRACTION + 0.02)], KIT, LUXOR, AT)!;
    expect(far.isOff).toBe(true);
    // The Sun's diameter in pixels follows from each scale: 2 x semi-diameter / scale.
    expect(far.expectedSunDiameterPx).toBeCloseTo((2 * sunArcsec) / EXPECTED, 6);
    expect(far.measuredSunDiameterPx).toBeCloseTo((2 * sunArcsec) / (EXPECTED * 1.12), 6);
    const text = describeScaleMismatch(far, "Long lens");
    expect(text).toContain(`${(EXPECTED * 1.12).toFixed(2)}″ per pixel`);
    expect(text).toContain("the kit “Long lens” gives 1.72″ per pixel: 12 % apart");
    // A forgotten 2x teleconverter reads as a factor.
    expect(describeScaleMismatch(checkKitScale([radiusFor(2)], KIT, LUXOR, AT)!, "Long lens")).toContain("a factor of 2.0 apart");
  });

  it("measures nothing without a sound limb", () => {
    expect(checkKitScale([], KIT, LUXOR, AT)).toBeNull();
    expect(checkKitScale([0, Number.NaN], KIT, LUXOR, AT)).toBeNull();
  });
});
