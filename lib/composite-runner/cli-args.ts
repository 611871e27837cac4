// Command-line options of scripts/compose.ts, checked with messages that name the option.
import type { StructureFilter } from "@/lib/imaging/types";
import { parseStrictNumber } from "@/lib/strict-number";
import { CompositeInputError } from "./errors";

export const COMPOSE_USAGE = "usage: npm run compose -- --out DIR [--scale ARCSEC_PER_PX] [--no-refine] [--filter mgn|nrgf] MASTER.fits MASTER.fits...";

export interface ComposeArgs {
  outDir: string;
  files: string[];
  scaleArcsecPerPx?: number;
  refine: boolean;
  filter?: StructureFilter;
}

function badOption(message: string): CompositeInputError {
  return new CompositeInputError("bad-option", `${message}\n${COMPOSE_USAGE}`);
}

export function parseComposeArgs(argv: string[]): ComposeArgs {
  const files: string[] = [];
  let outDir: string | undefined, scale: number | undefined, filter: StructureFilter | undefined;
  let refine = true;
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    const value = () => {
      const v = argv[++i];
      if (v === undefined || v.startsWith("--")) throw badOption(`${arg}: expected a value after it`);
      return v;
    };
    if (arg === "--out") outDir = value();
    else if (arg === "--scale") {
      const text = value();
      scale = parseStrictNumber(text);
      if (!(scale > 0) || !Number.isFinite(scale)) throw badOption(`--scale: expected a positive number of arcsec per pixel, got "${text}"`);
    } else if (arg === "--no-refine") refine = false;
    else if (arg === "--filter") {
      const text = value();
      if (text !== "mgn" && text !== "nrgf") throw badOption(`--filter: expected mgn or nrgf, got "${text}"`);
      filter = text;
    } else if (arg.startsWith("--")) throw badOption(`${arg}: no such option`);
    else files.push(arg);
  }
  if (!outDir) throw badOption("--out DIR is required: the folder the composite is written to");
  if (files.length < 2) throw badOption(`give at least two master FITS files, got ${files.length}`);
  return { outDir, files, scaleArcsecPerPx: scale, refine, filter };
}
