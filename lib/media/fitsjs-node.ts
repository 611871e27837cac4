// fitsjs (0.6.6) is written for browsers: it reads through FileReader and Blob,
// finds its classes on a global `astro`, and decodes pixels in a Web Worker.
// This adapter gives it what it needs in Node and nothing more:
// - `astro` on globalThis (the library assigns to `this.astro`, which in a
//   CommonJS module is module.exports, but looks classes up on the global);
// - a synchronous Blob-like byte view and a FileReader stand-in that answers at
//   once, so the whole parse runs inside one call and its errors reach our catch
//   (fitsjs throws plain strings, e.g. "BITPIX value 12 is not permitted");
// - pixel conversion through Image.prototype._getFrame, the function its Worker
//   runs, called directly.
import fitsjs from "fitsjs";

export interface FitsjsCard {
  index: number;
  value: string | number | boolean;
  comment?: string;
}

export interface FitsjsHeader {
  cards: Record<string, FitsjsCard | string[]>;
  get(key: string): unknown;
}

/** A byte range with the slice/size surface fitsjs expects of a Blob. */
export class SyncBytes {
  constructor(readonly bytes: Uint8Array) {}
  get size(): number {
    return this.bytes.length;
  }
  slice(begin = 0, end = this.bytes.length): SyncBytes {
    return new SyncBytes(this.bytes.subarray(begin, end));
  }
  toArrayBuffer(): ArrayBuffer {
    return new Uint8Array(this.bytes).buffer as ArrayBuffer;
  }
}

// Reads wait in this queue until parseHduWithFitsjs drains it: answering inside
// readAsArrayBuffer would call fitsjs back before its FITS constructor has
// assigned the parser it then reads. Everything runs in one synchronous call,
// so one module-level queue cannot mix two parses.
const pendingReads: Array<() => void> = [];

class SyncFileReader {
  onloadend: ((event: { target: { result: ArrayBuffer; frame?: number } }) => void) | null = null;
  frame?: number;
  readAsArrayBuffer(blob: SyncBytes): void {
    pendingReads.push(() => this.onloadend?.({ target: { result: blob.toArrayBuffer(), frame: this.frame } }));
  }
}

interface FitsjsApi {
  new (blob: SyncBytes, callback: (fits: { getHDU(i: number): { header: FitsjsHeader; data?: FitsjsImage } }) => void): unknown;
  Image: { prototype: { _getFrame(buffer: ArrayBuffer, bitpix: number, bzero: number, bscale: number): ArrayLike<number> } };
}

export interface FitsjsImage {
  blob: SyncBytes;
  frameLength: number;
  depth: number;
}

function installGlobals(): FitsjsApi {
  const g = globalThis as unknown as { astro?: unknown; FileReader?: unknown };
  g.astro = fitsjs.astro;
  if (g.FileReader === undefined) g.FileReader = SyncFileReader;
  return fitsjs.astro.FITS as FitsjsApi;
}

/**
 * Parse one HDU held exactly in `hduBytes` (header and data padded to blocks):
 * fitsjs only calls back when its offset lands exactly on the end of what it
 * was given, and loops on past the end otherwise, so callers trim to one HDU.
 */
export function parseHduWithFitsjs(hduBytes: Uint8Array): { header: FitsjsHeader; image?: FitsjsImage } {
  const FITS = installGlobals();
  let result: { header: FitsjsHeader; image?: FitsjsImage } | undefined;
  pendingReads.length = 0;
  try {
    new FITS(new SyncBytes(hduBytes), (fits) => {
      const hdu = fits.getHDU(0);
      result = { header: hdu.header, image: hdu.data };
    });
    // One read per header block; a bound guards against a parse that never ends.
    for (let reads = 0; pendingReads.length > 0; reads++) {
      if (reads > hduBytes.length / 2880 + 2) throw new Error("fitsjs kept reading past the end of the HDU");
      pendingReads.shift()?.();
    }
  } finally {
    pendingReads.length = 0;
  }
  if (!result) throw new Error("fitsjs did not finish reading the header");
  return result;
}

/**
 * Stored values of one frame, byte-swapped by fitsjs, with no scaling applied.
 * We pass BZERO 0 and BSCALE 1 on purpose: fitsjs adds BZERO inside the Int16 or
 * Int32 array it decoded into, so unsigned 16-bit data (BZERO 32768) wrap around
 * and come back as Int16; scaling afterwards in floating point avoids that.
 */
export function decodeFrameWithFitsjs(frameBytes: ArrayBuffer, bitpix: 8 | 16 | 32 | -32): ArrayLike<number> {
  const FITS = installGlobals();
  return FITS.Image.prototype._getFrame(frameBytes, bitpix, 0, 1);
}
