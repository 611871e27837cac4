// The runner's sky step, between decoding and the pipeline: camera clock
// correction, the observer's site at each frame, the Moon-minus-Sun offsets in
// pixels for registration on the Sun, and after the merge the geometry the
// master's WCS and the report state.
import { applyClockOffset } from "@/lib/media";
import type { PreparedFrame, ReductionResult } from "@/lib/imaging/pipeline";
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
    throw new ReductionInputError("bad-site", "registration on the Sun needs the observer's site: give where the frames were taken (a fixed place, or a track for a ship or an aircraft)");
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
  /** What the reduction had to decide for itself, in words for the report and the page (no WCS and why, north unknown). */
  notes: string[];
  /** The registration actually run: "sun" falls back to "corona" when the image orientation cannot be found. */
  registrationMode: RunnerRegistrationMode;
}

/** Without sky geometry: the pipeline runs in the mode asked ("sun" needs the sky and is refused earlier). */
function withoutSky(params: ReductionParams, mode: RunnerRegistrationMode, notes: string[]): SkyGeometry {
  return { pipelineParams: { ...params, registration: mode === "sun" ? "moon" : mode }, completeGeometry: () => undefined, notes, registrationMode: mode };
}

/**
 * Without a site: the pipeline runs as asked and nothing of the sky is known.
 * With one: offsets are computed; "sun" runs the pipeline's "moon" mode with
 * them (each frame's Moon anchor moved onto the ephemeris Sun), "corona" passes
 * them as the registration start, and "moon" keeps the lunar limb (prominence
 * layers) and uses them only to place the Sun for the WCS.
 * A site with frames that lack capture times still reduces on the corona or the
 * Moon, without a WCS (registration on the Sun needs the times and is refused);
 * an image orientation that cannot be found turns "sun" into "corona", and the
 * master has no WCS. Both are said in `notes`.
 */
export function resolveSkyGeometry(frames: LinearFrame[], params: ReductionParams, mode: RunnerRegistrationMode, sky: SkyOptions | undefined, prepared?: readonly PreparedFrame[]): SkyGeometry {
  if (!sky?.site) return withoutSky(params, mode, []);
  const timings = frames.map((f) => ({ name: f.name, captureTimeMs: f.captureTimeMs, exposureS: f.exposureS }));
  const untimed = timings.filter((t) => !Number.isFinite(t.captureTimeMs)).map((t) => t.name);
  if (untimed.length > 0) {
    if (mode === "sun") requireCaptureTimes(timings, "registration on the Sun");
    return withoutSky(params, mode, [
      `The master has no helioprojective WCS: ${describeNames(untimed)} ${untimed.length === 1 ? "has" : "have"} no capture time, and the Sun's place in the sky at each frame needs it. The frames were registered on the ${mode === "moon" ? "lunar limb" : "corona"}.`,
    ]);
  }
  const skies = computeFrameSkies(timings, sky.site);
  let sun: SunRegistration;
  try {
    sun = resolveSunRegistration(frames, skies, params, sky.northAngleDeg ?? northAngleFromMount(sky.camera, skies), prepared);
  } catch (error) {
    if (!(error instanceof ReductionInputError && error.code === "orientation-unknown")) throw error;
    return withoutSky(params, mode === "sun" ? "corona" : mode, [
      `North is unknown and the master has no helioprojective WCS: ${error.message.replace(/^Image orientation unknown: /, "")}. ${mode === "sun" ? "The frames were registered on the corona instead of the Sun. " : ""}Give the kit's mount or a north angle to place the image on the sky.`,
    ]);
  }
  const pipelineParams: ReductionParams =
    mode === "moon" ? { ...params, registration: "moon" } : { ...params, registration: mode === "sun" ? "moon" : "corona", moonMinusSunPx: sun.offsetsPx };
  const completeGeometry = (result: ReductionResult) => computeHelioGeometry(skies, sun, result);
  return { pipelineParams, skies, sun, completeGeometry, notes: [], registrationMode: mode };
}

/** The WCS geometry of a finished reduction from the sky geometry its frames had (see resolveSkyGeometry). */
export function computeHelioGeometry(skies: FrameSky[], sun: SunRegistration, result: Pick<ReductionResult, "overall">): HelioGeometry {
  const refSky = skies.find((s) => s.name === result.overall.referenceFrame)!;
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
}

/** "a.fits", "a.fits and b.fits", or "a.fits, b.fits and 3 more". */
function describeNames(names: string[]): string {
  if (names.length === 1) return names[0];
  if (names.length <= 3) return `${names.slice(0, -1).join(", ")} and ${names[names.length - 1]}`;
  return `${names.slice(0, 2).join(", ")} and ${names.length - 2} more frames`;
}
