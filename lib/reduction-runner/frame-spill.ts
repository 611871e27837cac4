// Per-frame pixel data kept on local disk instead of in memory, so that a
// reduction's memory does not grow with the number of frames. An array is
// written once when it is made and read back when a stage needs it; a few
// recent ones stay in memory (a byte budget, least recently used first out),
// which is what the stages that walk neighbouring exposures need.
//
// Objects keep their shape: spillField replaces a field with a getter, so the
// numeric core (lib/imaging) reads frame.image.planes or prepared.luminance as
// before and never knows where the data lives.
import { closeSync, mkdtempSync, openSync, readFileSync, readSync, rmSync, statfsSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import type { PreparedFrame } from "@/lib/imaging/pipeline";
import type { ArrayMemory } from "@/lib/imaging/plane-runner";
import { markPlaneLengths, type LinearFrame } from "@/lib/imaging/types";

type Typed = Float32Array | Uint8Array | Uint16Array;
/** How an array is kept on disk; "f32-u16" is a float32 array of whole counts 0 to 65535 kept as uint16, half the bytes. */
export type SpillKind = "f32" | "f32-u16" | "u8" | "u16";
type Kind = SpillKind;

interface Entry {
  path: string;
  kind: Kind;
  length: number;
}

export interface FrameSpill {
  /** The spill's own folder: another thread may write files there for adoptField (deleted with the rest on close). */
  dir: string;
  /** Writes the array to disk; the returned key reads it back. */
  put: (array: Typed) => number;
  get: (key: number) => Typed;
  /** Replaces obj[field] (an array, or an array of arrays) by a getter over spilled copies; a later assignment stores in memory again. */
  spillField: <T extends object>(obj: T, field: keyof T & string) => void;
  /**
   * As spillField for a field of a list of arrays that another thread has
   * written already (writeSpilledFile, in `dir`): obj[field] becomes a getter
   * over those files, and the arrays it held (placeholders, say) are let go.
   */
  adoptField: <T extends object>(obj: T, field: keyof T & string, files: SpilledFile[]) => void;
  /**
   * The files of a field spilled as a list of float32 arrays, for another thread
   * to read itself (each file holds the array's bytes, nothing else); undefined
   * when the field is not spilled so.
   */
  filesOf: <T extends object>(obj: T, field: keyof T & string) => SpilledFile[] | undefined;
  /**
   * Sets the byte budget of the in-memory cache and trims it to fit. A stage that
   * reads each frame once in order (the merge passes) gains nothing from a large
   * cache, and the bytes held are bytes the merge's accumulators need.
   */
  setCacheBytes: (bytes: number) => void;
  /**
   * Reads float32 and uint8 arrays into memory from `memory` (a plane runner's,
   * say, so that its threads use them as they are, not copies) until set back to
   * undefined. The caller owns what it hands out and may reuse it once the
   * stage that read an array is done with it, so nothing read so is cached.
   */
  readInto: (memory: ArrayMemory | undefined) => void;
  /** Bytes written to disk so far and read back from it (cache misses), as stored (whole counts in 16 bits). */
  stats: () => { writtenBytes: number; readBytes: number; cachedBytes: number };
  /** Deletes the files. */
  close: () => void;
}

/** A spilled array's file, for another thread to read with readSpilledFile. */
export interface SpilledFile {
  path: string;
  kind: SpillKind;
  length: number;
}

export interface FrameSpillOptions {
  /** Folder under which a private folder is made; default the system's temporary folder. */
  parentDir?: string;
  /** Bytes of recently used arrays kept in memory. */
  cacheBytes?: number;
}

/** Default in-memory cache: a few frames' luminance and masks at 24 megapixels. */
export const DEFAULT_SPILL_CACHE_BYTES = 512 * 1024 ** 2;

/** Values a probe looks at before a packed copy is made: light that is not whole counts fails within them. */
const PACK_PROBE = 4096;

/** True when v is a whole number from 0 to 65535 (NaN is not; -0 is, and comes back as 0). */
function isWholeCount(v: number): boolean {
  const u = v | 0;
  return u === v && u >= 0 && u <= 65535;
}

/**
 * The array as uint16 when every value is a whole number from 0 to 65535 (a
 * decoded frame's counts before calibration), else undefined: the check and the
 * copy in one pass over the array.
 */
function packWholeCounts(array: Float32Array): Uint16Array | undefined {
  const probe = Math.min(array.length, PACK_PROBE);
  for (let i = 0; i < probe; i++) if (!isWholeCount(array[i])) return undefined;
  const packed = new Uint16Array(array.length);
  for (let i = 0; i < array.length; i++) {
    const v = array[i];
    if (!isWholeCount(v)) return undefined;
    packed[i] = v;
  }
  return packed;
}

/** How an array goes to disk, and its bytes there. */
function toDisk(array: Typed): { kind: Kind; bytes: Uint8Array } {
  if (array instanceof Float32Array) {
    const packed = packWholeCounts(array);
    if (packed) return { kind: "f32-u16", bytes: new Uint8Array(packed.buffer) };
    return { kind: "f32", bytes: new Uint8Array(array.buffer, array.byteOffset, array.byteLength) };
  }
  return { kind: array instanceof Uint16Array ? "u16" : "u8", bytes: new Uint8Array(array.buffer, array.byteOffset, array.byteLength) };
}

function view(buffer: Buffer, kind: Kind, length: number): Typed {
  // Buffer's pool may hand out unaligned slices of a shared block (small files): those are
  // copied. A large file's buffer owns its memory from offset 0 and is used as it is, so a
  // 96 MB plane is not held twice while it is read.
  const owned = buffer.byteOffset === 0 && buffer.buffer.byteLength === buffer.byteLength;
  const bytes = owned ? new Uint8Array(buffer.buffer, 0, buffer.byteLength) : Uint8Array.from(buffer);
  if (kind === "f32") return new Float32Array(bytes.buffer, 0, length);
  if (kind === "f32-u16") return Float32Array.from(new Uint16Array(bytes.buffer, 0, length));
  if (kind === "u16") return new Uint16Array(bytes.buffer, 0, length);
  return bytes.subarray(0, length);
}

/** Writes an array as a spill keeps it (whole counts in 16 bits), for a spill to adopt; gives the file. */
export function writeSpilledFile(path: string, array: Float32Array): SpilledFile {
  const { kind, bytes } = toDisk(array);
  writeFileSync(path, bytes);
  return { path, kind, length: array.length };
}

/** Reads the whole file into `into`'s bytes. */
function readFileInto(path: string, into: Uint8Array): void {
  const fd = openSync(path, "r");
  try {
    for (let done = 0; done < into.length;) {
      const n = readSync(fd, into, done, into.length - done, done);
      if (n === 0) throw new Error(`${path} is cut short: ${done} of ${into.length} bytes`);
      done += n;
    }
  } finally {
    closeSync(fd);
  }
}

/** A float32 or uint8 array read from its file straight into memory of the caller's (whole counts widened there). */
function readIntoMemory(entry: { path: string; kind: Kind; length: number }, memory: ArrayMemory): Float32Array | Uint8Array {
  if (entry.kind === "u8") {
    const out = memory.uint8(entry.length);
    readFileInto(entry.path, out);
    return out;
  }
  const out = memory.float32(entry.length);
  if (entry.kind === "f32") readFileInto(entry.path, new Uint8Array(out.buffer, out.byteOffset, out.byteLength));
  else {
    const read = readFileSync(entry.path);
    if (read.length !== 2 * entry.length) throw new Error(`${entry.path} holds ${read.length} bytes, not the ${2 * entry.length} of its array`);
    // A small file's buffer may sit at an odd offset of Buffer's shared pool.
    const bytes = read.byteOffset % 2 === 0 ? read : Uint8Array.from(read);
    out.set(new Uint16Array(bytes.buffer, bytes.byteOffset, entry.length));
  }
  return out;
}

/** Reads a spilled array's file (filesOf) as the array that was spilled. */
export function readSpilledFile(file: SpilledFile): Typed {
  return view(readFileSync(file.path), file.kind, file.length);
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
  let memory: ArrayMemory | undefined;

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
    const { kind, bytes } = toDisk(array);
    writeFileSync(path, bytes);
    entries.push({ path, kind, length: array.length });
    writtenBytes += bytes.byteLength;
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
    if (memory && entry.kind !== "u16") {
      const array = readIntoMemory(entry, memory);
      readBytes += entry.kind === "f32-u16" ? entry.length * 2 : array.byteLength;
      return array;
    }
    const bytes = readFileSync(entry.path);
    readBytes += bytes.byteLength;
    const array = view(bytes, entry.kind, entry.length);
    remember(key, array);
    return array;
  };

  // The keys of fields spilled as lists of arrays, by object and field.
  const listed = new WeakMap<object, Map<string, number[]>>();

  /** obj[field] as a getter over spilled arrays (`keys`, a list when `isList`); a later assignment stores in memory again. */
  const readThrough = <T extends object>(obj: T, field: keyof T & string, keys: number[], isList: boolean) => {
    if (isList) {
      if (!listed.has(obj)) listed.set(obj, new Map());
      listed.get(obj)!.set(field, keys);
      if (field === "planes") markPlaneLengths(obj, keys.map((k) => entries[k].length));
    }
    const read = isList ? () => keys.map((k) => get(k)) : () => get(keys[0]);
    Object.defineProperty(obj, field, {
      configurable: true,
      enumerable: true,
      get: read,
      set: (next: unknown) => {
        listed.get(obj)?.delete(field);
        if (field === "planes") markPlaneLengths(obj, undefined);
        Object.defineProperty(obj, field, { value: next, writable: true, configurable: true, enumerable: true });
      },
    });
  };

  const spillField = <T extends object>(obj: T, field: keyof T & string) => {
    const value = obj[field] as unknown;
    if (value === undefined || value === null) return;
    const isList = Array.isArray(value);
    readThrough(obj, field, isList ? (value as Typed[]).map((a) => put(a)) : [put(value as Typed)], isList);
  };

  const adoptField = <T extends object>(obj: T, field: keyof T & string, files: SpilledFile[]) => {
    const keys = files.map((file) => {
      if (dirname(file.path) !== dir) throw new Error(`${file.path} is not in the spill's folder`);
      entries.push({ path: file.path, kind: file.kind, length: file.length });
      writtenBytes += file.length * (file.kind === "f32" ? 4 : file.kind === "u8" ? 1 : 2);
      return entries.length - 1;
    });
    readThrough(obj, field, keys, true);
  };

  const filesOf = <T extends object>(obj: T, field: keyof T & string) => {
    const keys = listed.get(obj)?.get(field);
    if (!keys || keys.some((k) => entries[k].kind !== "f32" && entries[k].kind !== "f32-u16")) return undefined;
    return keys.map((k) => ({ path: entries[k].path, kind: entries[k].kind, length: entries[k].length }));
  };

  return {
    dir,
    put,
    get,
    spillField,
    adoptField,
    filesOf,
    readInto: (next) => {
      memory = next;
    },
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

/** Makes the prepared frame's luminance read the linearized frame's (which prepareFrame shares); an assignment keeps its own value. */
function followLinearLuminance(prepared: PreparedFrame): void {
  const { linear } = prepared;
  Object.defineProperty(prepared, "luminance", {
    configurable: true,
    enumerable: true,
    get: () => linear.luminance,
    set: (next: Float32Array) => Object.defineProperty(prepared, "luminance", { value: next, writable: true, configurable: true, enumerable: true }),
  });
}

/** Keeps a prepared frame's pixel arrays on disk; a luminance shared with the linearized frame is written once. */
export function spillPrepared(spill: FrameSpill, prepared: PreparedFrame): PreparedFrame {
  const { linear } = prepared;
  const shared = prepared.luminance === linear.luminance;
  for (const field of ["luminance", "clipped", "noiseFloor", "masked", "planes"] as const) spill.spillField(linear, field);
  if (!shared) spill.spillField(prepared, "luminance");
  else followLinearLuminance(prepared);
  return prepared;
}

/**
 * Prepared frames made again from their frames when read, the most recent few kept
 * (least recently used first out), shared by a reduction's frames.
 */
export interface RemadeFrames {
  /** The frame made again by `make`, or the copy kept from the last time. */
  get: (key: object, make: () => PreparedFrame) => PreparedFrame;
  /** How many frames were made again. */
  stats: () => { made: number };
  clear: () => void;
}

export function createRemadeFrames(capacity = 2): RemadeFrames {
  // Map keeps insertion order: the first key is the least recently used.
  const kept = new Map<object, PreparedFrame>();
  let made = 0;
  return {
    get(key, make) {
      const hit = kept.get(key);
      if (hit) {
        kept.delete(key);
        kept.set(key, hit);
        return hit;
      }
      const fresh = make();
      made++;
      kept.set(key, fresh);
      for (const k of kept.keys()) {
        if (kept.size <= capacity) break;
        kept.delete(k);
      }
      return fresh;
    },
    stats: () => ({ made }),
    clear: () => kept.clear(),
  };
}

/**
 * Lets a prepared frame's pixel arrays (luminance, clipped and noise-floor masks, and
 * an encoded frame's linear planes) go, and makes them again from the frame when a
 * stage reads them: `make` must linearize as the first preparation did, so that
 * the arrays are the same, bit for bit. For brackets whose prepared arrays would not
 * fit on the scratch disk beside their frames. The defect mask stays (the bracket's
 * one map), and a field assigned later keeps its new value, as a spilled one does.
 */
export function remakePreparedOnRead(prepared: PreparedFrame, make: () => PreparedFrame, remade: RemadeFrames): PreparedFrame {
  const { linear } = prepared;
  // Read before the fields turn into getters, which would make the frame again.
  const shared = prepared.luminance === linear.luminance;
  const fresh = () => remade.get(prepared, make).linear;
  const fields: ("luminance" | "clipped" | "noiseFloor" | "planes")[] = ["luminance", "clipped", "noiseFloor"];
  if (linear.planes.length > 0) fields.push("planes");
  for (const field of fields) {
    Object.defineProperty(linear, field, {
      configurable: true,
      enumerable: true,
      get: () => fresh()[field],
      set: (next: unknown) => Object.defineProperty(linear, field, { value: next, writable: true, configurable: true, enumerable: true }),
    });
  }
  // The frame's luminance is the linearized frame's (prepareFrame shares them); one kept apart stays in memory.
  if (shared) followLinearLuminance(prepared);
  return prepared;
}

/** Where prepared arrays live between stages: beside their frames on disk, made again when read, or chosen by the free space. */
export type PreparedFramesChoice = "auto" | "on-disk" | "made-again";

/** What the prepared arrays' size follows from: a frame's size, encoding and colour planes (given, so that spilled planes are not read to count them). */
export interface PreparedSize {
  width: number;
  height: number;
  encoding: LinearFrame["encoding"];
  planeCount: number;
}

/** Bytes a frame's prepared arrays take on disk: luminance (float32), clipped and noise-floor masks, and an encoded frame's linear planes. */
export function preparedBytesOf(frame: PreparedSize): number {
  return frame.width * frame.height * (4 + 1 + 1 + (frame.encoding === "linear" ? 0 : 4 * frame.planeCount));
}

/**
 * "auto": on disk when the prepared arrays of all the frames take at most half of the
 * free space in `scratchDir` (the rest is left to the warp cache and the outputs), made
 * again otherwise; no figure for the free space keeps them on disk.
 */
export function choosePreparedFrames(asked: PreparedFramesChoice, frames: readonly PreparedSize[], scratchDir: string): "on-disk" | "made-again" {
  if (asked !== "auto") return asked;
  const needed = frames.reduce((sum, f) => sum + preparedBytesOf(f), 0);
  let free: number;
  try {
    const fs = statfsSync(scratchDir);
    free = fs.bavail * fs.bsize;
  } catch {
    return "on-disk";
  }
  return needed <= free / 2 ? "on-disk" : "made-again";
}
