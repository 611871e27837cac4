// Synthetic brackets with the sky as it was at a demo site: mid-totality from
// lib/astro's local circumstances, the Sun's and Moon's topocentric sizes, and
// the Moon-minus-Sun offset at each frame's mid-exposure, turned into pixels with
// the kit's plate scale and the north angle its mount implies. The frames are
// rendered by lib/imaging's generator and written as FITS (EXPTIME, DATE-OBS),
// each saying that it is synthetic.
import {
  computeNorthAngleInImageDeg,
  computeSunMoonState,
  findLocalCircumstances,
  findLocalCircumstancesOnTrack,
  interpolateTrack,
  type MountKind,
  type SiteLocation,
  type TrackPoint,
} from "@/lib/astro";
import { createRng } from "@/lib/imaging/random";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { encodeFits } from "@/lib/media/fits-write";
import { convertSkyOffsetToPx } from "@/lib/reduction-runner/sun-geometry";

export type DemoSitePlace = { kind: "fixed"; location: SiteLocation } | { kind: "moving"; track: TrackPoint[] };

export interface DemoBracketSpec {
  place: DemoSitePlace;
  /** Any instant within a day of the eclipse; the local maximum is searched from it. */
  nearUtcMs: number;
  pixelPitchUm: number;
  focalMm: number;
  mount: MountKind;
  width: number;
  height: number;
  channels: 1 | 3;
  exposuresS: number[];
  frameIntervalS: number;
  seed: number;
  /** Seed of the corona itself: every demo bracket shows the same Sun (DEMO_CORONA_SEED). */
  sceneSeed: number;
  /** File names get this prefix and a two-digit number. */
  filePrefix: string;
}

export interface DemoFrameFile {
  fileName: string;
  exposureS: number;
  captureTimeMs: number;
  bytes: Uint8Array<ArrayBuffer>;
}

export interface DemoBracket {
  frames: DemoFrameFile[];
  /** Second and third contact at the site, UTC ms (the bracket is centred between them). */
  secondContactMs: number;
  thirdContactMs: number;
  plateScaleArcsecPerPx: number;
  northAngleDeg: number;
  sunRadiusPx: number;
}

const SYNTH_INSTRUMENT = "Crownlight synthetic";
// FITS holds DN above the sensor's black level; the generator's defaults (lib/imaging/synth-model.ts).
const BLACK_DN = 512;
const WHITE_DN = 16383;

function locate(place: DemoSitePlace, utcMs: number): SiteLocation {
  return place.kind === "fixed" ? place.location : interpolateTrack(place.track, utcMs);
}

/**
 * Plate scale in arcsec per pixel = 206.265 x pitch (um) / focal length (mm)
 * (DESIGN.md, the kit's expected plate scale).
 */
export function computeDemoPlateScale(pixelPitchUm: number, focalMm: number): number {
  return (206.265 * pixelPitchUm) / focalMm;
}

/** Renders the bracket centred on the site's mid-totality and encodes each frame as FITS. */
export function createDemoBracket(spec: DemoBracketSpec): DemoBracket {
  const circumstances =
    spec.place.kind === "fixed" ? findLocalCircumstances(spec.place.location, spec.nearUtcMs) : findLocalCircumstancesOnTrack(spec.place.track, spec.nearUtcMs);
  if (!circumstances.secondContact || !circumstances.thirdContact) {
    throw new Error(`demo bracket ${spec.filePrefix}: the eclipse is not total at this site, so the demo bracket cannot show the corona`);
  }
  const n = spec.exposuresS.length;
  const spanMs = (n - 1) * spec.frameIntervalS * 1000;
  // Whole milliseconds: DATE-OBS keeps three decimals of a second.
  const startMs = Math.round((circumstances.secondContact.utcMs + circumstances.thirdContact.utcMs) / 2 - spanMs / 2);
  const midExposure = spec.exposuresS.map((t, i) => startMs + i * spec.frameIntervalS * 1000 + t * 500);
  const states = midExposure.map((ms) => computeSunMoonState(locate(spec.place, ms), ms));
  const middle = Math.floor(n / 2);
  const northAngleDeg = computeNorthAngleInImageDeg({ mount: spec.mount }, locate(spec.place, midExposure[middle]), midExposure[middle]);
  if (northAngleDeg === null) throw new Error(`demo bracket ${spec.filePrefix}: a ${spec.mount} mount gives no image orientation; choose an equatorial, alt-az or fixed-tripod kit`);
  const scale = computeDemoPlateScale(spec.pixelPitchUm, spec.focalMm);
  const sun = states[middle].sun.semiDiameterArcsec;
  const moon = states[middle].moon.semiDiameterArcsec;
  // One corona for every observer: the generator draws it with solar north up, from one seed, and each
  // camera's frames turn it by where solar north stands in their picture. In that drawing celestial north
  // stands at -P; a frame turned by r shows north at (its angle in the drawing) - r (synth-model.ts), so
  // r = -P - northAngleDeg puts it where the kit's mount says. The Moon is laid in the drawing too.
  const northInSceneDeg = -states[middle].pDeg;
  const turnDeg = northInSceneDeg - northAngleDeg;
  const offsets = states.map((s) => convertSkyOffsetToPx(s.moonMinusSun.northArcsec, s.moonMinusSun.eastArcsec, northInSceneDeg, scale));
  // The generator moves the Moon by a constant step per frame; over a few seconds its path is straight.
  const drift = n > 1 ? { dx: (offsets[n - 1].dx - offsets[0].dx) / (n - 1), dy: (offsets[n - 1].dy - offsets[0].dy) / (n - 1) } : { dx: 0, dy: 0 };
  // Small pointing errors between frames, as a real mount has (up to 2 px and 0.1 deg).
  const rng = createRng(spec.seed ^ 0x5eed);
  const shiftsPx = spec.exposuresS.map(() => ({ dx: (rng() - 0.5) * 4, dy: (rng() - 0.5) * 4 }));
  const rotationsDeg = spec.exposuresS.map(() => turnDeg + (rng() - 0.5) * 0.2);
  const sunRadiusPx = sun / scale;
  const { frames } = synthesizeBracket({
    width: spec.width,
    height: spec.height,
    channels: spec.channels,
    exposuresS: spec.exposuresS,
    sunRadiusPx,
    moonRadiusRatio: moon / sun,
    moonOffsetPx: offsets[0],
    moonDriftPxPerFrame: drift,
    shiftsPx,
    rotationsDeg,
    seed: spec.seed,
    sceneSeed: spec.sceneSeed,
    whiteLevel: WHITE_DN,
    blackLevel: BLACK_DN,
    captureStartMs: startMs,
    frameIntervalS: spec.frameIntervalS,
  });
  const files = frames.map((f, i) => {
    const planes = f.planes.map((p) => Uint16Array.from(p, (dn) => Math.max(0, Math.round(dn - BLACK_DN))));
    const bytes = encodeFits({
      width: spec.width,
      height: spec.height,
      planes,
      cards: [
        { key: "EXPTIME", value: f.exposureS, comment: "exposure time in seconds" },
        { key: "DATE-OBS", value: new Date(f.captureTimeMs).toISOString().replace("Z", ""), comment: "UTC start of the exposure" },
        { key: "INSTRUME", value: SYNTH_INSTRUMENT, comment: "synthetic data, not an observation" },
        { key: "SATURATE", value: WHITE_DN - BLACK_DN, comment: "DN at which pixels clip" },
        { key: "XPIXSZ", value: spec.pixelPitchUm, comment: "pixel pitch in micrometres" },
        { key: "FOCALLEN", value: spec.focalMm, comment: "focal length in mm" },
      ],
      history: ["Synthetic frame made by Crownlight's generator for the demo scenario; not an observation."],
    });
    return { fileName: `${spec.filePrefix}-${String(i + 1).padStart(2, "0")}.fits`, exposureS: f.exposureS, captureTimeMs: f.captureTimeMs, bytes: new Uint8Array(bytes) };
  });
  return {
    frames: files,
    secondContactMs: circumstances.secondContact.utcMs,
    thirdContactMs: circumstances.thirdContact.utcMs,
    plateScaleArcsecPerPx: scale,
    northAngleDeg,
    sunRadiusPx,
  };
}
