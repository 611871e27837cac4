// Exposure times as photographers write them: 1/250, 0.004, 2 s.
import { parseStrictNumber } from "@/lib/strict-number";

/** Seconds as a photographer reads them: "1/250 s" below a second, "2.5 s" above. */
export function formatExposure(s: number | null): string {
  if (s === null) return "—";
  if (s >= 1) return `${Number(s.toPrecision(3))} s`;
  return `1/${Math.round(1 / s)} s`;
}

/** "1/250", "1/250 s", "0.004" or "2" to seconds; null when it is not a positive time. */
export function parseExposure(text: string): number | null {
  const t = text.trim().replace(/\s*s$/i, "");
  const frac = /^(\d+(?:\.\d+)?)\s*\/\s*(\d+(?:\.\d+)?)$/.exec(t);
  // Plain decimals only (lib/strict-number.ts): "0x10" is not 16 s.
  const value = frac ? Number(frac[1]) / Number(frac[2]) : parseStrictNumber(t);
  return t !== "" && Number.isFinite(value) && value > 0 ? value : null;
}
