// A finished reduction's master FITS as a composite's input: its planes, its
// helioprojective WCS (helio-wcs.ts writes it: CRPIX at the Sun's centre, CDELT,
// and PC = [[cos a, -sin a], [-sin a, -cos a]] with a the position angle of solar
// north), its lunar disk (MOONX, MOONY, MOONR) and what the composite's
// provenance repeats (creator, times, observer, history).
import { basename } from "node:path";
import { readFits, type FitsValue } from "@/lib/media";
import type { CompositeInput } from "@/lib/imaging/composite";
import { CompositeInputError } from "./errors";

export interface MasterProvenance {
  file: string;
  creator?: string;
  instrument?: string;
  dateBegMs?: number;
  dateAvgMs?: number;
  dateEndMs?: number;
  dsunObsM?: number;
  /** Observer, ITRS metres (OBSGEO-X/Y/Z), when the master has them. */
  obsGeoM?: { x: number; y: number; z: number };
  frameCount?: number;
  /** The master's own HISTORY: the pipeline that made it and its parameters (frame lines left out). */
  history: string[];
}

export interface ReadMaster {
  input: CompositeInput;
  provenance: MasterProvenance;
}

function numberOf(header: Map<string, FitsValue>, key: string): number | undefined {
  const v = header.get(key);
  return typeof v === "number" && Number.isFinite(v) ? v : undefined;
}

function timeOf(header: Map<string, FitsValue>, key: string): number | undefined {
  const v = header.get(key);
  if (typeof v !== "string") return undefined;
  const ms = Date.parse(/[zZ]|[+-]\d\d:?\d\d$/.test(v) ? v : `${v}Z`);
  return Number.isFinite(ms) ? ms : undefined;
}

/**
 * Reads a master; refuses, naming the file, anything that is not a master with
 * a helioprojective WCS. `name` is how messages and the provenance call it
 * (default the file's name).
 */
export async function readCompositeMaster(path: string, name = basename(path)): Promise<ReadMaster> {
  const fits = await readFits(path, name);
  const { header } = fits;
  const need = (key: string, what: string): number => {
    const v = numberOf(header, key);
    if (v === undefined) throw new CompositeInputError("no-wcs", `${name}: ${key} (${what}) is missing or not a number; a composite takes masters whose reduction had the observer's site and capture times`);
    return v;
  };
  if (header.get("CTYPE1") !== "HPLN-TAN" || header.get("CTYPE2") !== "HPLT-TAN") {
    throw new CompositeInputError("no-wcs", `${name}: has no helioprojective WCS (CTYPE1 HPLN-TAN and CTYPE2 HPLT-TAN); reduce its bracket with the observer's site and capture times (registered on the Sun) to give it one`);
  }
  if (numberOf(header, "CRVAL1") !== 0 || numberOf(header, "CRVAL2") !== 0) {
    throw new CompositeInputError("no-wcs", `${name}: its WCS is not centred on the Sun (CRVAL1 and CRVAL2 must be 0)`);
  }
  const cdelt1 = need("CDELT1", "plate scale"), cdelt2 = need("CDELT2", "plate scale");
  if (!(cdelt1 > 0) || Math.abs(cdelt1 - cdelt2) > 1e-6 * cdelt1) throw new CompositeInputError("no-wcs", `${name}: CDELT1 and CDELT2 must be one positive plate scale, not ${cdelt1} and ${cdelt2}`);
  const pc11 = need("PC1_1", "WCS rotation"), pc12 = need("PC1_2", "WCS rotation"), pc21 = need("PC2_1", "WCS rotation"), pc22 = need("PC2_2", "WCS rotation");
  // Rows run down the picture (helio-wcs.ts): PC is a reflection, [[c, -s], [-s, -c]].
  if (Math.abs(pc11 + pc22) > 1e-6 || Math.abs(pc12 - pc21) > 1e-6 || Math.abs(pc11 * pc11 + pc12 * pc12 - 1) > 1e-6) {
    throw new CompositeInputError("no-wcs", `${name}: its PC matrix is not a rotation with rows stored top first (PC1_1 = -PC2_2, PC1_2 = PC2_1, unit length)`);
  }
  const rsunArcsec = need("RSUN_OBS", "apparent solar radius");
  const moonX = need("MOONX", "Moon centre"), moonY = need("MOONY", "Moon centre"), moonR = need("MOONR", "Moon radius");
  if (fits.planes.length !== 1 && fits.planes.length !== 3) throw new CompositeInputError("not-a-master", `${name}: a master has 1 or 3 planes, this file has ${fits.planes.length}`);
  const obs = [numberOf(header, "OBSGEO-X"), numberOf(header, "OBSGEO-Y"), numberOf(header, "OBSGEO-Z")];
  const history = fits.history.filter((line) => !/^Frame \d+:/.test(line));
  return {
    input: {
      name,
      planes: fits.planes,
      grid: {
        width: fits.width, height: fits.height, sunX: need("CRPIX1", "Sun centre") - 1, sunY: need("CRPIX2", "Sun centre") - 1,
        scaleArcsecPerPx: cdelt1, solarNorthDeg: (((Math.atan2(-pc12, pc11) * 180) / Math.PI) % 360 + 360) % 360,
      },
      moon: { x: moonX - 1, y: moonY - 1, radiusPx: moonR },
      rsunArcsec,
    },
    provenance: {
      file: name,
      creator: typeof header.get("CREATOR") === "string" ? String(header.get("CREATOR")) : undefined,
      instrument: typeof header.get("INSTRUME") === "string" ? String(header.get("INSTRUME")) : undefined,
      dateBegMs: timeOf(header, "DATE-BEG"), dateAvgMs: timeOf(header, "DATE-AVG"), dateEndMs: timeOf(header, "DATE-END"),
      dsunObsM: numberOf(header, "DSUN_OBS"),
      obsGeoM: obs.every((v) => v !== undefined) ? { x: obs[0]!, y: obs[1]!, z: obs[2]! } : undefined,
      frameCount: numberOf(header, "NCOMBINE"),
      history,
    },
  };
}

/** Masters of one eclipse: their mean times within a day of each other (a total eclipse's path crosses the Earth in hours). */
export function requireOneEclipse(masters: ReadMaster[]): void {
  const dated = masters.filter((m) => m.provenance.dateAvgMs !== undefined);
  if (dated.length < masters.length) {
    const missing = masters.find((m) => m.provenance.dateAvgMs === undefined)!;
    throw new CompositeInputError("no-wcs", `${missing.provenance.file}: has no DATE-AVG; a composite needs each master's time to check they show one eclipse`);
  }
  const times = dated.map((m) => m.provenance.dateAvgMs!);
  const first = Math.min(...times), last = Math.max(...times);
  if (last - first > 24 * 3600 * 1000) {
    const early = dated[times.indexOf(first)].provenance.file, late = dated[times.indexOf(last)].provenance.file;
    throw new CompositeInputError("other-eclipse", `${early} and ${late} were taken ${((last - first) / 86_400_000).toFixed(1)} days apart: a composite is made of one eclipse`);
  }
}
