// Command-line options of scripts/reduce.ts, checked with messages that name the option.
import type { RegistrationMode, StructureFilter } from "@/lib/imaging/types";
import { ReductionInputError } from "./errors";

export const REDUCE_USAGE =
  "usage: npm run reduce -- --out DIR [--register moon|corona] [--filter mgn|nrgf] [--exposures FILE.csv] [--recover-response] FILE...";

export interface ReduceArgs {
  outDir: string;
  files: string[];
  registration?: RegistrationMode;
  filter?: StructureFilter;
  exposuresCsv?: string;
  recoverResponse: boolean;
}

const VALUE_OPTIONS = new Set(["out", "register", "filter", "exposures"]);
const FLAG_OPTIONS = new Set(["recover-response"]);

function badOption(message: string): ReductionInputError {
  return new ReductionInputError("bad-option", `${message}\n${REDUCE_USAGE}`);
}

export function parseReduceArgs(argv: string[]): ReduceArgs {
  const values = new Map<string, string>();
  const flags = new Set<string>();
  const files: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === "--") { files.push(...argv.slice(i + 1)); break; }
    if (!arg.startsWith("--")) { files.push(arg); continue; }
    const [key, inline] = arg.slice(2).split(/=(.*)/s, 2);
    if (FLAG_OPTIONS.has(key)) { flags.add(key); continue; }
    if (!VALUE_OPTIONS.has(key)) throw badOption(`unknown option --${key}`);
    const value = inline ?? argv[++i];
    if (value === undefined || value.startsWith("--")) throw badOption(`--${key}: a value is required`);
    if (values.has(key)) throw badOption(`--${key} is given twice`);
    values.set(key, value);
  }
  const outDir = values.get("out");
  if (!outDir) throw badOption("--out: a folder to write the reduction into is required");
  const registration = values.get("register");
  if (registration !== undefined && registration !== "moon" && registration !== "corona") {
    throw badOption(`--register: expected moon or corona, got "${registration}"`);
  }
  const filter = values.get("filter");
  if (filter !== undefined && filter !== "mgn" && filter !== "nrgf") throw badOption(`--filter: expected mgn or nrgf, got "${filter}"`);
  if (files.length === 0) throw badOption("no frames given: list the bracket's files after the options");
  return { outDir, files, registration, filter, exposuresCsv: values.get("exposures"), recoverResponse: flags.has("recover-response") };
}
