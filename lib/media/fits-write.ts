// FITS writer (FITS Standard 4.0): one primary HDU holding a 2-D image or a cube of
// colour planes (NAXIS3). Mandatory cards come first in the order of section 4.4.1.1
// (SIMPLE, BITPIX, NAXIS, NAXISn), data are big-endian (section 5) and both units
// are padded to 2880-byte blocks (header with spaces, data with zeros).
import { open, rename, rm } from "node:fs/promises";
import { MediaError } from "./errors";
import { countFitsCardLines, encodeFitsHeader, FITS_CARDS_PER_BLOCK, FITS_BLOCK_BYTES, padToFitsBlock, type FitsCard } from "./fits-cards";

export type FitsBitpix = 8 | 16 | 32 | -32 | -64;

/** Uint16Array is written as BITPIX 16 with BZERO 32768 (section 5.2.5); the others map one to one. */
export type FitsPixelArray = Uint8Array | Int16Array | Uint16Array | Int32Array | Float32Array | Float64Array;

export interface FitsImageSpec {
  width: number;
  height: number;
  /** One plane per colour, row-major, each width * height long, all of one array type. */
  planes: FitsPixelArray[];
  /** Extra cards after the mandatory ones (not SIMPLE, BITPIX, NAXISn, BZERO, BSCALE, END). */
  cards?: FitsCard[];
  /** Text of HISTORY cards, written after the other cards. */
  history?: string[];
}

const RESERVED_KEYS = new Set(["SIMPLE", "BITPIX", "NAXIS", "NAXIS1", "NAXIS2", "NAXIS3", "BZERO", "BSCALE", "END", "EXTEND"]);
const CHUNK_PIXELS = 1 << 20;

export function bitpixOf(plane: FitsPixelArray): FitsBitpix {
  if (plane instanceof Uint8Array) return 8;
  if (plane instanceof Int16Array || plane instanceof Uint16Array) return 16;
  if (plane instanceof Int32Array) return 32;
  if (plane instanceof Float32Array) return -32;
  return -64;
}

/**
 * Bytes of a single-HDU FITS file, without building it: header blocks for
 * `cardLines` cards plus END, and the data padded to whole blocks.
 * 100x100 BITPIX 16 -> 23040; 6000x4000 BITPIX -32 -> 96,004,800.
 */
export function computeFitsSizeBytes(size: { width: number; height: number; depth?: number; bitpix: FitsBitpix; cardLines?: number }): number {
  const cardLines = size.cardLines ?? 5;
  const headerBytes = Math.ceil((cardLines + 1) / FITS_CARDS_PER_BLOCK) * FITS_BLOCK_BYTES;
  const dataBytes = size.width * size.height * (size.depth ?? 1) * (Math.abs(size.bitpix) / 8);
  return headerBytes + padToFitsBlock(dataBytes);
}

function checkSpec(spec: FitsImageSpec, where: string): FitsBitpix {
  const { width, height, planes } = spec;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new MediaError("bad-argument", where, `FITS image size ${width}x${height} is not two positive integers`);
  }
  if (planes.length < 1) throw new MediaError("bad-argument", where, "a FITS image needs at least one plane");
  const bitpix = bitpixOf(planes[0]);
  planes.forEach((plane, i) => {
    if (plane.length !== width * height) {
      throw new MediaError("bad-argument", where, `plane ${i} holds ${plane.length} pixels, not ${width} x ${height}`);
    }
    if (plane.constructor !== planes[0].constructor) throw new MediaError("bad-argument", where, `plane ${i} is a ${plane.constructor.name}, plane 0 a ${planes[0].constructor.name}`);
  });
  for (const card of spec.cards ?? []) {
    if (RESERVED_KEYS.has(card.key.toUpperCase())) {
      throw new MediaError("bad-argument", where, `FITS card ${card.key} is written by the writer itself; leave it out of cards`);
    }
  }
  return bitpix;
}

function buildCards(spec: FitsImageSpec, bitpix: FitsBitpix): FitsCard[] {
  const depth = spec.planes.length;
  const cards: FitsCard[] = [
    { key: "SIMPLE", value: true, comment: "conforms to FITS Standard 4.0" },
    { key: "BITPIX", value: bitpix, comment: bitpix < 0 ? "IEEE floating point" : `${bitpix}-bit integers` },
    { key: "NAXIS", value: depth > 1 ? 3 : 2 },
    { key: "NAXIS1", value: spec.width, comment: "width in pixels" },
    { key: "NAXIS2", value: spec.height, comment: "height in pixels" },
  ];
  if (depth > 1) cards.push({ key: "NAXIS3", value: depth, comment: "colour planes" });
  if (spec.planes[0] instanceof Uint16Array) {
    cards.push({ key: "BZERO", value: 32768, comment: "unsigned 16-bit data (FITS 4.0 section 5.2.5)" });
    cards.push({ key: "BSCALE", value: 1 });
  }
  cards.push(...(spec.cards ?? []));
  for (const text of spec.history ?? []) cards.push({ key: "HISTORY", comment: text });
  return cards;
}

/** Big-endian bytes of pixels [from, to) of one plane. */
function encodePixels(plane: FitsPixelArray, from: number, to: number): Uint8Array {
  const bytes = Math.abs(bitpixOf(plane)) / 8;
  const out = new Uint8Array((to - from) * bytes);
  const view = new DataView(out.buffer);
  if (plane instanceof Uint8Array) out.set(plane.subarray(from, to));
  else if (plane instanceof Uint16Array) for (let i = from; i < to; i++) view.setInt16((i - from) * 2, plane[i] - 32768);
  else if (plane instanceof Int16Array) for (let i = from; i < to; i++) view.setInt16((i - from) * 2, plane[i]);
  else if (plane instanceof Int32Array) for (let i = from; i < to; i++) view.setInt32((i - from) * 4, plane[i]);
  else if (plane instanceof Float32Array) for (let i = from; i < to; i++) view.setFloat32((i - from) * 4, plane[i]);
  else for (let i = from; i < to; i++) view.setFloat64((i - from) * 8, plane[i]);
  return out;
}

/** The whole file in memory; for large masters prefer writeFitsFile. */
export function encodeFits(spec: FitsImageSpec, where = "FITS file"): Uint8Array {
  const bitpix = checkSpec(spec, where);
  const header = encodeFitsHeader(buildCards(spec, bitpix), where);
  const dataBytes = spec.width * spec.height * spec.planes.length * (Math.abs(bitpix) / 8);
  const out = new Uint8Array(header.length + padToFitsBlock(dataBytes));
  out.set(header, 0);
  let at = header.length;
  for (const plane of spec.planes) {
    const bytes = encodePixels(plane, 0, plane.length);
    out.set(bytes, at);
    at += bytes.length;
  }
  return out;
}

/**
 * Write a FITS file in chunks (a 6000x4000x3 float master is 288 MB) to a
 * temporary name, then rename, so a failed job never leaves half a file.
 */
export async function writeFitsFile(path: string, spec: FitsImageSpec): Promise<void> {
  const where = path.split("/").pop() ?? path;
  const bitpix = checkSpec(spec, where);
  const header = encodeFitsHeader(buildCards(spec, bitpix), where);
  const partPath = `${path}.part`;
  const handle = await open(partPath, "w");
  try {
    await handle.write(header);
    let dataBytes = 0;
    for (const plane of spec.planes) {
      for (let from = 0; from < plane.length; from += CHUNK_PIXELS) {
        const bytes = encodePixels(plane, from, Math.min(plane.length, from + CHUNK_PIXELS));
        await handle.write(bytes);
        dataBytes += bytes.length;
      }
    }
    const padding = padToFitsBlock(dataBytes) - dataBytes;
    if (padding > 0) await handle.write(new Uint8Array(padding));
    await handle.close();
    await rename(partPath, path);
  } catch (error) {
    await handle.close().catch(() => undefined);
    await rm(partPath, { force: true });
    throw error;
  }
}

/** Lines the header of `spec` takes, to pass to computeFitsSizeBytes as cardLines. */
export function countFitsHeaderLines(spec: FitsImageSpec): number {
  return countFitsCardLines(buildCards(spec, bitpixOf(spec.planes[0])));
}
