// Command-line options of scripts/reduce.ts, checked with messages that name the option.
import type { StructureFilter } from "@/lib/imaging/types";
import { ReductionInputError } from "./errors";
import type { RunnerRegistrationMode } from "./sky-run";
import type { CameraOrientation, MountKind } from "@/lib/astro/mount-rotation";
import { parseStrictNumber } from "@/lib/strict-number";

export const REDUCE_USAGE =
  "usage: npm run reduce -- --out DIR [--register sun|moon|corona] [--site LAT,LON,ELEV | --site-file TRACK.gpx|csv] [--clock-offset SECONDS] " +
  "[--north-angle DEG | --mount equatorial|alt-az|fixed-tripod|hand-held|stabilised [--camera-roll DEG] [--flip-h] [--flip-v]] " +
  "[--filter mgn|nrgf] [--exposures FILE.csv] [--recover-response] [--scratch DIR] [--bias FILE]... [--dark FILE]... [--flat FILE]... FILE...";

export interface ReduceArgs {
  outDir: string;
  files: string[];
  registration?: RunnerRegistrationMode;
  filter?: StructureFilter;
  exposuresCsv?: string;
  recoverResponse: boolean;
  /** "LAT,LON,ELEV" as typed; parsed by sky-site.ts parseSiteText. */
  siteText?: string;
  siteFile?: string;
  /** True time = camera time - offset. */
  clockOffsetS?: number;
  /** Position angle of celestial north in the image, counter-clockwise from image up, after flips. */
  northAngleDeg?: number;
  /** The kit's mount and flips, from which the north angle follows when it is not given. */
  camera?: CameraOrientation;
  /** Folder for the frames kept on local disk between stages (default the system's temporary folder). */
  scratchDir?: string;
  /** Calibration frames (each option repeatable), present when any was given. */
  calibrationFiles?: { bias: string[]; dark: string[]; flat: string[] };
}

const MOUNT_KINDS: readonly MountKind[] = ["equatorial", "alt-az", "fixed-tripod", "hand-held", "stabilised"];
const VALUE_OPTIONS = new Set(["out", "register", "filter", "exposures", "site", "site-file", "clock-offset", "north-angle", "mount", "camera-roll", "scratch"]);

/** A decimal number option ("-12.5", "3e1"); the message names the option and the unit. */
function parseNumberOption(values: Map<string, string>, key: string, unit: string): number | undefined {
  const text = values.get(key);
  if (text === undefined) return undefined;
  const n = parseStrictNumber(text);
  if (Number.isNaN(n)) throw badOption(`--${key}: expected a number of ${unit}, got "${text}"`);
  return n;
}
const FLAG_OPTIONS = new Set(["recover-response", "flip-h", "flip-v"]);
/** Options that may be given several times, one file each. */
const LIST_OPTIONS = ["bias", "dark", "flat"] as const;
type ListOption = (typeof LIST_OPTIONS)[number];

function badOption(message: string): ReductionInputError {
  return new ReductionInputError("bad-option", `${message}\n${REDUCE_USAGE}`);
}

export function parseReduceArgs(argv: string[]): ReduceArgs {
  const values = new Map<string, string>();
  const flags = new Set<string>();
  const files: string[] = [];
  const lists: Record<ListOption, string[]> = { bias: [], dark: [], flat: [] };
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === "--") { files.push(...argv.slice(i + 1)); break; }
    if (!arg.startsWith("--")) { files.push(arg); continue; }
    const [key, inline] = arg.slice(2).split(/=(.*)/s, 2);
    if (FLAG_OPTIONS.has(key)) { flags.add(key); continue; }
    const isList = (LIST_OPTIONS as readonly string[]).includes(key);
    if (!VALUE_OPTIONS.has(key) && !isList) throw badOption(`unknown option --${key}`);
    const value = inline ?? argv[++i];
    if (value === undefined || value.startsWith("--")) throw badOption(`--${key}: a value is required`);
    if (isList) {
      if (value.trim() === "") throw badOption(`--${key}: a file is required`);
      lists[key as ListOption].push(value);
      continue;
    }
    if (values.has(key)) throw badOption(`--${key} is given twice`);
    values.set(key, value);
  }
  const outDir = values.get("out");
  if (!outDir) throw badOption("--out: a folder to write the reduction into is required");
  const registration = values.get("register");
  if (registration !== undefined && registration !== "sun" && registration !== "moon" && registration !== "corona") {
    throw badOption(`--register: expected sun, moon or corona, got "${registration}"`);
  }
  if (values.has("site") && values.has("site-file")) throw badOption("--site and --site-file: give one of them (a fixed site or a track)");
  const filter = values.get("filter");
  if (filter !== undefined && filter !== "mgn" && filter !== "nrgf") throw badOption(`--filter: expected mgn or nrgf, got "${filter}"`);
  if (files.length === 0) throw badOption("no frames given: list the bracket's files after the options");
  const calibrationPaths = [...lists.bias, ...lists.dark, ...lists.flat];
  const twice = calibrationPaths.find((path, k) => calibrationPaths.indexOf(path) !== k);
  if (twice !== undefined) throw badOption(`${twice}: given twice among --bias, --dark and --flat (each file is one kind of calibration frame)`);
  const asLight = calibrationPaths.find((path) => files.includes(path));
  if (asLight !== undefined) throw badOption(`${asLight}: given both as a calibration frame and as a frame of the bracket`);
  const mount = values.get("mount");
  if (mount !== undefined && !(MOUNT_KINDS as readonly string[]).includes(mount)) throw badOption(`--mount: expected one of ${MOUNT_KINDS.join(", ")}, got "${mount}"`);
  if (mount !== undefined && values.has("north-angle")) throw badOption("--north-angle and --mount: give one of them (the angle, or the mount it follows from)");
  const cameraRollDeg = parseNumberOption(values, "camera-roll", "degrees");
  if (mount === undefined && (cameraRollDeg !== undefined || flags.has("flip-h") || flags.has("flip-v"))) {
    throw badOption("--camera-roll, --flip-h and --flip-v describe the camera on its mount: give --mount too");
  }
  const camera: CameraOrientation | undefined =
    mount === undefined ? undefined : { mount: mount as MountKind, cameraRollDeg, flipHorizontal: flags.has("flip-h"), flipVertical: flags.has("flip-v") };
  return {
    outDir, files, registration, filter, exposuresCsv: values.get("exposures"), scratchDir: values.get("scratch"), recoverResponse: flags.has("recover-response"),
    siteText: values.get("site"), siteFile: values.get("site-file"),
    clockOffsetS: parseNumberOption(values, "clock-offset", "seconds"), northAngleDeg: parseNumberOption(values, "north-angle", "degrees"),
    camera,
    ...(calibrationPaths.length > 0 ? { calibrationFiles: { bias: lists.bias, dark: lists.dark, flat: lists.flat } } : {}),
  };
}
