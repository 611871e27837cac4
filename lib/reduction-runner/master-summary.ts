// The master's summaries for report.json and the reduction page: the radial
// brightness profile about the Sun's centre in solar radii, and the coverage
// (how many frames contributed to each pixel) with a small map written as
// coverage.png beside the other outputs.
import { join } from "node:path";
import { encodePng16 } from "@/lib/media";
import type { ReductionResult } from "@/lib/imaging/pipeline";
import { computeRadialProfile, fitRadialPowerLaw, summarizeCoverage } from "@/lib/imaging/profile";
import { computeLuminancePlane } from "@/lib/imaging/srgb";
import { computeSunRadiusPx, type HelioGeometry } from "./helio-wcs";
import type { CoverageInput, RadialProfileInput } from "@/lib/reductions/report-schema";

/** Ring width of the profile, solar radii. */
export const PROFILE_STEP_R = 0.05;
/** Long side of coverage.png, px. */
export const COVERAGE_MAP_MAX_SIDE_PX = 512;
/** Pixels this close to the Moon's limb are left out of the profile (the limb moves between frames). */
const MOON_MARGIN_PX = 3;

function roundTo(value: number, digits: number): number | null {
  return Number.isFinite(value) ? Number(value.toPrecision(digits)) : null;
}

export interface MasterSummary {
  radialProfile: RadialProfileInput;
  coverage: CoverageInput;
}

/**
 * Profile and coverage of a finished reduction. The Sun's centre and radius
 * come from the sky geometry when a site was given; without one, the Moon's
 * centre and radius stand in (the Moon's apparent radius exceeds the Sun's by
 * a few percent in totality, so radii are then slightly overstated), and the
 * report says which was used.
 */
export async function writeMasterSummary(dir: string, result: ReductionResult, helio?: HelioGeometry): Promise<MasterSummary> {
  const { master, coverage, overall } = result;
  const { width, height } = master;
  const centre = helio ? helio.sunCentrePx : overall.filterCentre;
  const solarRadiusPx = helio ? computeSunRadiusPx(helio) : overall.moonRadiusPx;
  const luminance = computeLuminancePlane(master.planes);
  const valid = new Uint8Array(width * height);
  for (let i = 0; i < valid.length; i++) valid[i] = coverage[i] > 0 ? 1 : 0;
  const rings = computeRadialProfile(luminance, width, height, {
    centre,
    solarRadiusPx,
    exclude: { x: overall.moonCentre.x, y: overall.moonCentre.y, radiusPx: overall.moonRadiusPx + MOON_MARGIN_PX },
    valid,
    startR: 1,
    stepR: PROFILE_STEP_R,
  });
  // The fall-off between 1.5 and 3 solar radii, where the K corona dominates (a summary, not a model fit).
  const fit = fitRadialPowerLaw(rings, 1.5, 3);

  const frameCount = result.frames.length;
  const summary = summarizeCoverage(coverage, width, height, frameCount, COVERAGE_MAP_MAX_SIDE_PX);
  const map = Uint16Array.from(summary.map.values, (v) => Math.round(65535 * Math.min(1, Math.max(0, v))));
  await encodePng16({ width: summary.map.width, height: summary.map.height, planes: [map] }, join(dir, "coverage.png"));

  return {
    radialProfile: {
      centreSource: helio ? "sun" : "moon",
      centrePx: { x: roundTo(centre.x, 7), y: roundTo(centre.y, 7) },
      solarRadiusPx: roundTo(solarRadiusPx, 6),
      stepR: PROFILE_STEP_R,
      unit: master.planes.length === 3 ? "master luminance, Y = 0.2126 R + 0.7152 G + 0.0722 B of the master's values" : "the master's values",
      excluded: "the Moon (plus 3 px) and pixels no frame covered",
      powerLaw: fit ? { fromR: 1.5, toR: 3, exponent: roundTo(fit.exponent, 4), ringCount: fit.ringCount } : null,
      rings: rings.map((r) => ({
        innerR: roundTo(r.innerR, 4),
        outerR: roundTo(r.outerR, 4),
        meanR: roundTo(r.meanR, 5),
        meanLuminance: roundTo(r.meanLuminance, 6),
        pixelCount: r.pixelCount,
        ringFraction: roundTo(r.ringFraction, 3),
      })),
    },
    coverage: {
      frameCount,
      pixelsByFrames: summary.pixelsByFrames,
      meanFrames: roundTo(summary.meanFrames, 4),
      uncoveredFraction: roundTo(summary.uncoveredFraction, 4),
      map: {
        file: "coverage.png",
        width: summary.map.width,
        height: summary.map.height,
        blockPx: summary.map.blockPx,
        meaning: "16-bit grey: mean frames per pixel over each block, 0 = none, white = every frame",
      },
    },
  };
}
