// One file format for what a reduction's parts hand each other through S3: a
// value of plain data (numbers, strings, nested objects and arrays) whose typed
// arrays travel as raw bytes beside a JSON header. Non-finite numbers survive
// (JSON alone turns NaN into null); functions and undefined fields are dropped.
//
// Layout: "CLWORK1\n", the header's length (uint32, little-endian), the header
// (UTF-8 JSON), then each array's bytes at an 8-byte-aligned offset. Arrays are
// read back as views on one aligned buffer, or one at a time from a file on disk
// (readWorkFile), so that a stage holding many frames reads only what it touches.
// A float32 array of whole numbers 0 to 65535 (an uncalibrated frame's counts) is
// stored as uint16 and read back as the same float32 values: half the bytes.
import { closeSync, fstatSync, ftruncateSync, openSync, readSync, writeSync } from "node:fs";
import type { ArrayMemory } from "@/lib/imaging/plane-runner";
import { markPlaneLengths } from "@/lib/imaging/types";

const MAGIC = "CLWORK1\n";
const ALIGN = 8;

type Typed = Float32Array | Float64Array | Uint8Array | Uint16Array | Int16Array | Int32Array | Uint32Array;
const KINDS = {
  f32: Float32Array,
  f64: Float64Array,
  u8: Uint8Array,
  u16: Uint16Array,
  i16: Int16Array,
  i32: Int32Array,
  u32: Uint32Array,
} as const;
type Kind = keyof typeof KINDS;

interface ArrayEntry {
  kind: Kind;
  length: number;
  offset: number;
  /** "u16": a float32 array of whole numbers 0 to 65535 (a frame's raw counts) stored as uint16, read back as float32. */
  packed?: "u16";
}

/** Float32 arrays at least this long are checked for packing; short ones are not worth the scan. */
const PACK_MIN_LENGTH = 4096;

/** True when every value is a whole number from 0 to 65535 (and none is -0), so uint16 holds it exactly. */
function fitsUint16(a: Float32Array): boolean {
  for (let i = 0; i < a.length; i++) {
    const v = a[i];
    const u = v & 0xffff;
    if (u !== v || (u === 0 && 1 / v < 0)) return false;
  }
  return true;
}

function storedBytes(a: Typed, packed: boolean): number {
  return packed ? a.length * 2 : a.byteLength;
}

function unpack(stored: Uint16Array): Float32Array {
  const out = new Float32Array(stored.length);
  for (let i = 0; i < stored.length; i++) out[i] = stored[i];
  return out;
}

interface Header {
  value: unknown;
  arrays: ArrayEntry[];
}

function kindOf(array: Typed): Kind {
  for (const [kind, ctor] of Object.entries(KINDS)) if (array instanceof ctor) return kind as Kind;
  throw new Error(`cannot store an array of ${array.constructor.name}`);
}

function isTyped(value: unknown): value is Typed {
  return ArrayBuffer.isView(value) && !(value instanceof DataView);
}

/** The value as JSON-safe data, its typed arrays replaced by {$a: index} and non-finite numbers by {$n: "NaN"}. */
function flatten(value: unknown, arrays: Typed[]): unknown {
  if (typeof value === "number") return Number.isFinite(value) ? value : { $n: String(value) };
  if (value === null || typeof value !== "object") return typeof value === "function" ? undefined : value;
  if (isTyped(value)) {
    arrays.push(value);
    return { $a: arrays.length - 1 };
  }
  if (Array.isArray(value)) return value.map((v) => flatten(v, arrays) ?? null);
  const out: Record<string, unknown> = {};
  // Object.keys reads getters too: a frame whose planes live on disk is written as its data.
  for (const key of Object.keys(value)) {
    const v = flatten((value as Record<string, unknown>)[key], arrays);
    if (v !== undefined) out[key] = v;
  }
  return out;
}

/** A value laid out as a work file: the bytes before the data section, each array's entry, the file's length. */
function layOut(value: unknown): { head: Buffer; arrays: Typed[]; entries: ArrayEntry[]; dataStart: number; total: number } {
  const arrays: Typed[] = [];
  const flat = flatten(value, arrays);
  const entries: ArrayEntry[] = [];
  // Offsets are relative to the start of the data section, which itself starts aligned.
  let offset = 0;
  for (const a of arrays) {
    const packed = a instanceof Float32Array && a.length >= PACK_MIN_LENGTH && fitsUint16(a);
    entries.push({ kind: kindOf(a), length: a.length, offset, ...(packed ? { packed: "u16" as const } : {}) });
    offset += Math.ceil(storedBytes(a, packed) / ALIGN) * ALIGN;
  }
  const header = Buffer.from(JSON.stringify({ value: flat, arrays: entries } satisfies Header), "utf8");
  const headEnd = MAGIC.length + 4 + header.length;
  const dataStart = Math.ceil(headEnd / ALIGN) * ALIGN;
  const head = Buffer.alloc(dataStart);
  head.write(MAGIC, 0, "latin1");
  head.writeUInt32LE(header.length, MAGIC.length);
  header.copy(head, MAGIC.length + 4);
  return { head, arrays, entries, dataStart, total: dataStart + offset };
}

/** An array's bytes as stored (packed ones as uint16: a copy of the array's size in uint16). */
function storedView(array: Typed, entry: ArrayEntry): Uint8Array {
  const bytes = entry.packed ? Uint16Array.from(array as Float32Array) : array;
  return new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

/** Encodes a value with its typed arrays. */
export function encodeWork(value: unknown): Buffer {
  const { head, arrays, entries, dataStart, total } = layOut(value);
  const out = Buffer.alloc(total);
  head.copy(out, 0);
  arrays.forEach((a, i) => out.set(storedView(a, entries[i]), dataStart + entries[i].offset));
  return out;
}

/**
 * encodeWork's bytes as a sequence of chunks (the head, then each array as stored
 * and its alignment's zeros), with their length in all: for a stream to S3 that
 * never holds a copy of the whole value. A packed array is copied to 16 bits when
 * its turn comes, one at a time.
 */
export function encodeWorkChunks(value: unknown): { length: number; chunks: () => Generator<Uint8Array> } {
  const { head, arrays, entries, dataStart, total } = layOut(value);
  return {
    length: total,
    *chunks() {
      yield head;
      let at = dataStart;
      for (let i = 0; i < arrays.length; i++) {
        const start = dataStart + entries[i].offset;
        if (start > at) yield new Uint8Array(start - at);
        const bytes = storedView(arrays[i], entries[i]);
        yield bytes;
        at = start + bytes.length;
      }
      if (total > at) yield new Uint8Array(total - at);
    },
  };
}

/**
 * encodeWork's bytes written to a file, one array at a time, so that no copy of the
 * whole value is made (a merge's accumulator at 24 megapixels is 600 MB); returns the
 * file's length.
 */
export function writeWorkFile(path: string, value: unknown): number {
  const { head, arrays, entries, dataStart, total } = layOut(value);
  const fd = openSync(path, "w");
  try {
    const writeAt = (bytes: Uint8Array, position: number) => {
      for (let done = 0; done < bytes.length;) done += writeSync(fd, bytes, done, bytes.length - done, position + done);
    };
    writeAt(head, 0);
    arrays.forEach((a, i) => writeAt(storedView(a, entries[i]), dataStart + entries[i].offset));
    // The alignment after the last array is zeros, as in encodeWork's buffer.
    ftruncateSync(fd, total);
  } finally {
    closeSync(fd);
  }
  return total;
}

function readHeader(head: Buffer, what: string): { header: Header; dataStart: number } {
  if (head.length < MAGIC.length + 4 || head.toString("latin1", 0, MAGIC.length) !== MAGIC) throw new Error(`${what} is not a reduction work file`);
  const length = head.readUInt32LE(MAGIC.length);
  const headEnd = MAGIC.length + 4 + length;
  if (head.length < headEnd) throw new Error(`${what} is cut short in its header`);
  const header = JSON.parse(head.toString("utf8", MAGIC.length + 4, headEnd)) as Header;
  return { header, dataStart: Math.ceil(headEnd / ALIGN) * ALIGN };
}

/**
 * Refuses a header whose arrays do not fit a file of `total` bytes (or are not
 * whole, non-negative counts of a known kind) before anything is allocated for
 * them: a corrupt piece fails with its name, not with memory exhausted.
 */
function checkLayout(header: Header, dataStart: number, total: number, what: string): void {
  if (!Array.isArray(header.arrays)) throw new Error(`${what} has no list of arrays`);
  for (const e of header.arrays) {
    const ctor = e && e.packed === "u16" ? Uint16Array : e && KINDS[e.kind];
    if (!ctor || !Number.isSafeInteger(e.length) || e.length < 0 || !Number.isSafeInteger(e.offset) || e.offset < 0) throw new Error(`${what} describes an array it cannot hold`);
    if (dataStart + e.offset + e.length * ctor.BYTES_PER_ELEMENT > total) throw new Error(`${what} is cut short: an array runs past its ${total} bytes`);
  }
}

function rebuild(value: unknown, array: (index: number) => Typed, lazy: ((index: number) => () => Typed) | undefined, lengthOf?: (index: number) => number): unknown {
  if (value === null || typeof value !== "object") return value;
  if (Array.isArray(value)) return value.map((v) => rebuild(v, array, lazy, lengthOf));
  const record = value as Record<string, unknown>;
  if (typeof record.$n === "string" && Object.keys(record).length === 1) return Number(record.$n);
  if (typeof record.$a === "number" && Object.keys(record).length === 1) return array(record.$a);
  const out: Record<string, unknown> = {};
  for (const [key, v] of Object.entries(record)) {
    const ref = v as { $a?: unknown } | null;
    if (lazy && ref && typeof ref === "object" && !Array.isArray(ref) && typeof ref.$a === "number" && Object.keys(ref).length === 1) {
      // Read when first touched; a later assignment replaces the getter with the value.
      const read = lazy(ref.$a);
      Object.defineProperty(out, key, {
        configurable: true,
        enumerable: true,
        get: read,
        set: (next: unknown) => Object.defineProperty(out, key, { value: next, writable: true, configurable: true, enumerable: true }),
      });
    } else if (lazy && Array.isArray(v) && v.length > 0 && v.every((e) => e && typeof e === "object" && typeof (e as { $a?: unknown }).$a === "number")) {
      // A list of arrays (a frame's planes) is read together when first touched.
      const indices = v.map((e) => (e as { $a: number }).$a);
      const reads = indices.map((index) => lazy(index));
      Object.defineProperty(out, key, {
        configurable: true,
        enumerable: true,
        get: () => reads.map((r) => r()),
        set: (next: unknown) => {
          if (key === "planes") markPlaneLengths(out, undefined);
          Object.defineProperty(out, key, { value: next, writable: true, configurable: true, enumerable: true });
        },
      });
      if (key === "planes" && lengthOf) markPlaneLengths(out, indices.map(lengthOf));
    } else {
      out[key] = rebuild(v, array, lazy, lengthOf);
    }
  }
  return out;
}

/** Decodes a whole work file held in memory. Arrays are views on one aligned copy. */
export function decodeWork<T>(bytes: Buffer, what = "the work file"): T {
  const { header, dataStart } = readHeader(bytes, what);
  const aligned = new Uint8Array(bytes.length - dataStart);
  aligned.set(bytes.subarray(dataStart));
  const array = (index: number): Typed => {
    const e = header.arrays[index];
    if (!e) throw new Error(`${what} names an array it does not hold`);
    if (e.packed === "u16") return unpack(new Uint16Array(aligned.buffer, e.offset, e.length));
    return new KINDS[e.kind](aligned.buffer, e.offset, e.length);
  };
  return rebuild(header.value, array, undefined) as T;
}


/** Reads bytes [at, at + into.length) of an open file into `into`. */
function readAt(fd: number, into: Uint8Array, at: number, what: string): void {
  for (let done = 0; done < into.length;) {
    const n = readSync(fd, into, done, into.length - done, at + done);
    if (n === 0) throw new Error(`${what} is cut short`);
    done += n;
  }
}

/** The header of an open work file, its arrays checked against the file's size. */
function readHeaderOf(fd: number, what: string): { header: Header; dataStart: number } {
  const { size } = fstatSync(fd);
  const probe = Buffer.alloc(MAGIC.length + 4);
  const got = readSync(fd, probe, 0, probe.length, 0);
  const length = got === probe.length && probe.toString("latin1", 0, MAGIC.length) === MAGIC ? probe.readUInt32LE(MAGIC.length) : 0;
  // A file shorter than its header says is refused as cut short, with no buffer of the length it claims.
  const head = Buffer.alloc(Math.min(MAGIC.length + 4 + length, size));
  const read = readHeader(head.subarray(0, readSync(fd, head, 0, head.length, 0)), what);
  checkLayout(read.header, read.dataStart, size, what);
  return read;
}

/** One array of an open work file, read from its place in the file. */
function readArrayAt(fd: number, what: string, header: Header, dataStart: number, index: number): Typed {
  const e = header.arrays[index];
  if (!e) throw new Error(`${what} names an array it does not hold`);
  const at = dataStart + e.offset;
  if (e.packed === "u16") {
    const stored = new Uint16Array(e.length);
    readAt(fd, new Uint8Array(stored.buffer), at, what);
    return unpack(stored);
  }
  const out = new KINDS[e.kind](e.length);
  readAt(fd, new Uint8Array(out.buffer, out.byteOffset, out.byteLength), at, what);
  return out;
}

/** The stream ended before the bytes a reader wanted (told apart from the stream's own faults). */
class StreamEnded extends Error {}

/** Bytes taken from a stream of chunks in order: filled into arrays, or skipped. */
function createChunkReader(chunks: AsyncIterable<Uint8Array>, what: string) {
  const it = chunks[Symbol.asyncIterator]();
  let chunk: Uint8Array = new Uint8Array(0);
  let at = 0;
  let taken = 0;
  const next = async () => {
    const step = await it.next();
    if (step.done) throw new StreamEnded(`${what} is cut short`);
    chunk = step.value;
    at = 0;
  };
  return {
    /** Bytes taken so far. */
    taken: () => taken,
    async fill(into: Uint8Array): Promise<void> {
      for (let done = 0; done < into.length;) {
        if (at === chunk.length) await next();
        const n = Math.min(into.length - done, chunk.length - at);
        into.set(chunk.subarray(at, at + n), done);
        at += n;
        done += n;
        taken += n;
      }
    },
    async skip(count: number): Promise<void> {
      for (let done = 0; done < count;) {
        if (at === chunk.length) await next();
        const n = Math.min(count - done, chunk.length - at);
        at += n;
        done += n;
        taken += n;
      }
    },
    /** Reads on to the stream's end (a download must be taken whole). */
    async drain(): Promise<void> {
      for (let step = await it.next(); !step.done; step = await it.next()) taken += step.value.length;
    },
    /** Lets the stream go unread (a Node stream's iterator destroys it, and its socket goes back). */
    async abandon(): Promise<void> {
      await it.return?.();
    },
  };
}

/**
 * Decodes a work file as it streams in (an S3 object's body, `totalBytes` long
 * when known): the header, then each array in the file's order into an array
 * of its own, float32 and uint8 ones into `memory` when given (whole counts
 * widened there). No copy of the whole file is held and nothing goes to disk.
 * On any fault the stream is let go, so that its connection is not held.
 */
export async function readWorkStream<T>(chunks: AsyncIterable<Uint8Array>, what: string, memory?: ArrayMemory, totalBytes?: number): Promise<T> {
  const reader = createChunkReader(chunks, what);
  try {
    const probe = Buffer.alloc(MAGIC.length + 4);
    const ended = (err: unknown) => {
      if (!(err instanceof StreamEnded)) throw err;
    };
    await reader.fill(probe).catch(ended);
    if (reader.taken() < probe.length || probe.toString("latin1", 0, MAGIC.length) !== MAGIC) throw new Error(`${what} is not a reduction work file`);
    const headLength = MAGIC.length + 4 + probe.readUInt32LE(MAGIC.length);
    if (totalBytes !== undefined && headLength > totalBytes) throw new Error(`${what} is cut short in its header`);
    const head = Buffer.alloc(headLength);
    probe.copy(head);
    await reader.fill(head.subarray(probe.length)).catch((err: unknown) => {
      ended(err);
      throw new Error(`${what} is cut short in its header`);
    });
    const { header, dataStart } = readHeader(head, what);
    if (totalBytes !== undefined) checkLayout(header, dataStart, totalBytes, what);
    else checkLayout(header, dataStart, Number.MAX_SAFE_INTEGER, what);
    const order = header.arrays.map((_, index) => index).sort((a, b) => header.arrays[a].offset - header.arrays[b].offset);
    const arrays: Typed[] = new Array(header.arrays.length);
    for (const index of order) {
      const e = header.arrays[index];
      const start = dataStart + e.offset;
      if (start < reader.taken()) throw new Error(`${what} has arrays that overlap`);
      await reader.skip(start - reader.taken());
      if (e.packed === "u16") {
        const stored = new Uint16Array(e.length);
        await reader.fill(new Uint8Array(stored.buffer));
        if (memory) {
          const out = memory.float32(e.length);
          out.set(stored);
          arrays[index] = out;
        } else arrays[index] = unpack(stored);
        continue;
      }
      const out = memory && e.kind === "f32" ? memory.float32(e.length) : memory && e.kind === "u8" ? memory.uint8(e.length) : new KINDS[e.kind](e.length);
      await reader.fill(new Uint8Array(out.buffer, out.byteOffset, out.byteLength));
      arrays[index] = out;
    }
    await reader.drain();
    return rebuild(header.value, (index) => {
      const array = arrays[index];
      if (!array) throw new Error(`${what} names an array it does not hold`);
      return array;
    }, undefined) as T;
  } catch (err) {
    await reader.abandon().catch(() => undefined);
    throw err;
  }
}

/** How a lazily read array is kept: each read goes through here (a cache may keep it). */
export type ArrayReader = (key: string, read: () => Typed) => Typed;

/**
 * Decodes a work file on disk: small data at once, every array (or list of
 * arrays) read from the file only when its field is read, through `cache`.
 */
export function readWorkFile<T>(path: string, cache: ArrayReader = (_key, read) => read()): T {
  const fd = openSync(path, "r");
  try {
    const { header, dataStart } = readHeaderOf(fd, path);
    const lazy = (index: number) => () => cache(`${path}#${index}`, () => {
      const f = openSync(path, "r");
      try {
        return readArrayAt(f, path, header, dataStart, index);
      } finally {
        closeSync(f);
      }
    });
    return rebuild(header.value, (index) => lazy(index)(), lazy, (index) => header.arrays[index]?.length ?? NaN) as T;
  } finally {
    closeSync(fd);
  }
}

/**
 * An array cache for readWorkFile: keeps recently read arrays up to a byte
 * budget, least recently used out first.
 */
export function createArrayCache(budgetBytes: number): ArrayReader {
  const cache = new Map<string, Typed>();
  let bytes = 0;
  return (key, read) => {
    const hit = cache.get(key);
    if (hit) {
      cache.delete(key);
      cache.set(key, hit);
      return hit;
    }
    const array = read();
    if (array.byteLength <= budgetBytes) {
      cache.set(key, array);
      bytes += array.byteLength;
      for (const [k, a] of cache) {
        if (bytes <= budgetBytes) break;
        cache.delete(k);
        bytes -= a.byteLength;
      }
    }
    return array;
  };
}
