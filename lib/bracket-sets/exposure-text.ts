// Exposure times as photographers write them (1/250, 0.004, 2 s) and as we show
// them: at the precision they have, as a fraction only where the value is one.
// Client-safe: the frame table and the CSV import use the same rules.
import { parseStrictNumber } from "@/lib/strict-number";

/** Significant digits kept when an exposure is shown as a decimal. */
const SHOWN_DIGITS = 6;
/** 1/t within this relative distance of a whole number counts as that fraction (floating-point slack only). */
const FRACTION_SLACK = 1e-9;

/** The whole denominator n when s is 1/n (n >= 2), else null. */
function wholeDenominator(s: number): number | null {
  const n = 1 / s;
  const r = Math.round(n);
  return r >= 2 && Math.abs(n - r) <= FRACTION_SLACK * n ? r : null;
}

/**
 * Seconds as a photographer reads them: "1/250 s" when the value is exactly a
 * unit fraction, otherwise the decimal at its own precision ("0.2817 s", "2.5 s").
 */
export function formatExposure(s: number | null): string {
  if (s === null) return "—";
  return `${formatExposureValue(s)} s`;
}

/** The value alone, as it goes back into an input box: "1/250", "0.2817", "2". */
export function formatExposureValue(s: number): string {
  const n = s < 1 ? wholeDenominator(s) : null;
  return n !== null ? `1/${n}` : String(Number(s.toPrecision(SHOWN_DIGITS)));
}

/** "1/250", "1/250 s", "0.004", "4e-3" or "2" to seconds; null when it is not a positive time. */
export function parseExposure(text: string): number | null {
  const t = text.trim().replace(/\s*s$/i, "");
  const frac = /^(\d+(?:\.\d+)?)\s*\/\s*(\d+(?:\.\d+)?)$/.exec(t);
  if (!frac && !/^[+]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(t)) return null;
  // Plain decimals only (lib/strict-number.ts): "0x10" is not 16 s.
  const value = frac ? Number(frac[1]) / Number(frac[2]) : parseStrictNumber(t);
  return Number.isFinite(value) && value > 0 ? value : null;
}
