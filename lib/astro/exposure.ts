// Exposure planning from brightness exponents, NASA Reference Publication 1369
// (eclipse bulletin for 1997 March 9), Table 16 "Solar Eclipse Exposure Guide":
//   t = f^2 / (ISO x 2^Q)
// with Q an exponent per phenomenon. The table prints t rounded to the nearest
// power of two and labelled with the nominal shutter speed (2^-12 = 1/4000 ...
// 2^7 = 120). Exposure value: EV = log2(N^2 / t) (ISO 100 convention).
import { AstroError, requireFinite, requirePositive } from "./errors";

export type Phenomenon =
  | "partial-nd4"
  | "partial-nd5"
  | "bailys-beads"
  | "chromosphere"
  | "prominences"
  | "corona-0.1"
  | "corona-0.2"
  | "corona-0.5"
  | "corona-1"
  | "corona-2"
  | "corona-4"
  | "corona-8";

export interface PhenomenonExponent {
  phenomenon: Phenomenon;
  /** Brightness exponent Q of RP 1369 Table 16. */
  q: number;
  /** For the corona: the distance from the limb, in solar radii, that the exposure shows; else null. */
  reachRsun: number | null;
  /** Partial phases are photographed only through a full-aperture solar filter of this optical density. */
  filterDensity: number | null;
}

/** RP 1369 Table 16 exponents, brightest subject first. */
export const PHENOMENON_EXPONENTS: readonly PhenomenonExponent[] = [
  { phenomenon: "partial-nd4", q: 11, reachRsun: null, filterDensity: 4 },
  { phenomenon: "partial-nd5", q: 8, reachRsun: null, filterDensity: 5 },
  { phenomenon: "bailys-beads", q: 12, reachRsun: null, filterDensity: null },
  { phenomenon: "chromosphere", q: 11, reachRsun: null, filterDensity: null },
  { phenomenon: "prominences", q: 9, reachRsun: null, filterDensity: null },
  { phenomenon: "corona-0.1", q: 7, reachRsun: 0.1, filterDensity: null },
  { phenomenon: "corona-0.2", q: 5, reachRsun: 0.2, filterDensity: null },
  { phenomenon: "corona-0.5", q: 3, reachRsun: 0.5, filterDensity: null },
  { phenomenon: "corona-1", q: 1, reachRsun: 1, filterDensity: null },
  { phenomenon: "corona-2", q: 0, reachRsun: 2, filterDensity: null },
  { phenomenon: "corona-4", q: -1, reachRsun: 4, filterDensity: null },
  { phenomenon: "corona-8", q: -3, reachRsun: 8, filterDensity: null },
];

/** Nominal marked shutter speeds by power of two (the series RP 1369 prints, 1/8000 added below it). */
const NOMINAL_SHUTTER_LABELS: ReadonlyMap<number, string> = new Map([
  [-13, "1/8000"], [-12, "1/4000"], [-11, "1/2000"], [-10, "1/1000"], [-9, "1/500"], [-8, "1/250"],
  [-7, "1/125"], [-6, "1/60"], [-5, "1/30"], [-4, "1/15"], [-3, "1/8"], [-2, "1/4"], [-1, "1/2"],
  [0, "1"], [1, "2"], [2, "4"], [3, "8"], [4, "15"], [5, "30"], [6, "60"], [7, "120"],
]);

export function findPhenomenonExponent(phenomenon: Phenomenon): PhenomenonExponent {
  const found = PHENOMENON_EXPONENTS.find((p) => p.phenomenon === phenomenon);
  if (!found) {
    const known = PHENOMENON_EXPONENTS.map((p) => p.phenomenon).join(", ");
    throw new AstroError("bad-parameter", `phenomenon must be one of ${known}; got ${String(phenomenon)}`, "phenomenon");
  }
  return found;
}

/** Exposure time t = f^2 / (ISO x 2^Q), seconds (RP 1369 Table 16). */
export function computeExposureS(fNumber: number, iso: number, q: number): number {
  requirePositive("fNumber", fNumber);
  requirePositive("iso", iso);
  requireFinite("q", q, -20, 30);
  return (fNumber * fNumber) / (iso * 2 ** q);
}

export interface NominalShutter {
  /** Power of two nearest to the exposure (rounded in log2, as the table does). */
  powerOfTwo: number;
  /** The marked speed, e.g. "1/250" or "15"; null outside the marked series 1/8000 to 120 s. */
  label: string | null;
  /** The exact exposure behind the marking, 2^powerOfTwo seconds. */
  exposureS: number;
}

export function findNominalShutter(exposureS: number): NominalShutter {
  requirePositive("exposureS", exposureS);
  const powerOfTwo = Math.round(Math.log2(exposureS));
  return { powerOfTwo, label: NOMINAL_SHUTTER_LABELS.get(powerOfTwo) ?? null, exposureS: 2 ** powerOfTwo };
}

/** Exposure value EV = log2(N^2 / t) for f-number N and exposure t in seconds. */
export function computeExposureValue(fNumber: number, exposureS: number): number {
  requirePositive("fNumber", fNumber);
  requirePositive("exposureS", exposureS);
  return Math.log2((fNumber * fNumber) / exposureS);
}

/** The exact f-number behind a marked one (the marked series rounds powers of sqrt 2: 5.6 is 2^2.5 = 5.657). */
export function resolveMarkedFNumber(markedFNumber: number): number {
  requirePositive("fNumber", markedFNumber);
  return Math.SQRT2 ** Math.round(2 * Math.log2(markedFNumber));
}

/** The exact exposure behind a marked shutter speed such as "1/60" (2^-6 s) or "15" (2^4 s). */
export function resolveMarkedShutterS(label: string): number {
  for (const [power, marked] of NOMINAL_SHUTTER_LABELS) {
    if (marked === label.trim()) return 2 ** power;
  }
  throw new AstroError("bad-parameter", `shutter speed "${label}" is not a marked speed between 1/8000 and 120`, "shutter");
}

export interface LadderStep {
  phenomenon: Phenomenon;
  q: number;
  iso: number;
  fNumber: number;
  exposureS: number;
  nominal: NominalShutter;
  reachRsun: number | null;
  filterDensity: number | null;
}

export interface LadderOptions {
  fNumber: number;
  isos: readonly number[];
  /** Which phenomena to include; all of Table 16 by default. */
  phenomena?: readonly Phenomenon[];
}

/**
 * A bracket ladder for a kit: per phenomenon and ISO, the exposure time, its marked speed and
 * how far into the corona it reaches. Ordered as the phenomena are given (brightest first by
 * default), then by ISO as given.
 */
export function buildExposureLadder(options: LadderOptions): LadderStep[] {
  requirePositive("fNumber", options.fNumber);
  if (!Array.isArray(options.isos) || options.isos.length === 0) {
    throw new AstroError("bad-parameter", "isos must list at least one ISO speed", "isos");
  }
  options.isos.forEach((iso, i) => requireFinite(`isos[${i}]`, iso, 1, 10_000_000));
  const chosen = (options.phenomena ?? PHENOMENON_EXPONENTS.map((p) => p.phenomenon)).map(findPhenomenonExponent);
  const steps: LadderStep[] = [];
  for (const p of chosen) {
    for (const iso of options.isos) {
      const exposureS = computeExposureS(options.fNumber, iso, p.q);
      steps.push({
        phenomenon: p.phenomenon,
        q: p.q,
        iso,
        fNumber: options.fNumber,
        exposureS,
        nominal: findNominalShutter(exposureS),
        reachRsun: p.reachRsun,
        filterDensity: p.filterDensity,
      });
    }
  }
  return steps;
}
