// A synthetic sensor for calibration tests: one seeded description of its bias
// (pedestal, row and column pattern), dark current (per pixel, with hot pixels),
// stuck and dead pixels, vignetting and dust shadows, from which bias, dark and
// flat frames are made and with which synthesizeBracket's light frames are
// "recorded". Pure: typed arrays in and out.
import { ImagingError } from "./errors";
import { createRng, sampleGaussian, samplePoisson, type Rng } from "./random";
import type { SynthFrame } from "./synth-model";
import type { LinearFrame } from "./types";

export interface SensorOptions {
  width: number;
  height: number;
  channels: 1 | 3;
  seed: number;
  /** Mean bias pedestal, DN; default 600. */
  pedestalDn?: number;
  /** Peak-to-peak of the fixed bias pattern (column and row stripes), DN; default 6. */
  biasPatternDn?: number;
  /** Read noise, DN rms; default 3. */
  readNoiseDn?: number;
  /** Median dark current, DN/s; default 2. */
  darkCurrentDnPerS?: number;
  /** Pixel-to-pixel spread of the dark current, relative (log-normal sigma); default 0.3. */
  darkCurrentSpread?: number;
  /** Hot pixels: count and dark current range, DN/s; defaults 40 and [300, 3000]. */
  hotPixelCount?: number;
  hotCurrentDnPerS?: [number, number];
  /** Stuck pixels (a fixed raw value whatever the light and time): count and value range, DN; defaults 12 and [2000, 12000]. */
  stuckPixelCount?: number;
  stuckValueDn?: [number, number];
  /** Dead pixels (no response to light or time: pedestal and read noise only); default 12. */
  deadPixelCount?: number;
  /** Vignetting: response in the corners over the centre, by a cos^4 law; default 0.7. */
  cornerResponse?: number;
  /** Dust shadows: count, and depth range (share of light lost at the darkest point); defaults 4 and [0.02, 0.06]. */
  dustCount?: number;
  dustDepth?: [number, number];
  /** Response of each colour plane relative to the first (a colour cast of the flat); default [1, 0.96, 0.88]. */
  planeGains?: number[];
  /** Sensor white level, DN; default 16383 (14-bit). */
  whiteLevel?: number;
  electronsPerDn?: number;
}

export interface SensorModel {
  width: number;
  height: number;
  channels: 1 | 3;
  pedestalDn: number;
  readNoiseDn: number;
  whiteLevel: number;
  electronsPerDn: number;
  /** Noise-free bias level per pixel (pedestal + fixed pattern), DN. */
  biasDn: Float32Array;
  /** Dark current per pixel, DN/s (hot pixels included). */
  darkCurrentDnPerS: Float32Array;
  /** Light response per plane per pixel (vignetting x dust x plane gain); the truth a normalised flat recovers. */
  response: Float32Array[];
  hotPixels: number[];
  stuckPixels: { index: number; valueDn: number }[];
  deadPixels: number[];
  /** Dust shadows, centre and radius in pixels. */
  dust: { x: number; y: number; radiusPx: number; depth: number }[];
}

function requireSensorOption(ok: boolean, field: string, detail: string): void {
  if (!ok) throw new ImagingError("bad-parameter", `createSensorModel: ${field} ${detail}`);
}

/** Distinct random pixel indices away from the border (so the 8-neighbour tests see whole neighbourhoods) and from each other. */
function pickPixels(rng: Rng, width: number, height: number, count: number, taken: Set<number>): number[] {
  const out: number[] = [];
  let guard = 0;
  while (out.length < count && guard++ < count * 1000) {
    const x = 2 + Math.floor(rng() * (width - 4));
    const y = 2 + Math.floor(rng() * (height - 4));
    const i = y * width + x;
    let clear = true;
    for (let dy = -1; dy <= 1 && clear; dy++) for (let dx = -1; dx <= 1; dx++) if (taken.has(i + dy * width + dx)) clear = false;
    if (!clear) continue;
    taken.add(i);
    out.push(i);
  }
  return out;
}

/**
 * A seeded sensor. Vignetting follows the cos^4 law of natural illumination fall-off
 * (e.g. Ray, "Applied Photographic Optics", 3rd ed., chapter 13): response =
 * cos^4(atan(r / f)) with f chosen so the corners get cornerResponse. Dust on a
 * filter or window in a converging beam casts a defocused image of the aperture:
 * a soft ring, darker at its rim than in its middle (common knowledge of the trade).
 */
export function createSensorModel(options: SensorOptions): SensorModel {
  const o = options;
  const { width, height, channels } = o;
  requireSensorOption(Number.isInteger(width) && width >= 16 && width <= 8192, "width", `must be an integer in [16, 8192], got ${width}`);
  requireSensorOption(Number.isInteger(height) && height >= 16 && height <= 8192, "height", `must be an integer in [16, 8192], got ${height}`);
  requireSensorOption(channels === 1 || channels === 3, "channels", `must be 1 or 3, got ${channels}`);
  const whiteLevel = o.whiteLevel ?? 16383;
  const pedestalDn = o.pedestalDn ?? 600;
  requireSensorOption(pedestalDn >= 0 && pedestalDn < whiteLevel / 2, "pedestalDn", `must be in [0, whiteLevel / 2), got ${pedestalDn}`);
  const cornerResponse = o.cornerResponse ?? 0.7;
  requireSensorOption(cornerResponse > 0 && cornerResponse <= 1, "cornerResponse", `must be in (0, 1], got ${cornerResponse}`);
  const rng = createRng(o.seed);
  const size = width * height;
  const pattern = o.biasPatternDn ?? 6;
  const cols = Float32Array.from({ length: width }, () => rng() - 0.5);
  const rows = Float32Array.from({ length: height }, () => rng() - 0.5);
  const biasDn = new Float32Array(size);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) biasDn[y * width + x] = pedestalDn + pattern * (0.7 * cols[x] + 0.3 * rows[y]);

  const dark = new Float32Array(size);
  const dcMedian = o.darkCurrentDnPerS ?? 2;
  const dcSpread = o.darkCurrentSpread ?? 0.3;
  for (let i = 0; i < size; i++) dark[i] = dcMedian * Math.exp(dcSpread * sampleGaussian(rng));
  const taken = new Set<number>();
  const [hotLo, hotHi] = o.hotCurrentDnPerS ?? [300, 3000];
  const hotPixels = pickPixels(rng, width, height, o.hotPixelCount ?? 40, taken);
  for (const i of hotPixels) dark[i] = hotLo * Math.pow(hotHi / hotLo, rng());
  const [stuckLo, stuckHi] = o.stuckValueDn ?? [2000, 12000];
  const stuckPixels = pickPixels(rng, width, height, o.stuckPixelCount ?? 12, taken).map((index) => ({ index, valueDn: Math.round(stuckLo + (stuckHi - stuckLo) * rng()) }));
  const deadPixels = pickPixels(rng, width, height, o.deadPixelCount ?? 12, taken);

  const cx = (width - 1) / 2;
  const cy = (height - 1) / 2;
  const rCorner = Math.hypot(cx, cy);
  // cos^4(theta) = cornerResponse at the corner: tan(theta) = rCorner / f.
  const thetaCorner = Math.acos(Math.pow(cornerResponse, 0.25));
  const focal = thetaCorner > 0 ? rCorner / Math.tan(thetaCorner) : Infinity;
  const [depthLo, depthHi] = o.dustDepth ?? [0.02, 0.06];
  const scale = Math.min(width, height);
  const dust = Array.from({ length: o.dustCount ?? 4 }, () => ({
    x: scale * 0.08 + rng() * (width - scale * 0.16),
    y: scale * 0.08 + rng() * (height - scale * 0.16),
    radiusPx: scale * (0.025 + 0.03 * rng()),
    depth: depthLo + (depthHi - depthLo) * rng(),
  }));
  const shape = new Float32Array(size);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const r = Math.hypot(x - cx, y - cy);
      const cos = Number.isFinite(focal) ? Math.cos(Math.atan(r / focal)) : 1;
      let v = cos ** 4;
      for (const d of dust) {
        const rho = Math.hypot(x - d.x, y - d.y) / d.radiusPx;
        if (rho > 1.6) continue;
        // A soft disk (60 % of the depth) with a darker rim at rho = 1 (the full depth).
        const disk = 0.6 / (1 + Math.exp((rho - 1) / 0.08));
        const rim = 0.4 * Math.exp(-(((rho - 0.95) / 0.12) ** 2));
        v *= 1 - d.depth * Math.min(1, disk + rim);
      }
      shape[y * width + x] = v;
    }
  }
  const gains = o.planeGains ?? [1, 0.96, 0.88];
  requireSensorOption(gains.length >= channels && gains.every((g) => g > 0), "planeGains", `must give a positive gain for each of the ${channels} plane(s)`);
  const response = Array.from({ length: channels }, (_, c) => shape.map((v) => v * gains[c]));
  for (const i of deadPixels) for (const p of response) p[i] = 0;
  return {
    width, height, channels, pedestalDn, readNoiseDn: o.readNoiseDn ?? 3, whiteLevel, electronsPerDn: o.electronsPerDn ?? 1,
    biasDn, darkCurrentDnPerS: dark, response, hotPixels, stuckPixels, deadPixels, dust,
  };
}

/**
 * One exposure of the sensor: raw = bias + Poisson(light x response x t + dark x t)
 * + read noise, rounded and clipped to [0, white]; stuck pixels read their value,
 * dead pixels the bias and read noise only. lightDn(c, i) is the light in DN over
 * the whole exposure reaching pixel i of plane c (before the response).
 */
function exposeSensor(
  sensor: SensorModel,
  exposureS: number,
  rng: Rng,
  lightDn: ((c: number, i: number) => number) | null,
  options: { lightIsSampled?: boolean; clipped?: (c: number, i: number) => boolean } = {},
): Float32Array[] {
  const { lightIsSampled = false, clipped } = options;
  const size = sensor.width * sensor.height;
  const g = sensor.electronsPerDn;
  const planes: Float32Array[] = [];
  const dead = new Set(sensor.deadPixels);
  for (let c = 0; c < sensor.channels; c++) {
    const out = new Float32Array(size);
    const resp = sensor.response[c];
    for (let i = 0; i < size; i++) {
      if (clipped?.(c, i)) {
        out[i] = sensor.whiteLevel;
        continue;
      }
      // A sampled light keeps its negative read-noise excursions: clamping them would bias dark areas upwards.
      const light = lightDn ? (lightIsSampled ? lightDn(c, i) : Math.max(0, lightDn(c, i))) * resp[i] : 0;
      const darkSignal = dead.has(i) ? 0 : sensor.darkCurrentDnPerS[i] * exposureS;
      // Light that is already a noisy realisation (a synthetic light frame) gets no second photon noise.
      const mean = lightIsSampled ? darkSignal : light + darkSignal;
      const v = sensor.biasDn[i] + (lightIsSampled ? light : 0) + (mean > 0 ? samplePoisson(rng, mean * g) / g : 0) + sensor.readNoiseDn * sampleGaussian(rng);
      const r = Math.round(v);
      out[i] = r < 0 ? 0 : r > sensor.whiteLevel ? sensor.whiteLevel : r;
    }
    for (const s of sensor.stuckPixels) out[s.index] = s.valueDn;
    planes.push(out);
  }
  return planes;
}

function toFrame(sensor: SensorModel, name: string, exposureS: number, planes: Float32Array[]): LinearFrame {
  return { name, image: { width: sensor.width, height: sensor.height, planes }, exposureS, blackLevel: 0, whiteLevel: sensor.whiteLevel, encoding: "linear", blackLevelSource: "none" };
}

/** Bias frames: the shortest exposure the camera takes (1e-4 s here), no light. */
export function synthesizeBiasFrames(sensor: SensorModel, count: number, seed: number): LinearFrame[] {
  const rng = createRng(seed);
  return Array.from({ length: count }, (_, k) => toFrame(sensor, `bias-${String(k + 1).padStart(2, "0")}.fits`, 1e-4, exposeSensor(sensor, 1e-4, rng, null)));
}

/** Dark frames, one per entry of exposuresS (repeat an exposure to get several). */
export function synthesizeDarkFrames(sensor: SensorModel, exposuresS: number[], seed: number): LinearFrame[] {
  const rng = createRng(seed);
  return exposuresS.map((t, k) => toFrame(sensor, `dark-${String(k + 1).padStart(2, "0")}-${t}s.fits`, t, exposeSensor(sensor, t, rng, null)));
}

/** Flat frames of an even field giving levelDn at the centre of the first plane (before vignetting), at exposureS. */
export function synthesizeFlatFrames(sensor: SensorModel, count: number, options: { levelDn: number; exposureS: number; seed: number }): LinearFrame[] {
  const rng = createRng(options.seed);
  const level = options.levelDn;
  return Array.from({ length: count }, (_, k) =>
    // Each flat a little brighter or fainter than the last, as a twilight sky or a panel drifts.
    toFrame(sensor, `flat-${String(k + 1).padStart(2, "0")}.fits`, options.exposureS, exposeSensor(sensor, options.exposureS, rng, () => level * (1 + 0.04 * (k - (count - 1) / 2)))),
  );
}

/**
 * Records synthesizeBracket's frames through this sensor: the light above the
 * bracket's own black level goes through the response (vignetting, dust), dark
 * current and its shot noise are added on the sensor's bias, stuck and dead pixels
 * take over, and pixels clipped in the bracket stay at the white level. The
 * bracket's photon and read noise stay in its light (scaled by the response) and
 * the sensor adds its read noise once more. Returned frames carry no black
 * level (blackLevel 0, source "none"), like a FITS file without a pedestal card,
 * unless blackLevelInFile puts the pedestal in as the file's own ("file").
 */
export function recordLightFrames(
  sensor: SensorModel,
  bracket: { frames: SynthFrame[]; truth: { blackLevel: number; whiteLevel: number } },
  options: { seed: number; blackLevelInFile?: boolean },
): LinearFrame[] {
  const rng = createRng(options.seed);
  const { blackLevel, whiteLevel } = bracket.truth;
  return bracket.frames.map((f) => {
    if (f.planes.length !== sensor.channels || f.planes[0].length !== sensor.width * sensor.height) {
      throw new ImagingError("size-mismatch", `has ${f.planes.length} plane(s) of ${f.planes[0]?.length} pixels; the sensor has ${sensor.channels} of ${sensor.width} x ${sensor.height}`, f.name);
    }
    const planes = exposeSensor(sensor, f.exposureS, rng, (c, i) => f.planes[c][i] - blackLevel, {
      lightIsSampled: true,
      clipped: (c, i) => f.planes[c][i] >= whiteLevel,
    });
    const frame: LinearFrame = { ...toFrame(sensor, f.name, f.exposureS, planes), captureTimeMs: f.captureTimeMs };
    if (options.blackLevelInFile) {
      frame.blackLevel = sensor.pedestalDn;
      frame.blackLevelSource = "file";
    }
    return frame;
  });
}
