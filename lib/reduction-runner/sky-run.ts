// The runner's sky step, between decoding and the pipeline: camera clock
// correction, the observer's site at each frame, the Moon-minus-Sun offsets in
// pixels for registration on the Sun, and after the merge the geometry the
// master's WCS and the report state.
import { applyClockOffset } from "@/lib/media";
import type { ReductionResult } from "@/lib/imaging/pipeline";
import type { LinearFrame, ReductionParams } from "@/lib/imaging/types";
import type { FrameProvenance } from "./decode-frames";
import { ReductionInputError } from "./errors";
import type { HelioGeometry } from "./helio-wcs";
import type { SiteSpec } from "./sky-site";
import { computeFrameSkies, requireCaptureTimes, type FrameSky } from "./sun-geometry";
import { resolveSunRegistration, type SunRegistration } from "./sun-registration";
import { computeNorthAngleInImageDeg, type CameraOrientation } from "@/lib/astro/mount-rotation";

export type RunnerRegistrationMode = "sun" | "moon" | "corona";

export interface SkyOptions {
  site?: SiteSpec;
  /** Seconds the camera clock ran ahead of UTC: true time = camera time - offset (lib/media applyClockOffset). */
  clockOffsetS?: number;
  /** Position angle of celestial north in the image, degrees counter-clockwise from image up, after flips; estimated from the bracket when absent. */
  northAngleDeg?: number;
  /** The camera on its mount: gives the north angle when northAngleDeg is absent (null for hand-held and stabilised, then estimated). */
  camera?: CameraOrientation;
}

/** Refuses option combinations before anything is decoded or written, naming the option. */
export function checkSkyOptions(mode: RunnerRegistrationMode, sky: SkyOptions | undefined): void {
  if (mode !== "sun" && mode !== "moon" && mode !== "corona") {
    throw new ReductionInputError("bad-option", `--register: expected sun, moon or corona, got "${String(mode)}"`);
  }
  if (mode === "sun" && !sky?.site) {
    throw new ReductionInputError("bad-site", "--register sun: the observer's site is required; give --site LAT,LON,ELEV or --site-file TRACK (GPX or CSV)");
  }
  if (sky?.clockOffsetS !== undefined && !Number.isFinite(sky.clockOffsetS)) {
    throw new ReductionInputError("bad-option", `--clock-offset: expected a number of seconds, got ${sky.clockOffsetS}`);
  }
  if (sky?.northAngleDeg !== undefined && !Number.isFinite(sky.northAngleDeg)) {
    throw new ReductionInputError("bad-option", `--north-angle: expected a number of degrees, got ${sky.northAngleDeg}`);
  }
}

/**
 * The north angle the mount implies at the middle of the bracket (lib/astro
 * computeNorthAngleInImageDeg: constant on an equatorial mount, the zenith's
 * direction on a levelled alt-az or fixed camera). Field rotation over a
 * bracket of a minute is a small fraction of a degree, below what the offsets need.
 */
function northAngleFromMount(camera: CameraOrientation | undefined, skies: FrameSky[]): number | undefined {
  if (!camera || skies.length === 0) return undefined;
  const mid = skies[Math.floor(skies.length / 2)];
  const angle = computeNorthAngleInImageDeg(camera, mid.site, mid.midExposureMs);
  return angle === null ? undefined : angle;
}

/** True capture times in place, for the pipeline's Moon path, the FITS time cards and the ephemeris alike. */
export function applyClockOffsetToBracket(frames: LinearFrame[], provenance: FrameProvenance[], clockOffsetS: number): void {
  if (clockOffsetS === 0) return;
  const correct = (ms: number | undefined) => applyClockOffset({ captureTimeMs: ms }, clockOffsetS).captureTimeMs;
  for (const f of frames) f.captureTimeMs = correct(f.captureTimeMs);
  for (const p of provenance) p.captureTimeMs = correct(p.captureTimeMs);
}

export interface SkyGeometry {
  pipelineParams: ReductionParams;
  skies?: FrameSky[];
  sun?: SunRegistration;
  /** The WCS geometry once the pipeline has placed the reference Moon; undefined without a site. */
  completeGeometry: (result: ReductionResult) => HelioGeometry | undefined;
}

/**
 * Without a site: the pipeline runs as asked and nothing of the sky is known.
 * With one: offsets are computed; "sun" runs the pipeline's "moon" mode with
 * them (each frame's Moon anchor moved onto the ephemeris Sun), "corona" passes
 * them as the registration start, and "moon" keeps the lunar limb (prominence
 * layers) and uses them only to place the Sun for the WCS.
 */
export function resolveSkyGeometry(frames: LinearFrame[], params: ReductionParams, mode: RunnerRegistrationMode, sky: SkyOptions | undefined): SkyGeometry {
  if (!sky?.site) return { pipelineParams: { ...params, registration: mode === "sun" ? "moon" : mode }, completeGeometry: () => undefined };
  const timings = frames.map((f) => ({ name: f.name, captureTimeMs: f.captureTimeMs, exposureS: f.exposureS }));
  requireCaptureTimes(timings, mode === "sun" ? "--register sun" : "the helioprojective WCS (--site)");
  const skies = computeFrameSkies(timings, sky.site);
  const sun = resolveSunRegistration(frames, skies, params, sky.northAngleDeg ?? northAngleFromMount(sky.camera, skies));
  const pipelineParams: ReductionParams =
    mode === "moon" ? { ...params, registration: "moon" } : { ...params, registration: mode === "sun" ? "moon" : "corona", moonMinusSunPx: sun.offsetsPx };
  const completeGeometry = (result: ReductionResult): HelioGeometry => {
    const ref = skies.findIndex((s) => s.name === result.overall.referenceFrame);
    const refSky = skies[ref];
    const own = sun.offsetsPx[refSky.name];
    // The pipeline states the Sun when it had offsets; on the lunar limb, the Sun sits at the reference Moon minus its offset.
    const sunCentrePx = result.overall.sunCentre ?? { x: result.overall.moonCentre.x - own.dx, y: result.overall.moonCentre.y - own.dy };
    return {
      sunCentrePx,
      plateScaleArcsecPerPx: sun.plateScaleArcsecPerPx,
      northAngleDeg: sun.northAngleDeg,
      pAngleDeg: refSky.state.pDeg,
      rsunObsArcsec: refSky.state.sun.semiDiameterArcsec,
      dsunObsM: refSky.state.sun.distanceKm * 1000,
      observer: refSky.site,
      moonSilhouetteMs: refSky.midExposureMs,
    };
  };
  return { pipelineParams, skies, sun, completeGeometry };
}
