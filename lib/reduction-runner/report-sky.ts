// The sky-geometry part of report.json: plate scale, P angle, north angle, the
// Sun's centre and radius in master pixels (0-based centres, like the rest of the
// report), the instant the Moon silhouette shows, and per frame the ephemeris
// Moon-minus-Sun offset that registration used.
import { computeSolarNorthAngleDeg, computeSunRadiusPx, type HelioGeometry } from "./helio-wcs";
import { describeSite, type SiteSpec } from "./sky-site";
import type { FrameSky } from "./sun-geometry";
import type { SunRegistration } from "./sun-registration";
import type { ReportFrameSkyInput, ReportSkyInput } from "@/lib/reductions/report-schema";

export interface SkyReportInput {
  registrationMode: "sun" | "moon" | "corona";
  clockOffsetS: number;
  site?: SiteSpec;
  skies?: FrameSky[];
  sun?: SunRegistration;
  helio?: HelioGeometry;
}

function roundTo(value: number, digits = 4): number | null {
  return Number.isFinite(value) ? Number(value.toFixed(digits)) : null;
}

export function buildSkyReport(input: SkyReportInput): { overall: ReportSkyInput; frames: Map<string, ReportFrameSkyInput> } {
  const frames = new Map<string, ReportFrameSkyInput>();
  const { sun, helio, skies } = input;
  for (const s of skies ?? []) {
    const px = sun?.offsetsPx[s.name];
    frames.set(s.name, {
      midExposureUtc: new Date(s.midExposureMs).toISOString(),
      moonMinusSunArcsec: { north: roundTo(s.state.moonMinusSun.northArcsec, 3), east: roundTo(s.state.moonMinusSun.eastArcsec, 3) },
      moonMinusSunPx: px ? { dx: roundTo(px.dx), dy: roundTo(px.dy) } : null,
    });
  }
  const overall: ReportSkyInput = {
    registrationMode: input.registrationMode,
    clockOffsetS: input.clockOffsetS,
    site: input.site ? describeSite(input.site) : null,
  };
  if (sun && helio) {
    Object.assign(overall, {
      plateScaleArcsecPerPx: roundTo(helio.plateScaleArcsecPerPx, 6),
      plateScaleSource: "Moon's topocentric semi-diameter over the median sound limb radius",
      limbRadiusPx: roundTo(sun.limbRadiusPx),
      pAngleDeg: roundTo(helio.pAngleDeg),
      northAngleDeg: roundTo(helio.northAngleDeg),
      northAngleSource: sun.northAngleSource,
      northAngleSigmaDeg: sun.estimate ? roundTo(sun.estimate.sigmaDeg) : null,
      northAngleFitRmsPx: sun.estimate ? roundTo(sun.estimate.rmsPx) : null,
      solarNorthAngleDeg: roundTo(computeSolarNorthAngleDeg(helio)),
      sunCentrePx: { x: roundTo(helio.sunCentrePx.x), y: roundTo(helio.sunCentrePx.y) },
      sunRadiusPx: roundTo(computeSunRadiusPx(helio)),
      rsunObsArcsec: roundTo(helio.rsunObsArcsec),
      dsunObsM: Math.round(helio.dsunObsM),
      observer: { latDeg: helio.observer.latDeg, lonDeg: helio.observer.lonDeg, elevationM: helio.observer.elevationM },
      moonSilhouetteUtc: new Date(helio.moonSilhouetteMs).toISOString(),
      conventions: "angles counter-clockwise from image up; pixels 0-based, x right, y down; unmirrored sky image assumed",
    });
  }
  return { overall, frames };
}
