// The file format a reduction's parts hand each other (lib/reduction-flow/work-blob.ts):
// values come back as they went in, typed arrays bit for bit, non-finite numbers kept,
// and a file on disk is read one array at a time, only when its field is read.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { afterAll, describe, expect, it } from "vitest";
import { checkFrameShape } from "@/lib/imaging/linearize";
import { readPlaneLengths, type LinearFrame } from "@/lib/imaging/types";
import { createArrayCache, decodeWork, encodeWork, encodeWorkChunks, readWorkFile, readWorkStream, writeWorkFile } from "@/lib/reduction-flow/work-blob";
import { sliceKept, MAX_MERGE_SLICES, MIN_FRAMES_PER_SLICE } from "@/lib/reduction-flow/reduction-flow";

const dir = mkdtempSync(join(tmpdir(), "crownlight-work-blob-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function sample() {
  return {
    name: "frame-03.fits",
    exposureS: 1 / 250,
    limb: { x: NaN, y: Infinity, radiusPx: -Infinity, verdict: "failed", reasons: ["no edge"] },
    image: { width: 3, height: 2, planes: [Float32Array.from([1.5, -2, 3e-8, 4, 5, 6]), Float32Array.from([0, 0, 0, 0, 0, 7])] },
    badPixels: Uint8Array.from([0, 1, 0, 0, 1, 0]),
    coverage: Uint16Array.from([65535, 2, 3]),
    worst: { frame: Int16Array.from([-1, 4]), weights: [Float64Array.from([1 / 3, 1e-300])] },
    table: Float64Array.from([0.1, 0.2]),
    skip: undefined,
    fn: () => 1,
  };
}

describe("a reduction's work file", () => {
  it("gives back the value: arrays of every kind bit for bit, NaN and infinities, nested lists", () => {
    const back = decodeWork<ReturnType<typeof sample>>(encodeWork(sample()));
    const want = sample();
    expect(back.name).toBe(want.name);
    expect(back.exposureS).toBe(want.exposureS);
    expect(back.limb.x).toBeNaN();
    expect(back.limb.y).toBe(Infinity);
    expect(back.limb.radiusPx).toBe(-Infinity);
    expect(back.limb.reasons).toEqual(["no edge"]);
    expect(back.image.planes[0]).toEqual(want.image.planes[0]);
    expect(back.image.planes[1]).toBeInstanceOf(Float32Array);
    expect(back.badPixels).toEqual(want.badPixels);
    expect(back.coverage).toEqual(want.coverage);
    expect(back.worst.frame).toEqual(want.worst.frame);
    expect(back.worst.weights[0]).toEqual(want.worst.weights[0]);
    expect(back.table).toBeInstanceOf(Float64Array);
    expect("skip" in back).toBe(false);
    expect("fn" in back).toBe(false);
  });

  it("reads a file's arrays only when their fields are read, through the cache", () => {
    const path = join(dir, "frame.bin");
    writeFileSync(path, encodeWork(sample()));
    const reads: string[] = [];
    const cache = createArrayCache(1024);
    const back = readWorkFile<ReturnType<typeof sample>>(path, (key, read) => {
      reads.push(key);
      return cache(key, read);
    });
    expect(back.image.width).toBe(3);
    expect(reads).toEqual([]);
    // The planes' lengths are known without reading them: a frame's shape is checked from the file's header.
    expect(readPlaneLengths(back.image)).toEqual([6, 6]);
    // This sample has two planes: the check refuses it, naming the count, and still reads none.
    const frame = { name: "frame.bin", exposureS: 1, blackLevel: 0, whiteLevel: 65535, encoding: "linear", image: back.image } as LinearFrame;
    expect(() => checkFrameShape(frame)).toThrow(/1 or 3 planes, got 2/);
    expect(reads).toEqual([]);
    expect(back.image.planes[1][5]).toBe(7);
    expect(reads).toHaveLength(2);
    expect(back.badPixels[4]).toBe(1);
    expect(reads).toHaveLength(3);
    // A field assigned anew holds the new value.
    back.badPixels = new Uint8Array(6);
    expect(back.badPixels[4]).toBe(0);
  });

  it("stores a float32 plane of whole counts 0 to 65535 in half the bytes and gives back the same values", () => {
    const counts = Float32Array.from({ length: 10_000 }, (_, i) => (i * 7919) % 65536);
    const packed = encodeWork({ planes: [counts] });
    const plain = encodeWork({ planes: [Float32Array.from(counts, (v, i) => (i === 5000 ? v + 0.5 : v))] });
    expect(packed.length).toBeLessThan(plain.length * 0.55);
    const back = decodeWork<{ planes: Float32Array[] }>(packed);
    expect(back.planes[0]).toBeInstanceOf(Float32Array);
    expect(back.planes[0]).toEqual(counts);
    const path = join(dir, "counts.bin");
    writeFileSync(path, packed);
    expect(readWorkFile<{ planes: Float32Array[] }>(path).planes[0]).toEqual(counts);
    // Anything uint16 cannot hold exactly stays float32, bit for bit: a fraction, a negative value, -0, more than 65535.
    for (const odd of [0.5, -1, -0, 65536]) {
      const values = Float32Array.from(counts);
      values[1234] = odd;
      const again = decodeWork<{ planes: Float32Array[] }>(encodeWork({ planes: [values] })).planes[0];
      expect(Object.is(again[1234], odd)).toBe(true);
      expect(encodeWork({ planes: [values] }).length).toBeGreaterThan(plain.length * 0.95);
    }
  });

  it("writes a file array by array with encodeWork's bytes, packed planes and odd lengths included", () => {
    const counts = Float32Array.from({ length: 10_001 }, (_, i) => (i * 7919) % 65536);
    // Odd byte lengths (a Uint8Array of 7, a packed plane of 10 001 values) end in alignment padding.
    const value = { ...sample(), counts, tail: Uint8Array.from([1, 2, 3, 4, 5, 6, 7]) };
    const path = join(dir, "written.bin");
    const length = writeWorkFile(path, value);
    const written = readFileSync(path);
    expect(written.length).toBe(length);
    expect(written.equals(encodeWork(value))).toBe(true);
    const back = readWorkFile<typeof value>(path);
    expect(back.counts).toEqual(counts);
    expect(back.tail).toEqual(value.tail);
  });

  it("gives encodeWork's bytes as chunks, padding included, with their length", () => {
    const counts = Float32Array.from({ length: 10_001 }, (_, i) => (i * 7919) % 65536);
    const value = { ...sample(), counts, tail: Uint8Array.from([1, 2, 3, 4, 5, 6, 7]) };
    const encoded = encodeWorkChunks(value);
    const joined = Buffer.concat([...encoded.chunks()]);
    expect(joined.length).toBe(encoded.length);
    expect(joined.equals(encodeWork(value))).toBe(true);
    // Each call makes the chunks afresh.
    expect(Buffer.concat([...encoded.chunks()]).equals(joined)).toBe(true);
  });

  it("reads a file as it streams in, chunks cut anywhere, float32 and uint8 arrays into the memory given", async () => {
    const counts = Float32Array.from({ length: 10_001 }, (_, i) => (i * 7919) % 65536);
    const value = { ...sample(), counts, tail: Uint8Array.from([1, 2, 3, 4, 5, 6, 7]) };
    const bytes = encodeWork(value);
    const expected = decodeWork<typeof value>(bytes);
    // Chunks of 1, 7 and 4096 bytes: a header, a padding or an array may end anywhere in one.
    async function* chunksOf(size: number, of = bytes) {
      for (let at = 0; at < of.length; at += size) yield of.subarray(at, at + size);
    }
    for (const size of [1, 7, 4096]) expect(await readWorkStream(chunksOf(size), "the piece")).toEqual(expected);
    const handed: ArrayBufferView[] = [];
    const back = await readWorkStream<typeof value>(chunksOf(4096), "the piece", {
      float32: (length) => { const a = new Float32Array(new SharedArrayBuffer(4 * length)); handed.push(a); return a; },
      uint8: (length) => { const a = new Uint8Array(new SharedArrayBuffer(length)); handed.push(a); return a; },
    });
    expect(back).toEqual(expected);
    // The planes, the defect mask, the packed counts (widened there) and the tail; the other kinds have arrays of their own.
    expect(handed).toEqual([...back.image.planes, back.badPixels, back.counts, back.tail]);
    expect(back.image.planes[0].buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(back.coverage.buffer).not.toBeInstanceOf(SharedArrayBuffer);
    // Cut short in its data, or in its header, or no work file at all: refused, naming the piece.
    await expect(readWorkStream(chunksOf(4096, bytes.subarray(0, bytes.length - 64)), "the piece \"frame-3\"")).rejects.toThrow('the piece "frame-3" is cut short');
    await expect(readWorkStream(chunksOf(5, bytes.subarray(0, 20)), "the piece")).rejects.toThrow("the piece is cut short in its header");
    await expect(readWorkStream(chunksOf(5, Buffer.from("hello, this is text")), "the piece")).rejects.toThrow("the piece is not a reduction work file");
  });

  it("lets a stream go when it refuses it, and refuses a layout past the stream's length before allocating it", async () => {
    const bytes = encodeWork({ ...sample(), counts: Float32Array.from({ length: 5000 }, (_, i) => i) });
    // Not a work file: refused, and the body (an S3 response's stream) destroyed, so its connection is freed.
    const text = Readable.from([Buffer.from("hello, this is text, and more of it")]);
    await expect(readWorkStream(text, "the piece")).rejects.toThrow("the piece is not a reduction work file");
    expect(text.destroyed).toBe(true);
    // A stream that fails (a connection reset) fails with its own fault, not as a format error.
    const reset = new Readable({ read() { this.destroy(Object.assign(new Error("read ECONNRESET"), { code: "ECONNRESET" })); } });
    await expect(readWorkStream(reset, "the piece")).rejects.toThrow("read ECONNRESET");
    // A header that claims 4 GB, or an array past the object's length: refused before anything of that size is made.
    const huge = Buffer.from(bytes);
    huge.writeUInt32LE(0xffffffff, 8);
    const claimsHuge = Readable.from([huge]);
    await expect(readWorkStream(claimsHuge, "the piece", undefined, huge.length)).rejects.toThrow("the piece is cut short in its header");
    expect(claimsHuge.destroyed).toBe(true);
    await expect(readWorkStream(Readable.from([bytes.subarray(0, bytes.length - 64)]), "the piece", undefined, bytes.length - 64)).rejects.toThrow(/the piece is cut short: an array runs past its \d+ bytes/);
    // The same for a file on disk.
    const path = join(dir, "short-array.bin");
    writeFileSync(path, bytes.subarray(0, bytes.length - 64));
    expect(() => readWorkFile(path)).toThrow(/short-array\.bin is cut short: an array runs past/);
  });

  it("refuses a file that is not one, naming it", () => {
    const path = join(dir, "not.bin");
    writeFileSync(path, "hello, this is text");
    expect(() => readWorkFile(path)).toThrow(/not\.bin is not a reduction work file/);
    expect(() => decodeWork(Buffer.from("CLWORK1\n\xff\xff\x00\x00{"), "piece")).toThrow(/piece is cut short/);
  });
});

describe("the merge's slices of kept frames", () => {
  it("cover every position once, in order, at most MAX_MERGE_SLICES of at least MIN_FRAMES_PER_SLICE", () => {
    for (const count of [1, 2, 3, 4, 7, 9, 24, 25, 81, 200, 500]) {
      const slices = sliceKept(count);
      expect(slices[0].from).toBe(0);
      expect(slices.at(-1)!.to).toBe(count);
      slices.forEach((s, i) => i > 0 && expect(s.from).toBe(slices[i - 1].to));
      expect(slices.length).toBeLessThanOrEqual(MAX_MERGE_SLICES);
      if (slices.length > 1) expect(Math.min(...slices.map((s) => s.to - s.from))).toBeGreaterThanOrEqual(MIN_FRAMES_PER_SLICE - 1);
    }
    expect(sliceKept(7).map((s) => s.to - s.from)).toEqual([2, 2, 3]);
  });
});
