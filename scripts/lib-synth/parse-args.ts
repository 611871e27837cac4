// Command-line options of scripts/synth.ts, checked with messages that name the option.
import { SYNTH_FORMATS, type SynthFormat } from "./types";

export interface SynthArgs {
  outDir: string;
  width: number;
  height: number;
  frames: number;
  seed: number;
  formats: SynthFormat[];
  /** Time zone of the EXIF clock, minutes east of UTC (Luxor in summer: +180). */
  utcOffsetMin: number;
  /** A camera as real ones are: see RealCameraOptions in from-model.ts. */
  camera: "clean" | "real";
  /** Longest exposure of the ladder, s (default 1). */
  longestS: number;
  /** Each exposure taken this many times. */
  repeat: number;
}

export const SYNTH_USAGE =
  "usage: npx tsx scripts/synth.ts --out DIR [--width 1200] [--height 800] [--frames 7] [--seed 1] [--formats tiff,jpeg,fits,dng] [--utc-offset-min 180]\n" +
  "  [--camera clean|real] (real: an offset left unlabelled in FITS and TIFF, hot pixels, a trail, a passing cloud, no capture times) [--longest SECONDS] [--repeat N]";

function readInteger(value: string | undefined, option: string, min: number, max: number): number {
  const number = Number(value);
  if (value === undefined || !Number.isInteger(number) || number < min || number > max) {
    throw new Error(`--${option}: expected an integer from ${min} to ${max}, got ${value === undefined ? "nothing" : `"${value}"`}`);
  }
  return number;
}

function readCamera(value: string | undefined): "clean" | "real" {
  if (value === undefined || value === "clean" || value === "real") return value ?? "clean";
  throw new Error(`--camera: expected clean or real, got "${value}"\n${SYNTH_USAGE}`);
}

function readSeconds(value: string | undefined): number {
  const n = Number(value);
  if (!(value !== undefined && /^\d+(\.\d+)?$/.test(value) && n >= 0.01 && n <= 30)) throw new Error(`--longest: expected seconds from 0.01 to 30, got "${value}"`);
  return n;
}

export function parseSynthArgs(argv: string[]): SynthArgs {
  const values = new Map<string, string | undefined>();
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (!arg.startsWith("--")) throw new Error(`unexpected argument "${arg}"\n${SYNTH_USAGE}`);
    const [key, inline] = arg.slice(2).split("=", 2);
    values.set(key, inline ?? argv[++i]);
  }
  const known = new Set(["out", "width", "height", "frames", "seed", "formats", "utc-offset-min", "camera", "longest", "repeat"]);
  for (const key of values.keys()) if (!known.has(key)) throw new Error(`unknown option --${key}\n${SYNTH_USAGE}`);
  const outDir = values.get("out");
  if (!outDir) throw new Error(`--out: a folder to write into is required\n${SYNTH_USAGE}`);
  const formats = (values.get("formats") ?? SYNTH_FORMATS.join(",")).split(",").map((f) => f.trim().toLowerCase());
  for (const format of formats) {
    if (!SYNTH_FORMATS.includes(format as SynthFormat)) throw new Error(`--formats: "${format}" is not one of ${SYNTH_FORMATS.join(", ")}`);
  }
  return {
    outDir,
    width: values.has("width") ? readInteger(values.get("width"), "width", 16, 8192) : 1200,
    height: values.has("height") ? readInteger(values.get("height"), "height", 16, 8192) : 800,
    frames: values.has("frames") ? readInteger(values.get("frames"), "frames", 1, 40) : 7,
    seed: values.has("seed") ? readInteger(values.get("seed"), "seed", 0, 2 ** 32 - 1) : 1,
    formats: [...new Set(formats)] as SynthFormat[],
    utcOffsetMin: values.has("utc-offset-min") ? readInteger(values.get("utc-offset-min"), "utc-offset-min", -720, 840) : 180,
    camera: readCamera(values.get("camera")),
    longestS: values.has("longest") ? readSeconds(values.get("longest")) : 1,
    repeat: values.has("repeat") ? readInteger(values.get("repeat"), "repeat", 1, 5) : 1,
  };
}
