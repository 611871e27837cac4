// A minimal little-endian TIFF 6.0 writer (Adobe, 1992, section 2): IFDs with
// entries sorted by tag, values of more than 4 bytes stored after the IFDs at
// word-aligned offsets, one uncompressed strip. Enough for DNG fixtures and
// synthetic raws; sharp writes every other TIFF we make.

export const TIFF_TYPE = { BYTE: 1, ASCII: 2, SHORT: 3, LONG: 4, RATIONAL: 5, SRATIONAL: 10 } as const;
export type TiffType = (typeof TIFF_TYPE)[keyof typeof TIFF_TYPE];

export interface TiffEntry {
  tag: number;
  type: TiffType;
  /** Numbers (rationals as flat numerator, denominator pairs) or ASCII text. */
  values: number[] | string;
}

/** An IFD; `subIfds` hang off a LONG pointer tag (e.g. 34665 Exif IFD) of this IFD. */
export interface TiffIfdSpec {
  entries: TiffEntry[];
  subIfds?: { tag: number; ifd: TiffIfdSpec }[];
  /** Pixel bytes of the single strip; StripOffsets and StripByteCounts are added. */
  strip?: Uint8Array;
}

const TYPE_BYTES: Record<TiffType, number> = { 1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 10: 8 };
const TAG_STRIP_OFFSETS = 273;
const TAG_STRIP_BYTE_COUNTS = 279;

function valueCount(entry: TiffEntry): number {
  if (typeof entry.values === "string") return entry.values.length + 1;
  return entry.type === TIFF_TYPE.RATIONAL || entry.type === TIFF_TYPE.SRATIONAL ? entry.values.length / 2 : entry.values.length;
}

function valueBytes(entry: TiffEntry): number {
  return valueCount(entry) * TYPE_BYTES[entry.type];
}

function writeValues(view: DataView, at: number, entry: TiffEntry): void {
  if (typeof entry.values === "string") {
    for (let i = 0; i < entry.values.length; i++) view.setUint8(at + i, entry.values.charCodeAt(i) & 0x7f);
    view.setUint8(at + entry.values.length, 0);
    return;
  }
  entry.values.forEach((value, i) => {
    if (entry.type === TIFF_TYPE.BYTE) view.setUint8(at + i, value);
    else if (entry.type === TIFF_TYPE.SHORT) view.setUint16(at + i * 2, value, true);
    else if (entry.type === TIFF_TYPE.LONG || entry.type === TIFF_TYPE.RATIONAL) view.setUint32(at + i * 4, value, true);
    else view.setInt32(at + i * 4, value, true);
  });
}

const align = (n: number) => n + (n & 1);

/** Lay out `root` (and its sub-IFDs) into one TIFF file. */
export function encodeTiff(root: TiffIfdSpec): Uint8Array {
  // Pass 1: every IFD gets its pointer and strip entries so that sizes are final.
  const ifds: { spec: TiffIfdSpec; entries: TiffEntry[]; offset: number }[] = [];
  const collect = (spec: TiffIfdSpec) => {
    const entries = [...spec.entries];
    for (const sub of spec.subIfds ?? []) entries.push({ tag: sub.tag, type: TIFF_TYPE.LONG, values: [0] });
    if (spec.strip) {
      entries.push({ tag: TAG_STRIP_OFFSETS, type: TIFF_TYPE.LONG, values: [0] });
      entries.push({ tag: TAG_STRIP_BYTE_COUNTS, type: TIFF_TYPE.LONG, values: [spec.strip.length] });
    }
    entries.sort((a, b) => a.tag - b.tag);
    ifds.push({ spec, entries, offset: 0 });
    for (const sub of spec.subIfds ?? []) collect(sub.ifd);
  };
  collect(root);
  let at = 8;
  for (const ifd of ifds) {
    ifd.offset = at;
    at = align(at + 2 + ifd.entries.length * 12 + 4);
  }
  const valueOffsets = new Map<TiffEntry, number>();
  for (const ifd of ifds) {
    for (const entry of ifd.entries) {
      if (valueBytes(entry) > 4) {
        valueOffsets.set(entry, at);
        at = align(at + valueBytes(entry));
      }
    }
  }
  const stripOffsets = new Map<TiffIfdSpec, number>();
  for (const ifd of ifds) {
    if (ifd.spec.strip) {
      stripOffsets.set(ifd.spec, at);
      at = align(at + ifd.spec.strip.length);
    }
  }
  // Pass 2: fill in pointers, then write.
  const out = new Uint8Array(at);
  const view = new DataView(out.buffer);
  out.set([0x49, 0x49, 42, 0], 0);
  view.setUint32(4, 8, true);
  for (const ifd of ifds) {
    for (const entry of ifd.entries) {
      const sub = ifd.spec.subIfds?.find((s) => s.tag === entry.tag);
      if (sub) entry.values = [ifds.find((i) => i.spec === sub.ifd)!.offset];
      if (entry.tag === TAG_STRIP_OFFSETS && ifd.spec.strip) entry.values = [stripOffsets.get(ifd.spec)!];
    }
    view.setUint16(ifd.offset, ifd.entries.length, true);
    ifd.entries.forEach((entry, i) => {
      const at12 = ifd.offset + 2 + i * 12;
      view.setUint16(at12, entry.tag, true);
      view.setUint16(at12 + 2, entry.type, true);
      view.setUint32(at12 + 4, valueCount(entry), true);
      const offset = valueOffsets.get(entry);
      if (offset === undefined) writeValues(view, at12 + 8, entry);
      else {
        view.setUint32(at12 + 8, offset, true);
        writeValues(view, offset, entry);
      }
    });
    view.setUint32(ifd.offset + 2 + ifd.entries.length * 12, 0, true);
    if (ifd.spec.strip) out.set(ifd.spec.strip, stripOffsets.get(ifd.spec)!);
  }
  return out;
}

/** A positive number as a TIFF RATIONAL: 1/n when it is one (1/250 s), else a reduced fraction. */
export function toRational(value: number): [number, number] {
  if (!(value > 0) || !Number.isFinite(value)) return [0, 1];
  const inverse = 1 / value;
  if (value < 1 && Math.abs(inverse - Math.round(inverse)) < 1e-6 * inverse) return [1, Math.round(inverse)];
  const den = 100_000;
  const num = Math.round(value * den);
  const gcd = (a: number, b: number): number => (b === 0 ? a : gcd(b, a % b));
  const g = gcd(num, den);
  return [num / g, den / g];
}

export function toSignedRational(value: number): [number, number] {
  return [Math.round(value * 10_000), 10_000];
}
