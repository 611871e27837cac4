// Just enough of TIFF 6.0 (Adobe, 1992, section 2: image file header and IFD) to
// look at the first IFD of a file without decoding it: sniffing tells DNG, NEF and
// ARW apart from a plain TIFF by the tags there (DNGVersion 0xC612, Make 0x010F).

/** Reads `length` bytes at `offset`; returns fewer at the end of the file. */
export type ReadAt = (offset: number, length: number) => Uint8Array;

export interface IfdEntry {
  tag: number;
  type: number;
  count: number;
  /** Byte offset of the value in the file (inline values point into the entry). */
  valueOffset: number;
}

export interface TiffIfd {
  littleEndian: boolean;
  entries: Map<number, IfdEntry>;
}

const TYPE_SIZES: Record<number, number> = { 1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 6: 1, 7: 1, 8: 2, 9: 4, 10: 8, 11: 4, 12: 8 };
// A camera's IFD0 has a few dozen entries; a count beyond this is a corrupt file.
const MAX_IFD_ENTRIES = 4096;

export function readTiffIfd0(readAt: ReadAt): TiffIfd | null {
  const head = readAt(0, 8);
  if (head.length < 8) return null;
  const littleEndian = head[0] === 0x49;
  const view = new DataView(head.buffer, head.byteOffset, head.byteLength);
  const ifdOffset = view.getUint32(4, littleEndian);
  const countBytes = readAt(ifdOffset, 2);
  if (countBytes.length < 2) return null;
  const count = new DataView(countBytes.buffer, countBytes.byteOffset, 2).getUint16(0, littleEndian);
  if (count === 0 || count > MAX_IFD_ENTRIES) return null;
  const table = readAt(ifdOffset + 2, count * 12);
  if (table.length < count * 12) return null;
  const tv = new DataView(table.buffer, table.byteOffset, table.byteLength);
  const entries = new Map<number, IfdEntry>();
  for (let i = 0; i < count; i++) {
    const at = i * 12;
    const tag = tv.getUint16(at, littleEndian);
    const type = tv.getUint16(at + 2, littleEndian);
    const n = tv.getUint32(at + 4, littleEndian);
    const size = (TYPE_SIZES[type] ?? 1) * n;
    const valueOffset = size <= 4 ? ifdOffset + 2 + at + 8 : tv.getUint32(at + 8, littleEndian);
    entries.set(tag, { tag, type, count: n, valueOffset });
  }
  return { littleEndian, entries };
}

/** An ASCII (type 2) tag's text, without the trailing NUL; null when absent. */
export function readIfdAscii(readAt: ReadAt, ifd: TiffIfd, tag: number): string | null {
  const entry = ifd.entries.get(tag);
  if (!entry || entry.type !== 2) return null;
  const bytes = readAt(entry.valueOffset, Math.min(entry.count, 256));
  let text = "";
  for (const byte of bytes) {
    if (byte === 0) break;
    text += String.fromCharCode(byte);
  }
  return text.trim();
}
