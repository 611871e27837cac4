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
}

export const SYNTH_USAGE =
  "usage: npx tsx scripts/synth.ts --out DIR [--width 1200] [--height 800] [--frames 7] [--seed 1] [--formats tiff,jpeg,fits,dng] [--utc-offset-min 180]";

function readInteger(value: string | undefined, option: string, min: number, max: number): number {
  const number = Number(value);
  if (value === undefined || !Number.isInteger(number) || number < min || number > max) {
    throw new Error(`--${option}: expected an integer from ${min} to ${max}, got ${value === undefined ? "nothing" : `"${value}"`}`);
  }
  return number;
}

export function parseSynthArgs(argv: string[]): SynthArgs {
  const values = new Map<string, string | undefined>();
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (!arg.startsWith("--")) throw new Error(`unexpected argument "${arg}"\n${SYNTH_USAGE}`);
    const [key, inline] = arg.slice(2).split("=", 2);
    values.set(key, inline ?? argv[++i]);
  }
  const known = new Set(["out", "width", "height", "frames", "seed", "formats", "utc-offset-min"]);
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
  };
}
