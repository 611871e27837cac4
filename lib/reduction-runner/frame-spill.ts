// Per-frame pixel data kept on local disk instead of in memory, so that a
// reduction's memory does not grow with the number of frames. An array is
// written once when it is made and read back when a stage needs it; a few
// recent ones stay in memory (a byte budget, least recently used first out),
// which is what the stages that walk neighbouring exposures need.
//
// Objects keep their shape: spillField replaces a field with a getter, so the
// numeric core (lib/imaging) reads frame.image.planes or prepared.luminance as
// before and never knows where the data lives.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { PreparedFrame } from "@/lib/imaging/pipeline";

type Typed = Float32Array | Uint8Array | Uint16Array;
type Kind = "f32" | "u8" | "u16";

interface Entry {
  path: string;
  kind: Kind;
  length: number;
}

export interface FrameSpill {
  /** Writes the array to disk; the returned key reads it back. */
  put: (array: Typed) => number;
  get: (key: number) => Typed;
  /** Replaces obj[field] (an array, or an array of arrays) by a getter over spilled copies; a later assignment stores in memory again. */
  spillField: <T extends object>(obj: T, field: keyof T & string) => void;
  /**
   * The files of a field spilled as a list of float32 arrays, for another thread
   * to read itself (each file holds the array's bytes, nothing else); undefined
   * when the field is not spilled so.
   */
  filesOf: <T extends object>(obj: T, field: keyof T & string) => { path: string; length: number }[] | undefined;
  /**
   * Sets the byte budget of the in-memory cache and trims it to fit. A stage that
   * reads each frame once in order (the merge passes) gains nothing from a large
   * cache, and the bytes held are bytes the merge's accumulators need.
   */
  setCacheBytes: (bytes: number) => void;
  /** Bytes written so far and read back from disk (cache misses). */
  stats: () => { writtenBytes: number; readBytes: number; cachedBytes: number };
  /** Deletes the files. */
  close: () => void;
}

export interface FrameSpillOptions {
  /** Folder under which a private folder is made; default the system's temporary folder. */
  parentDir?: string;
  /** Bytes of recently used arrays kept in memory. */
  cacheBytes?: number;
}

/** Default in-memory cache: a few frames' luminance and masks at 24 megapixels. */
export const DEFAULT_SPILL_CACHE_BYTES = 512 * 1024 ** 2;

function kindOf(array: Typed): Kind {
  if (array instanceof Float32Array) return "f32";
  if (array instanceof Uint16Array) return "u16";
  return "u8";
}

function view(buffer: Buffer, kind: Kind, length: number): Typed {
  // Buffer's pool may hand out unaligned slices of a shared block (small files): those are
  // copied. A large file's buffer owns its memory from offset 0 and is used as it is, so a
  // 96 MB plane is not held twice while it is read.
  const owned = buffer.byteOffset === 0 && buffer.buffer.byteLength === buffer.byteLength;
  const bytes = owned ? new Uint8Array(buffer.buffer, 0, buffer.byteLength) : Uint8Array.from(buffer);
  if (kind === "f32") return new Float32Array(bytes.buffer, 0, length);
  if (kind === "u16") return new Uint16Array(bytes.buffer, 0, length);
  return bytes.subarray(0, length);
}

export function createFrameSpill(options: FrameSpillOptions = {}): FrameSpill {
  const dir = mkdtempSync(join(options.parentDir ?? tmpdir(), "crownlight-frames-"));
  let budget = options.cacheBytes ?? DEFAULT_SPILL_CACHE_BYTES;
  const entries: Entry[] = [];
  // Map keeps insertion order: the first key is the least recently used.
  const cache = new Map<number, Typed>();
  let cachedBytes = 0;
  let writtenBytes = 0;
  let readBytes = 0;

  const trim = () => {
    for (const [k, a] of cache) {
      if (cachedBytes <= budget) break;
      cache.delete(k);
      cachedBytes -= a.byteLength;
    }
  };
  const remember = (key: number, array: Typed) => {
    if (array.byteLength > budget) return;
    cache.set(key, array);
    cachedBytes += array.byteLength;
    trim();
  };

  const put = (array: Typed): number => {
    const key = entries.length;
    const path = join(dir, `${key}.bin`);
    writeFileSync(path, new Uint8Array(array.buffer, array.byteOffset, array.byteLength));
    entries.push({ path, kind: kindOf(array), length: array.length });
    writtenBytes += array.byteLength;
    return key;
  };

  const get = (key: number): Typed => {
    const hit = cache.get(key);
    if (hit) {
      cache.delete(key);
      cache.set(key, hit);
      return hit;
    }
    const entry = entries[key];
    if (!entry) throw new Error(`spilled array ${key} does not exist`);
    const array = view(readFileSync(entry.path), entry.kind, entry.length);
    readBytes += array.byteLength;
    remember(key, array);
    return array;
  };

  // The keys of fields spilled as lists of arrays, by object and field.
  const listed = new WeakMap<object, Map<string, number[]>>();

  const spillField = <T extends object>(obj: T, field: keyof T & string) => {
    const value = obj[field] as unknown;
    if (value === undefined || value === null) return;
    let read: () => unknown;
    if (Array.isArray(value)) {
      const keys = (value as Typed[]).map((a) => put(a));
      read = () => keys.map((k) => get(k));
      if (!listed.has(obj)) listed.set(obj, new Map());
      listed.get(obj)!.set(field, keys);
    } else {
      const key = put(value as Typed);
      read = () => get(key);
    }
    Object.defineProperty(obj, field, {
      configurable: true,
      enumerable: true,
      get: read,
      set: (next: unknown) => {
        listed.get(obj)?.delete(field);
        Object.defineProperty(obj, field, { value: next, writable: true, configurable: true, enumerable: true });
      },
    });
  };

  const filesOf = <T extends object>(obj: T, field: keyof T & string) => {
    const keys = listed.get(obj)?.get(field);
    if (!keys || keys.some((k) => entries[k].kind !== "f32")) return undefined;
    return keys.map((k) => ({ path: entries[k].path, length: entries[k].length }));
  };

  return {
    put,
    get,
    spillField,
    filesOf,
    setCacheBytes: (bytes) => {
      budget = Math.max(0, bytes);
      trim();
    },
    stats: () => ({ writtenBytes, readBytes, cachedBytes }),
    close: () => {
      cache.clear();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Keeps a prepared frame's pixel arrays on disk; a luminance shared with the linearized frame is written once. */
export function spillPrepared(spill: FrameSpill, prepared: PreparedFrame): PreparedFrame {
  const { linear } = prepared;
  const shared = prepared.luminance === linear.luminance;
  for (const field of ["luminance", "clipped", "noiseFloor", "masked", "planes"] as const) spill.spillField(linear, field);
  if (!shared) spill.spillField(prepared, "luminance");
  else {
    Object.defineProperty(prepared, "luminance", {
      configurable: true,
      enumerable: true,
      get: () => linear.luminance,
      set: (next: Float32Array) => Object.defineProperty(prepared, "luminance", { value: next, writable: true, configurable: true, enumerable: true }),
    });
  }
  return prepared;
}
