// The type of an uploaded original from its first bytes in S3, before any
// worker touches it. TIFF-based files keep their first IFD elsewhere than the
// header, so that window is fetched too; whatever lies beyond both windows reads
// as missing, and the ingest job (which reads the whole file) has the last word.
import { MediaError } from "@/lib/media/errors";
import { sniffFormat, type MediaFormat } from "@/lib/media/sniff";
import type { ReadAt } from "@/lib/media/tiff-ifd";
import { readObjectRange, type ObjectRef } from "@/lib/storage";

const WINDOW_BYTES = 64 * 1024;
const TIFF_FAMILY_EXTENSIONS = /\.(dng|nef|nrw|arw)$/i;

export async function sniffObject(ref: ObjectRef, sizeBytes: number, fileName: string): Promise<MediaFormat> {
  const head = await readObjectRange(ref, 0, Math.min(WINDOW_BYTES, sizeBytes));
  const windows: { start: number; bytes: Buffer }[] = [{ start: 0, bytes: head }];
  const isTiff = head.length >= 8 && ((head[0] === 0x49 && head[1] === 0x49) || (head[0] === 0x4d && head[1] === 0x4d));
  if (isTiff) {
    const ifdOffset = head[0] === 0x49 ? head.readUInt32LE(4) : head.readUInt32BE(4);
    if (ifdOffset + 2 + 12 * 256 > head.length && ifdOffset < sizeBytes) {
      windows.push({ start: ifdOffset, bytes: await readObjectRange(ref, ifdOffset, Math.min(WINDOW_BYTES, sizeBytes - ifdOffset)) });
    }
  }
  const readAt: ReadAt = (offset, length) => {
    const w = windows.find((x) => offset >= x.start && offset < x.start + x.bytes.length);
    if (!w) return new Uint8Array(0);
    const from = offset - w.start;
    return w.bytes.subarray(from, Math.min(from + length, w.bytes.length));
  };
  try {
    return sniffFormat(readAt, sizeBytes, fileName);
  } catch (err) {
    // A raw whose maker tags lie outside the windows reads as a plain TIFF here;
    // that is no proof of a wrong type, so ingest decides.
    if (err instanceof MediaError && err.code === "format-mismatch" && isTiff && TIFF_FAMILY_EXTENSIONS.test(fileName)) return "tiff";
    throw err;
  }
}
