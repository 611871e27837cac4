// A synthetic bracket whose Moon moves against the Sun as the ephemeris says it
// did at a real site during a real total eclipse, written as FITS files whose
// DATE-OBS reads a camera clock that ran ahead of UTC. The image orientation is
// chosen (celestial north NORTH_ANGLE_DEG counter-clockwise from image up, sky not
// mirrored), and the Moon's offsets are laid into the image from that statement
// alone (vectors below), not through the runner's own conversion.
//
// Site and instant: the total eclipse of 2024 April 8 near its greatest eclipse in
// Durango, Mexico (25.29 N, 104.14 W, 1200 m); mid-eclipse comes from lib/astro.
// These are inputs only: every check compares with truth or with astropy.
import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { computeSunMoonState, findLocalCircumstances } from "@/lib/astro";
import { createRng } from "@/lib/imaging/random";
import { synthesizeBracket, type SynthTruth } from "@/lib/imaging/synth-model";
import { writeSyntheticBracket } from "@/scripts/lib-synth/write-bracket";

export const SUN_SITE = { latDeg: 25.29, lonDeg: -104.14, elevationM: 1200 };
export const SUN_SIZE_PX = 512;
export const SUN_RADIUS_PX = 80;
export const NORTH_ANGLE_DEG = 30;
/** The camera clock ran this far ahead of UTC; the runner is told so with clockOffsetS. */
export const CLOCK_AHEAD_S = 37.5;
export const FRAME_COUNT = 7;
/** Long enough between frames that the Moon moves several pixels over the set (0.4 arcsec/s x 96 s at 12 arcsec/px). */
export const FRAME_INTERVAL_S = 16;
export const SUN_SEED = 11;

export interface SunBracketFixture {
  dir: string;
  files: string[];
  truth: SynthTruth;
  /** True UTC start of each exposure. */
  trueStartsMs: number[];
  exposuresS: number[];
  /** Largest distance between the linear Moon path the generator draws and the ephemeris offsets, px. */
  pathNonlinearityPx: number;
  scaleArcsecPerPx: number;
  sizePx: number;
}

/** Another kit on the same site and instant: its frames' size, the Sun's radius in them, and a roll of the camera (deg, added to every frame's turn). */
export interface SunKit {
  sizePx: number;
  radiusPx: number;
  rollDeg: number;
}

export const SUN_KIT: SunKit = { sizePx: SUN_SIZE_PX, radiusPx: SUN_RADIUS_PX, rollDeg: 0 };

/** Offset of n arcsec north and e arcsec east in image pixels (x right, y down), for north at angle theta counter-clockwise from up. */
function layOffsetInImage(northArcsec: number, eastArcsec: number, thetaDeg: number, scale: number): { dx: number; dy: number } {
  const t = (thetaDeg * Math.PI) / 180;
  // Up is (0, -1); turning a vector counter-clockwise on screen (y down) by t: (x, y) -> (x cos t + y sin t, -x sin t + y cos t).
  const turn = (x: number, y: number, a: number) => ({ x: x * Math.cos(a) + y * Math.sin(a), y: -x * Math.sin(a) + y * Math.cos(a) });
  const north = turn(0, -1, t);
  // East lies 90 deg counter-clockwise of north on an unmirrored sky image (east left of north when north is up).
  const east = turn(north.x, north.y, Math.PI / 2);
  return { dx: (northArcsec * north.x + eastArcsec * east.x) / scale, dy: (northArcsec * north.y + eastArcsec * east.y) / scale };
}

export async function writeSunBracket(parent = mkdtempSync(join(tmpdir(), "crownlight-sun-")), kit: SunKit = SUN_KIT): Promise<SunBracketFixture> {
  const maximum = findLocalCircumstances(SUN_SITE, Date.UTC(2024, 3, 8, 16, 0, 0)).maximum.utcMs;
  const exposuresS = Array.from({ length: FRAME_COUNT }, (_, k) => Number(((1 / 2000) * (2000 / 15) ** (k / (FRAME_COUNT - 1))).toPrecision(3)));
  const trueStartsMs = exposuresS.map((_, k) => Math.round(maximum + (k - (FRAME_COUNT - 1) / 2) * FRAME_INTERVAL_S * 1000));
  const states = trueStartsMs.map((t, k) => computeSunMoonState(SUN_SITE, t + exposuresS[k] * 500));
  const middle = states[(FRAME_COUNT - 1) / 2];
  const scaleArcsecPerPx = middle.sun.semiDiameterArcsec / kit.radiusPx;
  const offsets = states.map((s) => layOffsetInImage(s.moonMinusSun.northArcsec, s.moonMinusSun.eastArcsec, NORTH_ANGLE_DEG, scaleArcsecPerPx));
  // The generator draws a straight, steady path; over 96 s the ephemeris is straight to far below a pixel.
  const drift = { dx: (offsets[FRAME_COUNT - 1].dx - offsets[0].dx) / (FRAME_COUNT - 1), dy: (offsets[FRAME_COUNT - 1].dy - offsets[0].dy) / (FRAME_COUNT - 1) };
  const pathNonlinearityPx = Math.max(...offsets.map((o, k) => Math.hypot(o.dx - offsets[0].dx - k * drift.dx, o.dy - offsets[0].dy - k * drift.dy)));
  const rng = createRng(SUN_SEED ^ 0x5eed);
  const { frames, truth } = synthesizeBracket({
    width: kit.sizePx,
    height: kit.sizePx,
    channels: 1,
    exposuresS,
    sunRadiusPx: kit.radiusPx,
    seed: SUN_SEED,
    moonRadiusRatio: middle.moon.semiDiameterArcsec / middle.sun.semiDiameterArcsec,
    moonOffsetPx: offsets[0],
    moonDriftPxPerFrame: drift,
    // Pointing errors between frames, as a tracking mount has them: up to 3 px and 0.2 deg.
    shiftsPx: exposuresS.map(() => ({ dx: (rng() - 0.5) * 6, dy: (rng() - 0.5) * 6 })),
    rotationsDeg: exposuresS.map(() => kit.rollDeg + (rng() - 0.5) * 0.4),
    captureStartMs: trueStartsMs[0],
    frameIntervalS: FRAME_INTERVAL_S,
  });
  const dir = join(parent, "bracket");
  const written = await writeSyntheticBracket(
    {
      width: kit.sizePx,
      height: kit.sizePx,
      blackLevel: truth.blackLevel,
      whiteLevel: truth.whiteLevel,
      // DATE-OBS as the camera wrote it: its clock ran ahead.
      frames: frames.map((f, k) => ({ name: f.name.replace(/\.fits$/, ""), planes: f.planes, exposureS: f.exposureS, captureTimeMs: trueStartsMs[k] + CLOCK_AHEAD_S * 1000 })),
      truth: { synthetic: true },
    },
    dir,
    ["fits"],
  );
  return { dir, files: written.map((w) => join(dir, w.files.fits!)), truth, trueStartsMs, exposuresS, pathNonlinearityPx, scaleArcsecPerPx, sizePx: kit.sizePx };
}
