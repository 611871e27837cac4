// The pure part of our synthetic bracket generator: a K+F corona with streamers,
// fine rays and prominences, occulted by a drifting lunar disk with earthshine,
// seen by a camera that shifts and turns a little between frames, with photon
// and read noise and clipping. File writers live in lib/media.
import { blurGaussian } from "./blur";
import { ImagingError } from "./errors";
import { createRng, sampleGaussian, samplePoisson } from "./random";
import { createScene, evaluateCorona, evaluateProminences } from "./synth-scene";
import { applyAffine, invertAffine, toAffine, type SimilarityTransform } from "./similarity";

export { computeBaumbachBrightness } from "./synth-scene";

export interface SynthOptions {
  width: number;
  height: number;
  channels: 1 | 3;
  exposuresS: number[];
  sunRadiusPx: number;
  seed: number;
  /**
   * Seed of the corona and prominences alone (default: seed). Brackets that share it
   * show one and the same Sun, while their noise and pointing follow their own seeds.
   */
  sceneSeed?: number;
  /** Sun centre in scene (reference) pixels; default a little off the image centre. */
  sunCentre?: { x: number; y: number };
  /** Moon radius over Sun radius; default 1.045. */
  moonRadiusRatio?: number;
  /** Moon minus Sun at the first frame, px; default (0.012, -0.008) Sun radii. */
  moonOffsetPx?: { dx: number; dy: number };
  /** Moon motion against the Sun from one frame to the next, px; default none. */
  moonDriftPxPerFrame?: { dx: number; dy: number };
  /** Per-frame camera pointing: frame = scale R(rot) (scene - c) + c + shift (see similarity.ts). */
  shiftsPx?: { dx: number; dy: number }[];
  rotationsDeg?: number[];
  scales?: number[];
  whiteLevel?: number;
  blackLevel?: number;
  readNoiseDn?: number;
  electronsPerDn?: number;
  /** K+F corona rate at the limb (r = 1), DN/s; scales the whole scene. Default 4e6. */
  limbRateDnPerS?: number;
  streamerCount?: number;
  prominenceCount?: number;
  /** Peak prominence brightness over the K+F corona at 1.1 R; default 4 (see PROMINENCE_OVER_INNER_CORONA). */
  prominenceContrast?: number;
  /** Earthshine over the mean solar disk; default 1e-9. */
  earthshineRatio?: number;
  psfSigmaPx?: number;
  /** Photon and read noise; default true. */
  noise?: boolean;
  captureStartMs?: number;
  frameIntervalS?: number;
  /** Offset (bias pedestal) per frame in DN, overriding blackLevel frame by frame; a real camera's pedestal may drift a little. */
  blackLevels?: number[];
  /** A satellite or aircraft trail in one frame: a straight streak in frame pixels, peak DN above the scene (it crosses in far less than the exposure). */
  trail?: SynthTrail;
  /** A passing thin cloud: the scene's light is multiplied by this transmission (0..1] in the given frames. */
  clouds?: { frame: number; transmission: number }[];
  /** Defects fixed on the sensor (frame pixels, the same in every frame): a hot pixel adds dark current, a stuck one always reads its level. */
  sensorDefects?: SynthDefect[];
}

export interface SynthTrail {
  frame: number;
  from: { x: number; y: number };
  to: { x: number; y: number };
  /** Gaussian profile across the streak, px. */
  sigmaPx: number;
  peakDn: number;
}

export type SynthDefect =
  | { kind: "hot"; x: number; y: number; dnPerS: number }
  | { kind: "stuck"; x: number; y: number; levelDn: number };

export interface SynthFrame {
  name: string;
  exposureS: number;
  captureTimeMs: number;
  /** DN including the black level, rounded and clipped at the white level. */
  planes: Float32Array[];
  /** This frame's offset (bias pedestal), DN. */
  blackLevel: number;
}

export interface SynthTruth {
  /** Scene radiance in DN/s per plane, without the Moon, blurred by the PSF; 0 inside the solar disk. */
  radiance: Float32Array[];
  sunCentre: { x: number; y: number };
  sunRadiusPx: number;
  moonRadiusPx: number;
  /** Moon centre per frame in scene pixels. */
  moonScene: { x: number; y: number }[];
  /** Moon centre per frame in that frame's pixels. */
  moonInFrame: { x: number; y: number }[];
  /** Moon minus Sun per frame in scene pixels. */
  moonMinusSunPx: { dx: number; dy: number }[];
  /** Scene to frame, per frame. */
  transforms: SimilarityTransform[];
  whiteLevel: number;
  blackLevel: number;
  /** Offset of each frame, DN. */
  blackLevels: number[];
  /** Light of the trail, if any, in its frame's pixels, DN (for checks of what a merge leaves of it). */
  trailDn?: Float32Array;
}

const CORONA_COLOUR = [1.0, 0.96, 0.88];
/** Hydrogen Balmer light (H-alpha with H-beta and H-gamma) that the eye sees as pink-red. */
const PROMINENCE_COLOUR = [1.0, 0.3, 0.42];
const EARTHSHINE_COLOUR = [0.82, 0.9, 1.0];

function requireOption(ok: boolean, field: string, detail: string): void {
  if (!ok) throw new ImagingError("bad-parameter", `synthesizeBracket: ${field} ${detail}`);
}

/** A straight streak with a Gaussian cross-section, DN per pixel, in frame pixels. */
function renderTrail(trail: SynthTrail, width: number, height: number): Float32Array {
  const out = new Float32Array(width * height);
  const dx = trail.to.x - trail.from.x;
  const dy = trail.to.y - trail.from.y;
  const length = Math.hypot(dx, dy);
  const ux = length > 0 ? dx / length : 1;
  const uy = length > 0 ? dy / length : 0;
  const reach = 4 * trail.sigmaPx;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const px = x - trail.from.x;
      const py = y - trail.from.y;
      const along = px * ux + py * uy;
      if (along < 0 || along > length) continue;
      const across = Math.abs(px * uy - py * ux);
      if (across > reach) continue;
      out[y * width + x] = trail.peakDn * Math.exp((-0.5 * across * across) / (trail.sigmaPx * trail.sigmaPx));
    }
  }
  return out;
}

const SUPERSAMPLE_EDGE = [-0.375, -0.125, 0.125, 0.375];

/**
 * Renders a synthetic bracket. Each frame sees the scene through its own
 * similarity transform (scene to frame) with the Moon at its own place; the
 * lunar edge is anti-aliased over 4 x 4 sub-pixels (the corona is sampled at
 * pixel centres, as it varies slowly), the light is blurred by a Gaussian PSF, then exposed:
 * electrons ~ Poisson(rate t g), DN = electrons / g + black + read noise,
 * rounded and clipped to [0, white].
 */
export function synthesizeBracket(options: SynthOptions): { frames: SynthFrame[]; truth: SynthTruth } {
  const o = options;
  const { width, height, channels, exposuresS, sunRadiusPx } = o;
  requireOption(Number.isInteger(width) && width >= 16 && width <= 8192, "width", `must be an integer in [16, 8192], got ${width}`);
  requireOption(Number.isInteger(height) && height >= 16 && height <= 8192, "height", `must be an integer in [16, 8192], got ${height}`);
  requireOption(channels === 1 || channels === 3, "channels", `must be 1 or 3, got ${channels}`);
  requireOption(Array.isArray(exposuresS) && exposuresS.length >= 1, "exposuresS", "must list at least one exposure");
  exposuresS.forEach((t, i) => requireOption(Number.isFinite(t) && t > 0, `exposuresS[${i}]`, `must be a positive number of seconds, got ${t}`));
  requireOption(sunRadiusPx > 2 && sunRadiusPx < Math.min(width, height), "sunRadiusPx", `must be between 2 and the image size, got ${sunRadiusPx}`);
  const n = exposuresS.length;
  for (const [field, list] of [["shiftsPx", o.shiftsPx], ["rotationsDeg", o.rotationsDeg], ["scales", o.scales]] as const) {
    requireOption(list === undefined || list.length === n, field, `must have one entry per exposure (${n}), got ${list?.length}`);
  }
  const whiteLevel = o.whiteLevel ?? 16383;
  const blackLevel = o.blackLevel ?? 512;
  requireOption(whiteLevel > blackLevel && blackLevel >= 0, "whiteLevel", `must exceed blackLevel (${blackLevel}), got ${whiteLevel}`);
  requireOption(o.blackLevels === undefined || (o.blackLevels.length === exposuresS.length && o.blackLevels.every((b) => b >= 0 && b < whiteLevel)), "blackLevels", `must give one offset in [0, whiteLevel) per exposure (${exposuresS.length})`);
  for (const c of o.clouds ?? []) requireOption(Number.isInteger(c.frame) && c.frame >= 0 && c.frame < exposuresS.length && c.transmission > 0 && c.transmission <= 1, "clouds", `need a frame index and a transmission in (0, 1], got ${JSON.stringify(c)}`);
  requireOption(o.trail === undefined || (Number.isInteger(o.trail.frame) && o.trail.frame >= 0 && o.trail.frame < exposuresS.length && o.trail.sigmaPx > 0), "trail", "needs a frame index and a positive width");
  const readNoise = o.readNoiseDn ?? 2.5;
  const gain = o.electronsPerDn ?? 1;
  const psf = o.psfSigmaPx ?? 1;
  requireOption(psf === 0 || psf >= 0.5, "psfSigmaPx", `must be 0 or at least 0.5, got ${psf}`);
  const rng = createRng(o.seed);
  const sun = o.sunCentre ?? { x: (width - 1) / 2 + 0.37, y: (height - 1) / 2 - 0.21 };
  const scene = createScene(o, sun, o.sceneSeed === undefined ? rng : createRng(o.sceneSeed));
  const moonR = sunRadiusPx * (o.moonRadiusRatio ?? 1.045);
  const offset0 = o.moonOffsetPx ?? { dx: 0.012 * sunRadiusPx, dy: -0.008 * sunRadiusPx };
  const drift = o.moonDriftPxPerFrame ?? { dx: 0, dy: 0 };
  const earthshine = scene.scale * (o.earthshineRatio ?? 1e-9);
  const plane = width * height;

  const transforms: SimilarityTransform[] = [];
  const moonScene: { x: number; y: number }[] = [];
  const moonInFrame: { x: number; y: number }[] = [];
  const moonMinusSunPx: { dx: number; dy: number }[] = [];
  const frames: SynthFrame[] = [];
  const blackLevels: number[] = [];
  let trailDn: Float32Array | undefined;
  const start = o.captureStartMs ?? Date.UTC(2027, 7, 2, 10, 3, 0);
  const interval = o.frameIntervalS ?? 1.5;

  for (let f = 0; f < n; f++) {
    const t: SimilarityTransform = {
      dx: o.shiftsPx?.[f].dx ?? 0,
      dy: o.shiftsPx?.[f].dy ?? 0,
      rotationDeg: o.rotationsDeg?.[f] ?? 0,
      scale: o.scales?.[f] ?? 1,
    };
    transforms.push(t);
    const offset = { dx: offset0.dx + f * drift.dx, dy: offset0.dy + f * drift.dy };
    requireOption(Math.hypot(offset.dx, offset.dy) + sunRadiusPx < moonR, "moonOffsetPx", `leaves the Sun uncovered at frame ${f}: the eclipse must stay total`);
    moonMinusSunPx.push(offset);
    const moon = { x: sun.x + offset.dx, y: sun.y + offset.dy };
    moonScene.push(moon);
    const toFrame = toAffine(t, width, height);
    moonInFrame.push(applyAffine(toFrame, moon.x, moon.y));
    const toScene = invertAffine(toFrame);

    // Radiance in frame pixels, one grey plane, plus the share of prominence and earthshine light for colour.
    const corona = new Float32Array(plane);
    const prom = channels === 3 ? new Float32Array(plane) : corona;
    const shine = channels === 3 ? new Float32Array(plane) : corona;
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        const qx = toScene.a * x - toScene.b * y + toScene.tx;
        const qy = toScene.b * x + toScene.a * y + toScene.ty;
        const rho = Math.sqrt((qx - moon.x) ** 2 + (qy - moon.y) ** 2);
        // Within a pixel of the limb the open part of the pixel is integrated on 4 x 4 sub-samples (light and
        // cover together: the light at the pixel's centre would stand for a part the Moon hides).
        let covered: number;
        let c: number;
        let p: number;
        if (rho < moonR - 1) {
          covered = 1;
          c = 0;
          p = 0;
        } else if (rho > moonR + 1) {
          covered = 0;
          c = evaluateCorona(scene, qx, qy);
          p = evaluateProminences(scene, qx, qy);
        } else {
          covered = 0;
          c = 0;
          p = 0;
          for (const sy of SUPERSAMPLE_EDGE) {
            for (const sx of SUPERSAMPLE_EDGE) {
              const ux = qx + toScene.a * sx - toScene.b * sy;
              const uy = qy + toScene.b * sx + toScene.a * sy;
              if ((ux - moon.x) ** 2 + (uy - moon.y) ** 2 < moonR * moonR) covered++;
              else {
                c += evaluateCorona(scene, ux, uy);
                p += evaluateProminences(scene, ux, uy);
              }
            }
          }
          const samples = SUPERSAMPLE_EDGE.length ** 2;
          covered /= samples;
          c /= samples;
          p /= samples;
        }
        const e = covered * earthshine;
        const i = y * width + x;
        if (channels === 3) {
          corona[i] = c;
          prom[i] = p;
          shine[i] = e;
        } else corona[i] = c + p + e;
      }
    }
    const rates: Float32Array[] = [];
    for (let ch = 0; ch < channels; ch++) {
      let r: Float32Array;
      if (channels === 3) {
        r = new Float32Array(plane);
        for (let i = 0; i < plane; i++) r[i] = CORONA_COLOUR[ch] * corona[i] + PROMINENCE_COLOUR[ch] * prom[i] + EARTHSHINE_COLOUR[ch] * shine[i];
      } else r = corona;
      rates.push(psf > 0 ? blurGaussian(r, width, height, psf) : r);
    }
    const exposureS = exposuresS[f];
    const frameBlack = o.blackLevels?.[f] ?? blackLevel;
    const transmission = o.clouds?.find((c) => c.frame === f)?.transmission ?? 1;
    const trail = o.trail?.frame === f ? renderTrail(o.trail, width, height) : undefined;
    if (trail) trailDn = trail;
    const hot = new Map<number, number>();
    const stuck = new Map<number, number>();
    for (const d of o.sensorDefects ?? []) {
      const i = Math.round(d.y) * width + Math.round(d.x);
      if (d.kind === "hot") hot.set(i, d.dnPerS);
      else stuck.set(i, d.levelDn);
    }
    const planes = rates.map((rate) => {
      const dn = new Float32Array(plane);
      for (let i = 0; i < plane; i++) {
        const mean = Math.max(0, rate[i]) * exposureS * transmission + (trail ? trail[i] : 0) + (hot.get(i) ?? 0) * exposureS;
        let v = o.noise === false ? mean : samplePoisson(rng, mean * gain) / gain + readNoise * sampleGaussian(rng);
        v = Math.round(v + frameBlack);
        const level = stuck.get(i);
        if (level !== undefined) v = level;
        dn[i] = v < 0 ? 0 : v > whiteLevel ? whiteLevel : v;
      }
      return dn;
    });
    blackLevels.push(frameBlack);
    frames.push({ name: `synthetic-${String(f + 1).padStart(2, "0")}.fits`, exposureS, captureTimeMs: start + f * interval * 1000, planes, blackLevel: frameBlack });
  }

  const radiance: Float32Array[] = [];
  const grey = new Float32Array(plane);
  const promGrey = new Float32Array(plane);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      grey[y * width + x] = evaluateCorona(scene, x, y);
      promGrey[y * width + x] = evaluateProminences(scene, x, y);
    }
  }
  for (let ch = 0; ch < channels; ch++) {
    const r = new Float32Array(plane);
    const cc = channels === 3 ? CORONA_COLOUR[ch] : 1;
    const pc = channels === 3 ? PROMINENCE_COLOUR[ch] : 1;
    for (let i = 0; i < plane; i++) r[i] = cc * grey[i] + pc * promGrey[i];
    radiance.push(psf > 0 ? blurGaussian(r, width, height, psf) : r);
  }
  return {
    frames,
    truth: { radiance, sunCentre: sun, sunRadiusPx, moonRadiusPx: moonR, moonScene, moonInFrame, moonMinusSunPx, transforms, whiteLevel, blackLevel, blackLevels, trailDn },
  };
}
