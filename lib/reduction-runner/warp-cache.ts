// The merge's cache of warped frames on local disk (see WarpCache in
// lib/imaging/bracket-finish.ts): the first pass writes each frame's warped
// bands, the second reads each once and deletes it. At 24 megapixels a frame
// takes about 310 MB of disk (three float32 planes and four masks); what is
// written is usually still in the page cache when the second pass reads it.
import { closeSync, mkdtempSync, openSync, readSync, rmSync, statfsSync, unlink, writeSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { WarpCache } from "@/lib/imaging/bracket-finish";

/** At most this much disk, and at most half of what is free where the cache lives. */
export const DEFAULT_WARP_CACHE_BYTES = 16 * 1024 ** 3;

export interface DiskWarpCache extends WarpCache {
  /** Bytes written and read back so far. */
  stats: () => { writtenBytes: number; readBytes: number };
  /** Deletes what is left. */
  close: () => void;
}

function bytesOf(array: Float32Array | Uint8Array): Uint8Array {
  return new Uint8Array(array.buffer, array.byteOffset, array.byteLength);
}

export function createWarpCache(options: { parentDir?: string; budgetBytes?: number } = {}): DiskWarpCache {
  const dir = mkdtempSync(join(options.parentDir ?? tmpdir(), "crownlight-warped-"));
  let budget = options.budgetBytes ?? DEFAULT_WARP_CACHE_BYTES;
  try {
    const fs = statfsSync(dir);
    budget = Math.min(budget, (fs.bavail * fs.bsize) / 2);
  } catch {
    // No figure for the free space: the budget alone bounds the cache.
  }
  let reservedBytes = 0;
  let writtenBytes = 0;
  let readBytes = 0;
  const reserved = new Set<number>();
  // Byte lengths of the arrays of each part kept, by "position-part".
  const parts = new Map<string, number[]>();
  const pathOf = (key: string) => join(dir, `${key}.bin`);

  return {
    reserve: (position, bytes) => {
      if (reservedBytes + bytes > budget) return false;
      reservedBytes += bytes;
      reserved.add(position);
      return true;
    },
    put: (position, part, arrays) => {
      if (!reserved.has(position)) throw new Error(`the merge's cache has no room for frame ${position + 1}`);
      const key = `${position}-${part}`;
      try {
        const fd = openSync(pathOf(key), "w");
        try {
          for (const a of arrays) {
            const bytes = bytesOf(a);
            for (let done = 0; done < bytes.length;) done += writeSync(fd, bytes, done, bytes.length - done);
            writtenBytes += bytes.length;
          }
        } finally {
          closeSync(fd);
        }
      } catch {
        // A full or failing disk costs the second pass a warp, not the reduction: the frame's parts all go.
        rmSync(pathOf(key), { force: true });
        for (const k of [...parts.keys()]) {
          if (!k.startsWith(`${position}-`)) continue;
          rmSync(pathOf(k), { force: true });
          parts.delete(k);
        }
        reserved.delete(position);
        return false;
      }
      parts.set(key, arrays.map((a) => a.byteLength));
      return true;
    },
    take: (position, part, into) => {
      const key = `${position}-${part}`;
      const lengths = parts.get(key);
      if (!lengths) return undefined;
      const fd = openSync(pathOf(key), "r");
      try {
        let at = 0;
        lengths.forEach((length, j) => {
          if (!into[j] || into[j].byteLength < length) throw new Error(`the merge's cache holds ${length} bytes for array ${j} of part ${part} of frame ${position + 1}, more than the ${into[j]?.byteLength ?? 0} given`);
          const bytes = bytesOf(into[j]);
          for (let done = 0; done < length;) {
            const n = readSync(fd, bytes, done, length - done, at + done);
            if (n === 0) throw new Error(`the merge's cache file for frame ${position + 1} is cut short`);
            done += n;
          }
          at += length;
          readBytes += length;
        });
      } finally {
        closeSync(fd);
      }
      // Deleted off the calling thread: freeing a part's pages took about 25 ms a part at 24
      // megapixels (3.8 s of the 9-frame bench's merge). A delete that fails leaves a file that close() removes.
      unlink(pathOf(key), () => undefined);
      parts.delete(key);
      return lengths.map((length, j) => length / into[j].BYTES_PER_ELEMENT);
    },
    stats: () => ({ writtenBytes, readBytes }),
    close: () => {
      parts.clear();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}
