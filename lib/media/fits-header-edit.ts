// Editing the primary header of a FITS file without touching its data: the
// header is 80-character ASCII cards in 2880-byte blocks ending with the END
// card (FITS 4.0 sections 3.3.1 and 4.1), so cards can be removed, changed or
// added and the header padded again to whole blocks; the data unit that follows
// is passed on byte for byte.
import { FITS_BLOCK_BYTES, FITS_CARD_CHARS, formatFitsCard, type FitsCard } from "./fits-cards";

/** The keyword of an 80-character card (columns 1-8), without trailing spaces. */
export function cardKey(card: string): string {
  return card.slice(0, 8).trimEnd();
}

/** The numeric value of a "KEY     = value / comment" card, or undefined when it holds none. */
export function cardNumber(card: string): number | undefined {
  if (card.slice(8, 10) !== "= ") return undefined;
  const text = card.slice(10).split("/")[0].trim().replace(/D/i, "E");
  if (!/^[+-]?(?:\d+\.?\d*|\.\d+)(?:E[+-]?\d+)?$/i.test(text)) return undefined;
  return Number(text);
}

/**
 * The number of bytes of the header (whole blocks, END included) at the start
 * of `bytes`, or null when END has not come yet.
 */
export function findFitsHeaderLength(bytes: Uint8Array): number | null {
  for (let at = 0; at + FITS_CARD_CHARS <= bytes.length; at += FITS_CARD_CHARS) {
    // "END" then spaces to column 80.
    if (bytes[at] === 0x45 && bytes[at + 1] === 0x4e && bytes[at + 2] === 0x44) {
      let isEnd = true;
      for (let i = 3; i < FITS_CARD_CHARS; i++) if (bytes[at + i] !== 0x20) isEnd = false;
      if (isEnd) return Math.ceil((at + FITS_CARD_CHARS) / FITS_BLOCK_BYTES) * FITS_BLOCK_BYTES;
    }
  }
  return null;
}

/** The cards before END, each 80 characters. */
export function splitFitsHeader(header: Uint8Array): string[] {
  const cards: string[] = [];
  for (let at = 0; at + FITS_CARD_CHARS <= header.length; at += FITS_CARD_CHARS) {
    const card = String.fromCharCode(...header.subarray(at, at + FITS_CARD_CHARS));
    if (cardKey(card) === "END" && card.slice(3).trim() === "") break;
    cards.push(card);
  }
  return cards;
}

/** Cards (80 characters each, END excluded) back to a header of whole blocks. */
export function joinFitsHeader(cards: string[]): Uint8Array {
  const lines = [...cards, "END".padEnd(FITS_CARD_CHARS)];
  const out = new Uint8Array(Math.ceil(lines.length / (FITS_BLOCK_BYTES / FITS_CARD_CHARS)) * FITS_BLOCK_BYTES).fill(0x20);
  const text = lines.join("");
  for (let i = 0; i < text.length; i++) out[i] = text.charCodeAt(i) & 0x7f;
  return out;
}

/** Formatted cards (a commentary card may take several lines). */
export function formatCards(cards: FitsCard[]): string[] {
  return cards.flatMap((c) => formatFitsCard(c));
}
