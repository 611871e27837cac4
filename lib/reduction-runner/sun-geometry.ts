// Sky geometry of a bracket: where the Moon stood against the Sun at each
// frame's instant, and how that offset lies in the image.
//
// Image directions (x right, y down, lib/imaging's convention). The north angle
// theta is the position angle of celestial north in the image, counter-clockwise
// from image up, after the camera's flips (lib/astro computeNorthAngleInImageDeg).
// On a sky image that is not mirrored, position angles run counter-clockwise, so a
// position angle phi (from north through east) points at image angle theta + phi:
//   direction(phi) = (-sin(theta + phi), -cos(theta + phi)).
// North is phi = 0 and east phi = 90 deg, hence an offset of n arcsec north and
// e arcsec east, at s arcsec per pixel, moves by
//   dx = (-n sin(theta) - e cos(theta)) / s,   dy = (-n cos(theta) + e sin(theta)) / s.
// A mirrored image (odd number of reflections in the optics) cannot be told from
// this one by a single angle; the bracket cannot tell it either (the Moon's path
// over a few minutes is a straight line, symmetric under reflection about itself).
import { computeSunMoonState, type SiteLocation, type SunMoonState } from "@/lib/astro";
import { ReductionInputError } from "./errors";
import { locateSite, type SiteSpec } from "./sky-site";

const DEG = Math.PI / 180;

export interface FrameTiming {
  name: string;
  /** True UTC start of the exposure (camera clock offset already applied). */
  captureTimeMs?: number;
  exposureS: number;
}

export interface FrameSky {
  name: string;
  /** Mid-exposure instant, UTC ms: the Moon moves 0.3 to 0.5 arcsec/s, so a long exposure shows it at its middle. */
  midExposureMs: number;
  site: SiteLocation;
  state: SunMoonState;
}

/** Refuses frames without capture times, naming them and the field that was missing. */
export function requireCaptureTimes(frames: FrameTiming[], why: string): void {
  const missing = frames.filter((f) => !Number.isFinite(f.captureTimeMs));
  if (missing.length > 0) {
    throw new ReductionInputError(
      "missing-capture-time",
      `${missing.map((f) => f.name).join(", ")}: no capture time, neither in the file (its EXIF DateTimeOriginal or FITS DATE-OBS) nor given by the photographer; ${why} needs each frame's time`,
    );
  }
}

/**
 * Topocentric Sun and Moon at each frame's mid-exposure (lib/astro). Refuses a
 * frame at whose instant the two disks do not overlap as seen from the site: such
 * a time, clock offset or site cannot be right for a frame that shows the eclipse.
 */
export function computeFrameSkies(frames: FrameTiming[], site: SiteSpec): FrameSky[] {
  requireCaptureTimes(frames, "registration on the Sun");
  return frames.map((f) => {
    const midExposureMs = f.captureTimeMs! + f.exposureS * 500;
    const location = locateSite(site, midExposureMs, f.name);
    const state = computeSunMoonState(location, midExposureMs);
    const reach = state.sun.semiDiameterArcsec + state.moon.semiDiameterArcsec;
    if (state.separationArcsec >= reach) {
      throw new ReductionInputError(
        "no-eclipse",
        `${f.name}: at ${new Date(midExposureMs).toISOString()} the Moon's centre is ${state.separationArcsec.toFixed(0)} arcsec from the Sun's as seen from ` +
          `${location.latDeg.toFixed(3)}, ${location.lonDeg.toFixed(3)}, so the disks do not touch; check the capture time, --clock-offset and the site`,
      );
    }
    return { name: f.name, midExposureMs, site: location, state };
  });
}

/** A north/east sky offset in image pixels for a north angle (see the head of this file). */
export function convertSkyOffsetToPx(northArcsec: number, eastArcsec: number, northAngleDeg: number, scaleArcsecPerPx: number): { dx: number; dy: number } {
  const s = Math.sin(northAngleDeg * DEG);
  const c = Math.cos(northAngleDeg * DEG);
  return { dx: (-northArcsec * s - eastArcsec * c) / scaleArcsecPerPx, dy: (-northArcsec * c + eastArcsec * s) / scaleArcsecPerPx };
}

export interface MoonSample {
  /** The Moon's centre in master pixels of a corona-aligned master (where the Sun stands still). */
  x: number;
  y: number;
  /** Relative weight, 1 / variance of the centre in px^2 up to a common factor. */
  weight: number;
  /** Moon minus Sun at the frame's instant, arcsec. */
  northArcsec: number;
  eastArcsec: number;
}

export interface NorthAngleEstimate {
  northAngleDeg: number;
  /** One-sigma uncertainty from the fit's residuals (with a floor of 0.05 px per centre). */
  sigmaDeg: number;
  /** Weighted RMS of the Moon centres about the fitted model, px. */
  rmsPx: number;
  /** The Sun's centre in master pixels that the fit implies. */
  sunCentre: { x: number; y: number };
  /** Largest distance of a Moon centre from their mean, px: how much the Moon moved. */
  spreadPx: number;
}

/** Floor of a Moon centre's uncertainty, px (the sound-fit floor lib/imaging's moon-track uses). */
const CENTRE_SIGMA_FLOOR_PX = 0.05;

/**
 * North angle from the bracket itself. Where the corona agrees between frames,
 * the Sun stands still, so each Moon centre is m_i = S + D(theta) u_i with u_i
 * its ephemeris offset at theta = 0 (dx = -e/s, dy = -n/s) and D the rotation
 * D = [[cos, sin], [-sin, cos]] from the head of this file. Weighted least squares
 * over S and theta is the 2-D Procrustes problem (Umeyama 1991, IEEE PAMI 13:376,
 * rotation only): with centred m~ and u~,
 *   theta = atan2(sum w (m~x u~y - m~y u~x), sum w (m~x u~x + m~y u~y)),
 * and var(theta) = sigma^2 / sum w |u~|^2 for a unit-weight centre variance sigma^2.
 */
export function estimateNorthAngle(samples: MoonSample[], scaleArcsecPerPx: number): NorthAngleEstimate {
  if (samples.length < 2) throw new ReductionInputError("orientation-unknown", `the image orientation needs at least 2 frames with a lunar limb, got ${samples.length}; say how the camera was mounted (the kit's mount, or --north-angle on the command line)`);
  const u = samples.map((p) => ({ x: -p.eastArcsec / scaleArcsecPerPx, y: -p.northArcsec / scaleArcsecPerPx }));
  let sw = 0, mx = 0, my = 0, ux = 0, uy = 0;
  samples.forEach((p, i) => {
    sw += p.weight;
    mx += p.weight * p.x;
    my += p.weight * p.y;
    ux += p.weight * u[i].x;
    uy += p.weight * u[i].y;
  });
  mx /= sw; my /= sw; ux /= sw; uy /= sw;
  let a = 0, b = 0, uu = 0, spreadPx = 0;
  samples.forEach((p, i) => {
    const px = p.x - mx, py = p.y - my, qx = u[i].x - ux, qy = u[i].y - uy;
    a += p.weight * (px * qx + py * qy);
    b += p.weight * (px * qy - py * qx);
    uu += p.weight * (qx * qx + qy * qy);
    spreadPx = Math.max(spreadPx, Math.hypot(px, py));
  });
  const theta = Math.atan2(b, a);
  const c = Math.cos(theta), s = Math.sin(theta);
  const sunCentre = { x: mx - (c * ux + s * uy), y: my - (-s * ux + c * uy) };
  let r2 = 0;
  samples.forEach((p, i) => {
    const fx = sunCentre.x + c * u[i].x + s * u[i].y;
    const fy = sunCentre.y - s * u[i].x + c * u[i].y;
    r2 += p.weight * ((p.x - fx) ** 2 + (p.y - fy) ** 2);
  });
  const dof = Math.max(1, 2 * samples.length - 3);
  const rmsPx = Math.sqrt(r2 / sw);
  // Weights are relative: sigma^2 is per unit weight, from the residuals, floored for the best fits.
  const maxWeight = Math.max(...samples.map((p) => p.weight));
  const unitSigma2 = Math.max(r2 / dof, (CENTRE_SIGMA_FLOOR_PX * CENTRE_SIGMA_FLOOR_PX) * maxWeight);
  const sigmaRad = uu > 0 ? Math.sqrt(unitSigma2 / uu) : Infinity;
  const northAngleDeg = ((theta / DEG) % 360 + 360) % 360;
  return { northAngleDeg, sigmaDeg: Math.min(180, sigmaRad / DEG), rmsPx, sunCentre, spreadPx };
}
