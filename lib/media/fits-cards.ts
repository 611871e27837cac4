// Header cards of FITS Standard 4.0 (IAU FITS Working Group, 2018), section 4:
// 80-character ASCII cards, keyword in columns 1-8, "= " in 9-10, fixed-format
// values right-justified to column 30 (strings quoted from column 11), blocks of
// 36 cards (2880 bytes) padded with spaces.
import { MediaError } from "./errors";

export type FitsValue = string | number | boolean;

export interface FitsCard {
  /** Up to 8 characters of A-Z, 0-9, "-" and "_"; "HISTORY" and "COMMENT" take text in `comment`. */
  key: string;
  value?: FitsValue;
  comment?: string;
  /** Write an integral number as a real ("2.0"), for keywords the standard defines as real. */
  real?: boolean;
}

export const FITS_BLOCK_BYTES = 2880;
export const FITS_CARD_CHARS = 80;
export const FITS_CARDS_PER_BLOCK = FITS_BLOCK_BYTES / FITS_CARD_CHARS;

const KEY_PATTERN = /^[A-Z0-9_-]{1,8}$/;
const PRINTABLE = /^[\x20-\x7e]*$/;
const COMMENTARY_TEXT_CHARS = 72;

function formatNumber(value: number, real: boolean, key: string, where: string): string {
  if (!Number.isFinite(value)) {
    throw new MediaError("bad-argument", where, `FITS card ${key}: ${value} is not a finite number (FITS 4.0 section 4.2.4)`);
  }
  if (Number.isInteger(value) && !real && Math.abs(value) < 1e15) return String(value);
  // Shortest text that reads back to the same double; FITS wants an upper-case exponent.
  let text = String(value).toUpperCase();
  if (!/[.E]/.test(text)) text += ".0";
  return text;
}

function formatValue(card: FitsCard, where: string): string {
  const { value, key } = card;
  if (typeof value === "boolean") return (value ? "T" : "F").padStart(20);
  if (typeof value === "number") return formatNumber(value, card.real === true, key, where).padStart(20);
  const text = String(value);
  if (!PRINTABLE.test(text)) throw new MediaError("bad-argument", where, `FITS card ${key}: the text holds characters outside printable ASCII`);
  // Section 4.2.1.1: a quote inside the string is written twice; the closing quote is at column 20 or later.
  const quoted = `'${text.replace(/'/g, "''").padEnd(8)}'`;
  if (quoted.length > 70) throw new MediaError("bad-argument", where, `FITS card ${key}: the text is longer than 68 characters`);
  return quoted;
}

/** One card of exactly 80 characters; a comment that does not fit is cut. */
export function formatFitsCard(card: FitsCard, where = "FITS header"): string[] {
  const key = card.key.toUpperCase();
  if (!KEY_PATTERN.test(key)) throw new MediaError("bad-argument", where, `FITS keyword "${card.key}" is not 1-8 characters of A-Z, 0-9, "-", "_"`);
  const comment = card.comment ?? "";
  if (!PRINTABLE.test(comment)) throw new MediaError("bad-argument", where, `FITS card ${key}: the comment holds characters outside printable ASCII`);
  if (key === "HISTORY" || key === "COMMENT" || card.value === undefined) {
    // Commentary cards (section 4.4.2.4): text in columns 9-80, split over as many cards as it needs.
    const lines: string[] = [];
    for (let at = 0; at === 0 || at < comment.length; at += COMMENTARY_TEXT_CHARS) {
      lines.push((key.padEnd(8) + comment.slice(at, at + COMMENTARY_TEXT_CHARS)).padEnd(FITS_CARD_CHARS));
    }
    return lines;
  }
  let text = `${key.padEnd(8)}= ${formatValue({ ...card, key }, where)}`;
  if (comment) text += ` / ${comment}`;
  return [text.slice(0, FITS_CARD_CHARS).padEnd(FITS_CARD_CHARS)];
}

/** The header unit: cards, END, padded with spaces to whole blocks. */
export function encodeFitsHeader(cards: FitsCard[], where = "FITS header"): Uint8Array {
  const lines = cards.flatMap((card) => formatFitsCard(card, where));
  lines.push("END".padEnd(FITS_CARD_CHARS));
  const blocks = Math.ceil(lines.length / FITS_CARDS_PER_BLOCK);
  const out = new Uint8Array(blocks * FITS_BLOCK_BYTES).fill(0x20);
  const text = lines.join("");
  for (let i = 0; i < text.length; i++) out[i] = text.charCodeAt(i);
  return out;
}

/** Number of 80-character cards a list of cards takes (commentary cards may split). */
export function countFitsCardLines(cards: FitsCard[]): number {
  return cards.reduce((sum, card) => sum + formatFitsCard(card).length, 0);
}

export function padToFitsBlock(byteLength: number): number {
  return Math.ceil(byteLength / FITS_BLOCK_BYTES) * FITS_BLOCK_BYTES;
}
