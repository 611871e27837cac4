// One strict reader of numbers typed or read from files: plain decimal notation
// only ("-6.29", "1e-3", ".5"). JavaScript's Number() also reads "0x20" as 32,
// "0b11" as 3, "Infinity", and "" or "  " as 0; a latitude written "0x20" must be
// refused, not read as 32 degrees.
import { z } from "zod";

const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** The number a text holds in plain decimal notation; NaN for anything else (hex, binary, blank, Infinity). */
export function parseStrictNumber(text: string): number {
  const t = text.trim();
  if (!DECIMAL.test(t)) return NaN;
  const n = Number(t);
  return Number.isFinite(n) ? n : NaN;
}

/**
 * A zod number schema that also takes form text, strictly: "" and blanks count
 * as absent (so an inner `.default()` or `.optional()` applies), a plain decimal
 * becomes its number, and anything else ("0x20", "12abc", "Infinity") fails
 * with the inner schema's message. Give the whole inner schema (ranges,
 * defaults): a preprocessed schema takes no more refinements.
 */
export function strictNumber<T extends z.ZodType>(inner: T) {
  return z.preprocess((v) => {
    if (typeof v !== "string") return v;
    if (v.trim() === "") return undefined;
    const n = parseStrictNumber(v);
    return Number.isNaN(n) ? v : n;
  }, inner);
}
