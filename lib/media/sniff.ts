// Which format a file holds, decided from its content (magic bytes and, for the
// TIFF family, the first IFD), never from its name alone. The name is used only
// to refuse a file whose extension promises something else, and as a tie-breaker
// between TIFF-based raws whose Make tag does not tell them apart.
import { closeSync, fstatSync, openSync, readSync } from "node:fs";
import { basename, extname } from "node:path";
import { MediaError } from "./errors";
import { readIfdAscii, readTiffIfd0, type ReadAt } from "./tiff-ifd";

export type MediaFormat = "jpeg" | "png" | "tiff" | "fits" | "dng" | "cr2" | "cr3" | "nef" | "arw" | "orf" | "raf";

export const RAW_FORMATS: ReadonlySet<MediaFormat> = new Set(["dng", "cr2", "cr3", "nef", "arw", "orf", "raf"]);

export const FORMAT_LABELS: Record<MediaFormat, string> = {
  jpeg: "a JPEG image",
  png: "a PNG image",
  tiff: "a TIFF image",
  fits: "a FITS file",
  dng: "a DNG raw",
  cr2: "a Canon CR2 raw",
  cr3: "a Canon CR3 raw",
  nef: "a Nikon NEF raw",
  arw: "a Sony ARW raw",
  orf: "an Olympus ORF raw",
  raf: "a Fujifilm RAF raw",
};

/** Short names, as used after "not": "the content is a TIFF image, not FITS". */
export const FORMAT_NAMES: Record<MediaFormat, string> = {
  jpeg: "JPEG", png: "PNG", tiff: "TIFF", fits: "FITS", dng: "DNG", cr2: "CR2", cr3: "CR3",
  nef: "NEF", arw: "ARW", orf: "ORF", raf: "RAF",
};

/** File name extensions of the formats we read; the uploader offers only these. */
export const EXTENSION_FORMATS: Record<string, MediaFormat> = {
  ".jpg": "jpeg", ".jpeg": "jpeg", ".jpe": "jpeg",
  ".png": "png",
  ".tif": "tiff", ".tiff": "tiff",
  ".fits": "fits", ".fit": "fits", ".fts": "fits",
  ".dng": "dng", ".cr2": "cr2", ".cr3": "cr3", ".nef": "nef", ".nrw": "nef",
  ".arw": "arw", ".orf": "orf", ".raf": "raf",
};

const TAG_MAKE = 0x010f;
const TAG_DNG_VERSION = 0xc612;

function startsWith(bytes: Uint8Array, text: string, at = 0): boolean {
  if (bytes.length < at + text.length) return false;
  for (let i = 0; i < text.length; i++) if (bytes[at + i] !== text.charCodeAt(i)) return false;
  return true;
}

/** The format the content alone shows; "tiff" for a TIFF whose raw maker is unknown. */
function detectFromContent(readAt: ReadAt): MediaFormat | null {
  const head = readAt(0, 32);
  if (head[0] === 0xff && head[1] === 0xd8 && head[2] === 0xff) return "jpeg";
  if (startsWith(head, "\x89PNG\r\n\x1a\n")) return "png";
  // FITS 4.0 section 4.4.1.1: the primary header starts with SIMPLE in columns 1-8 and "= " in 9-10.
  if (startsWith(head, "SIMPLE  =")) return "fits";
  if (startsWith(head, "FUJIFILMCCD-RAW")) return "raf";
  if (startsWith(head, "IIRO") || startsWith(head, "IIRS") || startsWith(head, "MMOR")) return "orf";
  // ISO/IEC 14496-12: box size, then "ftyp" and the major brand; Canon's is "crx ".
  if (startsWith(head, "ftyp", 4) && startsWith(head, "crx ", 8)) return "cr3";
  const isTiff = startsWith(head, "II*\0") || startsWith(head, "MM\0*");
  if (!isTiff) return null;
  if (startsWith(head, "CR", 8)) return "cr2";
  const ifd = readTiffIfd0(readAt);
  if (!ifd) return "tiff";
  if (ifd.entries.has(TAG_DNG_VERSION)) return "dng";
  const make = (readIfdAscii(readAt, ifd, TAG_MAKE) ?? "").toUpperCase();
  if (make.startsWith("NIKON")) return "nef";
  if (make.startsWith("SONY")) return "arw";
  return "tiff";
}

/**
 * The format of a file, from its content. Throws MediaError for an empty file,
 * unknown content, or content that contradicts a known extension
 * ("frame-042.fits: the content is a TIFF image, not FITS").
 */
export function sniffFormat(readAt: ReadAt, byteLength: number, name: string): MediaFormat {
  if (byteLength === 0) throw new MediaError("empty-file", name, "the file is empty (0 bytes)");
  const content = detectFromContent(readAt);
  const claimed = EXTENSION_FORMATS[extname(name).toLowerCase()];
  if (!content) {
    const what = claimed ? ` (not ${FORMAT_NAMES[claimed]}: unrecognised first bytes)` : " (unrecognised first bytes)";
    throw new MediaError("unknown-format", name, `the content is not an image format we read${what}`);
  }
  if (!claimed || claimed === content) return content;
  // NEF and ARW are TIFF files; when Make did not name the maker, the extension decides.
  if (content === "tiff" && (claimed === "nef" || claimed === "arw")) return claimed;
  throw new MediaError("format-mismatch", name, `the content is ${FORMAT_LABELS[content]}, not ${FORMAT_NAMES[claimed]}`);
}

export function readAtBytes(bytes: Uint8Array): ReadAt {
  return (offset, length) => bytes.subarray(Math.min(offset, bytes.length), Math.min(offset + length, bytes.length));
}

/** Sniff bytes already in memory. */
export function sniffBytes(bytes: Uint8Array, name: string): MediaFormat {
  return sniffFormat(readAtBytes(bytes), bytes.length, name);
}

/** Sniff a file on disk, reading only its first bytes and IFD0; `name` defaults to the base name. */
export function sniffFile(path: string, name = basename(path)): MediaFormat {
  const fd = openSync(path, "r");
  try {
    const size = fstatSync(fd).size;
    const readAt: ReadAt = (offset, length) => {
      const out = new Uint8Array(Math.max(0, Math.min(length, size - offset)));
      if (out.length > 0) readSync(fd, out, 0, out.length, offset);
      return out;
    };
    return sniffFormat(readAt, size, name);
  } finally {
    closeSync(fd);
  }
}
