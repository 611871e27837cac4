// Does the kit match the frames? The plate scale measured from the Moon's limb
// (its topocentric semi-diameter over the fitted radius, lib/astro/plate-scale)
// against the kit's (206.265 x pitch / focal length). A wrong focal length, a
// forgotten teleconverter or another kit's pitch shows as a difference of tens
// of per cent; the limb fit itself agrees to about a per cent, so 10 % is a
// safe line for a warning.
import { computeExpectedPlateScaleArcsecPerPx, computeMeasuredPlateScaleArcsecPerPx, type OpticsKit } from "@/lib/astro/plate-scale";
import { computeSunMoonState } from "@/lib/astro/positions";

export const SCALE_WARNING_FRACTION = 0.1;

export interface ScaleCheck {
  measuredArcsecPerPx: number;
  expectedArcsecPerPx: number;
  /** The Sun's diameter in the frames' pixels, from the measured scale, and as the kit predicts. */
  measuredSunDiameterPx: number;
  expectedSunDiameterPx: number;
  limbRadiusPx: number;
  /** measured / expected - 1: positive when the frames show the sky smaller than the kit says. */
  difference: number;
  isOff: boolean;
  /** The Moon's apparent radius over the Sun's at that instant: turns limb radii into solar radii. */
  moonToSun: number;
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** Sun and Moon sizes at the site and instant: the ratio the reach chart needs, with or without a kit. */
export function computeMoonToSun(site: { latDeg: number; lonDeg: number; elevationM: number }, utcMs: number): { moonArcsec: number; sunArcsec: number; ratio: number } {
  const state = computeSunMoonState(site, utcMs);
  return { moonArcsec: state.moon.semiDiameterArcsec, sunArcsec: state.sun.semiDiameterArcsec, ratio: state.moon.semiDiameterArcsec / state.sun.semiDiameterArcsec };
}

/** Null without a sound limb radius to measure from. */
export function checkKitScale(limbRadiiPx: number[], kit: OpticsKit, site: { latDeg: number; lonDeg: number; elevationM: number }, utcMs: number): ScaleCheck | null {
  const radii = limbRadiiPx.filter((r) => Number.isFinite(r) && r > 0);
  if (radii.length === 0) return null;
  const limbRadiusPx = median(radii);
  const sizes = computeMoonToSun(site, utcMs);
  const measured = computeMeasuredPlateScaleArcsecPerPx(sizes.moonArcsec, limbRadiusPx);
  const expected = computeExpectedPlateScaleArcsecPerPx(kit);
  const difference = measured / expected - 1;
  return {
    measuredArcsecPerPx: measured,
    expectedArcsecPerPx: expected,
    measuredSunDiameterPx: (2 * sizes.sunArcsec) / measured,
    expectedSunDiameterPx: (2 * sizes.sunArcsec) / expected,
    limbRadiusPx,
    difference,
    isOff: Math.abs(difference) > SCALE_WARNING_FRACTION,
    moonToSun: sizes.ratio,
  };
}

/** The warning, with both numbers. */
export function describeScaleMismatch(check: ScaleCheck, kitName: string): string {
  const ratio = check.measuredArcsecPerPx / check.expectedArcsecPerPx;
  // Small differences in per cent; a wrong lens or pitch is clearer as a factor.
  const apart = ratio >= 1.5 || ratio <= 1 / 1.5 ? `a factor of ${Math.max(ratio, 1 / ratio).toFixed(1)} apart` : `${Math.round(Math.abs(check.difference) * 100)} % apart`;
  return (
    `The frames show ${check.measuredArcsecPerPx.toFixed(2)}″ per pixel (the Moon's limb measures ${check.limbRadiusPx.toFixed(0)} px in radius), ` +
    `but the kit “${kitName}” gives ${check.expectedArcsecPerPx.toFixed(2)}″ per pixel: ${apart}. ` +
    `The Sun is about ${check.measuredSunDiameterPx.toFixed(0)} px across in these frames; the kit says ${check.expectedSunDiameterPx.toFixed(0)} px. ` +
    `Check the kit's focal length, teleconverter and pixel pitch, or choose the kit these frames were taken with.`
  );
}
