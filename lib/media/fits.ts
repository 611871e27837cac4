// FITS reader: the primary HDU's image (2-D, or colour planes along NAXIS3) as
// Float32Array planes in physical values (FITS 4.0 section 5.3: physical =
// BZERO + BSCALE x stored), with the header cards as a map.
// fitsjs parses the header and decodes BITPIX 8, 16, 32 and -32 (see
// fitsjs-node.ts); we check the structure first because fitsjs neither reports
// a missing END nor a short data unit (it reads on past the end of the file).
import { readFile } from "node:fs/promises";
import type { PlaneImage } from "@/lib/imaging/types";
import { MediaError } from "./errors";
import { FITS_CARD_CHARS, padToFitsBlock, type FitsValue } from "./fits-cards";
import { decodeFrameWithFitsjs, parseHduWithFitsjs, type FitsjsCard } from "./fitsjs-node";
import type { FitsBitpix } from "./fits-write";

export interface FitsImage extends PlaneImage {
  bitpix: FitsBitpix;
  bzero: number;
  bscale: number;
  /** Keyword -> value, in header order; strings unquoted, logicals as booleans. */
  header: Map<string, FitsValue>;
  /** Keyword -> comment text, for cards that have one. */
  headerComments: Map<string, string>;
  history: string[];
}

interface Structure {
  bitpix: FitsBitpix;
  axes: number[];
  headerBytes: number;
  blank?: number;
  /** Keywords whose value is a logical T or F (fitsjs returns those as the strings "T" and "F"). */
  logicalKeys: Set<string>;
  /** HISTORY text from columns 9-80 (fitsjs starts at column 11 and loses two characters). */
  history: string[];
}

const BITPIX_VALUES = new Set([8, 16, 32, -32, -64]);
const MAX_HEADER_BLOCKS = 1000;

function cardText(bytes: Uint8Array, index: number): string {
  return String.fromCharCode(...bytes.subarray(index * FITS_CARD_CHARS, (index + 1) * FITS_CARD_CHARS));
}

function cardInteger(card: string): number | null {
  const match = /^.{8}= *([+-]?\d+) *(\/.*)?$/.exec(card.trimEnd());
  return match ? Number(match[1]) : null;
}

/** Mandatory keywords in the order of FITS 4.0 section 4.4.1.1, END, and the data size they promise. */
function readStructure(bytes: Uint8Array, name: string): Structure {
  const headerFault = (fault: string) => new MediaError("fits-header", name, fault);
  const cardCount = Math.min(Math.floor(bytes.length / FITS_CARD_CHARS), MAX_HEADER_BLOCKS * 36);
  const cards: string[] = [];
  let endIndex = -1;
  for (let i = 0; i < cardCount; i++) {
    const card = cardText(bytes, i);
    if (/[^\x20-\x7e]/.test(card)) throw headerFault(`the header has no END card before the non-text bytes of card ${i + 1} (FITS 4.0 sections 4.1.2.1 and 4.4.1): the header is broken or this is not FITS`);
    if (card.startsWith("END") && card.slice(3).trim() === "") {
      endIndex = i;
      break;
    }
    cards.push(card);
  }
  if (endIndex < 0) throw headerFault("the header has no END card (FITS 4.0 section 4.4.1): the header is broken or the file is cut short");
  if (!/^SIMPLE  = +T\b/.test(cards[0] ?? "")) throw headerFault("the first card is not SIMPLE = T (FITS 4.0 section 4.4.1.1)");
  const bitpix = cards[1]?.startsWith("BITPIX  =") ? cardInteger(cards[1]) : null;
  if (bitpix === null) throw headerFault("the second card is not BITPIX with an integer value (FITS 4.0 section 4.4.1.1)");
  if (!BITPIX_VALUES.has(bitpix)) throw headerFault(`BITPIX = ${bitpix} is not one of 8, 16, 32, -32, -64 (FITS 4.0 table 8)`);
  const naxis = cards[2]?.startsWith("NAXIS   =") ? cardInteger(cards[2]) : null;
  if (naxis === null || naxis < 0 || naxis > 999) throw headerFault("the third card is not NAXIS with an integer from 0 to 999 (FITS 4.0 section 4.4.1.1)");
  if (naxis === 0) throw new MediaError("unsupported", name, "the primary HDU holds no image (NAXIS = 0); images in extensions are not read");
  const axes: number[] = [];
  for (let n = 1; n <= naxis; n++) {
    const card = cards[2 + n] ?? "";
    const key = `NAXIS${n}`.padEnd(8);
    if (!card.startsWith(`${key}=`)) throw headerFault(`NAXIS = ${naxis} but card ${3 + n} is not NAXIS${n} (FITS 4.0 section 4.4.1.1)`);
    const length = cardInteger(card);
    if (length === null || length < 1) throw headerFault(`NAXIS${n} is not a positive integer`);
    axes.push(length);
  }
  if (naxis === 1 || naxis > 3) throw new MediaError("unsupported", name, `NAXIS = ${naxis}: only 2-D images and colour planes along NAXIS3 are read`);
  const blankCard = cards.find((card) => card.startsWith("BLANK   ="));
  const blank = blankCard ? cardInteger(blankCard) : null;
  const history = cards.filter((card) => card.startsWith("HISTORY ")).map((card) => card.slice(8).trimEnd());
  const logicalKeys = new Set(cards.filter((card) => /^.{8}= +[TF]( |\/|$)/.test(card)).map((card) => card.slice(0, 8).trim()));
  return { bitpix: bitpix as FitsBitpix, axes, headerBytes: padToFitsBlock((endIndex + 1) * FITS_CARD_CHARS), blank: blank ?? undefined, logicalKeys, history };
}

function unquote(value: FitsValue): FitsValue {
  return typeof value === "string" ? value.replace(/''/g, "'") : value;
}

/** Read -64 data ourselves: fitsjs treats every negative BITPIX as 32-bit floats. */
function decodeFloat64(bytes: Uint8Array): Float64Array {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const out = new Float64Array(bytes.length / 8);
  for (let i = 0; i < out.length; i++) out[i] = view.getFloat64(i * 8);
  return out;
}

export async function readFits(input: Uint8Array | string, name: string): Promise<FitsImage> {
  const source = typeof input === "string" ? await readFile(input) : input;
  // A plain Uint8Array view: Buffer#slice shares memory where Uint8Array#slice copies, and fitsjs relies on copies.
  const bytes = new Uint8Array(source.buffer, source.byteOffset, source.byteLength);
  if (bytes.length === 0) throw new MediaError("empty-file", name, "the file is empty (0 bytes)");
  const structure = readStructure(bytes, name);
  const [width, height, depth = 1] = structure.axes;
  const bytesPerPixel = Math.abs(structure.bitpix) / 8;
  const dataBytes = width * height * depth * bytesPerPixel;
  const available = bytes.length - structure.headerBytes;
  if (available < dataBytes) {
    throw new MediaError(
      "truncated",
      name,
      `the data unit is cut short: ${Math.max(0, available)} of the ${dataBytes} bytes that NAXIS1 x NAXIS2${depth > 1 ? " x NAXIS3" : ""} x |BITPIX|/8 promise`,
    );
  }
  // Exactly one HDU, padded to a block even when the writer left the padding out.
  const hduLength = structure.headerBytes + padToFitsBlock(dataBytes);
  let hduBytes = bytes.subarray(0, hduLength);
  if (hduBytes.length < hduLength) {
    hduBytes = new Uint8Array(hduLength);
    hduBytes.set(bytes);
  }

  let parsed;
  try {
    parsed = parseHduWithFitsjs(hduBytes);
  } catch (error) {
    throw new MediaError("fits-header", name, `the header cannot be read: ${String(error instanceof Error ? error.message : error)}`, { cause: error });
  }
  const header = new Map<string, FitsValue>();
  const headerComments = new Map<string, string>();
  const entries = Object.entries(parsed.header.cards);
  const ordered = entries.filter((entry): entry is [string, FitsjsCard] => !Array.isArray(entry[1])).sort((a, b) => a[1].index - b[1].index);
  for (const [key, card] of ordered) {
    const isLogical = structure.logicalKeys.has(key) && (card.value === "T" || card.value === "F" || typeof card.value === "boolean");
    header.set(key, isLogical ? card.value === "T" || card.value === true : unquote(card.value));
    const comment = card.comment?.trim();
    if (comment) headerComments.set(key, comment);
  }

  const bzero = Number(header.get("BZERO") ?? 0);
  const bscale = Number(header.get("BSCALE") ?? 1);
  if (!Number.isFinite(bzero) || !Number.isFinite(bscale) || bscale === 0) {
    throw new MediaError("fits-header", name, `BZERO = ${header.get("BZERO")} and BSCALE = ${header.get("BSCALE")} do not give a usable scaling`);
  }
  const planeBytes = width * height * bytesPerPixel;
  const planes: Float32Array[] = [];
  for (let p = 0; p < depth; p++) {
    const begin = structure.headerBytes + p * planeBytes;
    const frame = hduBytes.subarray(begin, begin + planeBytes);
    const stored =
      structure.bitpix === -64 ? decodeFloat64(frame) : decodeFrameWithFitsjs(frame.slice().buffer as ArrayBuffer, structure.bitpix);
    const plane = new Float32Array(width * height);
    const blank = structure.bitpix > 0 ? structure.blank : undefined;
    for (let i = 0; i < plane.length; i++) {
      const value = stored[i];
      plane[i] = blank !== undefined && value === blank ? Number.NaN : bzero + bscale * value;
    }
    planes.push(plane);
  }
  return { width, height, planes, bitpix: structure.bitpix, bzero, bscale, header, headerComments, history: structure.history };
}
