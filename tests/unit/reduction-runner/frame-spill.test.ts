// Frames kept on disk between stages (frame-spill.ts) must not change the
// reduction: the same bracket reduced both ways gives the same master, bit for
// bit, and the same per-frame report. The spill store's own contract is tested
// on small arrays.
import { readFileSync, rmSync } from "node:fs";
import { basename, join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readPlaneLengths, type PlaneImage } from "@/lib/imaging/types";
import { runReductionOnFiles } from "@/lib/reduction-runner";
import { createFrameSpill, readSpilledFile } from "@/lib/reduction-runner/frame-spill";
import { writeBracketFixture, type BracketFixture } from "./bracket-fixture";

describe("the spill store", () => {
  it("gives back what was put, by type, through a small cache, and deletes its files", () => {
    const spill = createFrameSpill({ cacheBytes: 64 });
    const a = Float32Array.from({ length: 10 }, (_, i) => i / 3);
    const b = Uint8Array.from([1, 0, 1, 1]);
    const ka = spill.put(a);
    const kb = spill.put(b);
    const back = spill.get(ka);
    expect(back).toBeInstanceOf(Float32Array);
    expect(Array.from(back)).toEqual(Array.from(a));
    expect(Array.from(spill.get(kb))).toEqual([1, 0, 1, 1]);
    // The cache holds 64 bytes: the 40-byte float array and the 4 bytes stay; the next read is a hit.
    const before = spill.stats().readBytes;
    spill.get(ka);
    expect(spill.stats().readBytes).toBe(before);
    const obj = { planes: [a, a], mask: b };
    spill.spillField(obj, "planes");
    spill.spillField(obj, "mask");
    expect(obj.planes).toHaveLength(2);
    expect(Array.from(obj.planes[1])).toEqual(Array.from(a));
    // A budget of 0 empties the cache: every read goes to disk; a budget again caches again.
    spill.setCacheBytes(0);
    expect(spill.stats().cachedBytes).toBe(0);
    const misses = spill.stats().readBytes;
    spill.get(kb);
    spill.get(kb);
    expect(spill.stats().readBytes).toBe(misses + 8);
    spill.setCacheBytes(64);
    spill.get(kb);
    spill.get(kb);
    expect(spill.stats().readBytes).toBe(misses + 12);
    expect(spill.stats().cachedBytes).toBe(4);
    obj.mask = Uint8Array.from([9]);
    expect(Array.from(obj.mask)).toEqual([9]);
    spill.close();
    expect(() => spill.get(99)).toThrow(/does not exist/);
  });
});

describe("the spill store's float arrays of whole counts", () => {
  it("keeps a decoded frame's counts as 16 bits on disk and gives back the same float32 values; anything else stays float32", () => {
    const spill = createFrameSpill({ cacheBytes: 0 });
    // Whole counts 0 to 65535, the range of a 16-bit file's decoded planes, with both ends.
    const counts = Float32Array.from({ length: 1000 }, (_, i) => (i * 6553.5) % 65536 | 0);
    counts[0] = 0;
    counts[1] = 65535;
    const k = spill.put(counts);
    expect(spill.stats().writtenBytes).toBe(2 * counts.length);
    const back = spill.get(k);
    expect(back).toBeInstanceOf(Float32Array);
    expect(Array.from(back)).toEqual(Array.from(counts));
    // One value off the whole counts (a fraction, a negative, beyond 16 bits, NaN) keeps the array in float32.
    for (const odd of [0.5, -1, 65536, Number.NaN]) {
      const before = spill.stats().writtenBytes;
      const values = Float32Array.from(counts);
      values[500] = odd;
      const key = spill.put(values);
      expect(spill.stats().writtenBytes - before, String(odd)).toBe(4 * values.length);
      const again = spill.get(key) as Float32Array;
      expect(Object.is(again[500], Math.fround(odd)), String(odd)).toBe(true);
      expect(again[499]).toBe(values[499]);
    }
    // Past the first values looked at before a packed copy is made, one odd value still keeps float32.
    const long = Float32Array.from({ length: 10_000 }, (_, i) => i % 65536);
    long[9000] = 0.5;
    const before = spill.stats().writtenBytes;
    expect(spill.get(spill.put(long))[9000]).toBe(0.5);
    expect(spill.stats().writtenBytes - before).toBe(4 * long.length);
    // Another thread reads the files of a spilled field itself, in either form.
    const obj = { planes: [counts, Float32Array.from([0.25, 1.5])] };
    spill.spillField(obj, "planes");
    const files = spill.filesOf(obj, "planes")!;
    expect(files.map((f) => f.kind)).toEqual(["f32-u16", "f32"]);
    expect(Array.from(readSpilledFile(files[0]))).toEqual(Array.from(counts));
    expect(Array.from(readSpilledFile(files[1]))).toEqual([0.25, 1.5]);
    // The planes' lengths are known without reading them back; an assignment drops the mark with the getter.
    const read = spill.stats().readBytes;
    expect(readPlaneLengths(obj as unknown as PlaneImage)).toEqual([1000, 2]);
    expect(spill.stats().readBytes).toBe(read);
    obj.planes = [new Float32Array(3)];
    expect(readPlaneLengths(obj as unknown as PlaneImage)).toEqual([3]);
    spill.close();
  });
});

let fixture: BracketFixture;
beforeAll(async () => {
  fixture = await writeBracketFixture();
}, 180_000);
afterAll(() => rmSync(join(fixture.dir, ".."), { recursive: true, force: true }));

describe("the spill store's reads into memory of the caller's", () => {
  it("reads float32 (whole counts or not) and uint8 arrays into the memory given, the same values, never cached, until told to stop", () => {
    const spill = createFrameSpill({ cacheBytes: 1024 });
    const counts = Float32Array.from({ length: 5000 }, (_, i) => (i * 37) % 65536);
    const light = Float32Array.from({ length: 6 }, (_, i) => i / 7 - 0.25);
    const mask = Uint8Array.from([0, 1, 1, 0, 1]);
    // A short array of whole counts: a small file's buffer may sit at any offset of Buffer's pool.
    const small = Float32Array.from([3, 65535, 0]);
    const keys = [counts, light, mask, small].map((a) => spill.put(a));
    const handed: ArrayBufferView[] = [];
    spill.readInto({
      float32: (length) => { const a = new Float32Array(new SharedArrayBuffer(4 * length)); handed.push(a); return a; },
      uint8: (length) => { const a = new Uint8Array(new SharedArrayBuffer(length)); handed.push(a); return a; },
    });
    const got = keys.map((k) => spill.get(k));
    expect(got.map((a) => a.buffer instanceof SharedArrayBuffer)).toEqual([true, true, true, true]);
    expect(got).toEqual(handed);
    expect(got[0]).toBeInstanceOf(Float32Array);
    expect(Array.from(got[0])).toEqual(Array.from(counts));
    expect(Array.from(got[1])).toEqual(Array.from(light));
    expect(got[2]).toBeInstanceOf(Uint8Array);
    expect(Array.from(got[2])).toEqual([0, 1, 1, 0, 1]);
    expect(Array.from(got[3])).toEqual([3, 65535, 0]);
    // Nothing read into the caller's memory is cached: the caller may reuse it.
    expect(spill.stats().cachedBytes).toBe(0);
    expect(spill.get(keys[1])).not.toBe(got[1]);
    spill.readInto(undefined);
    const own = spill.get(keys[1]);
    expect(own.buffer instanceof SharedArrayBuffer).toBe(false);
    expect(Array.from(own)).toEqual(Array.from(light));
    spill.close();
  });
});

describe("a reduction with its frames kept on disk", () => {
  it("gives the same master and report as one held in memory", async () => {
    const files = fixture.filesOf("tiff");
    const exposureOverrides = new Map(files.map((f, k) => [basename(f), fixture.exposuresS[k]]));
    const counts = new Map<string, { done: number; total: number }[]>();
    const run = (spill: "always" | "never", preparedFrames?: "on-disk" | "made-again") =>
      runReductionOnFiles({
        files, outDir: join(fixture.dir, "..", `spill-${spill}-${preparedFrames ?? "auto"}`), registration: "corona", exposureOverrides, spill, preparedFrames,
        onProgress: (stage, _fraction, frames) => {
          if (spill === "always" && preparedFrames === "on-disk" && frames) counts.set(stage, [...(counts.get(stage) ?? []), frames]);
        },
      });
    const inMemory = await run("never");
    const onDisk = await run("always", "on-disk");
    // The prepared arrays made again from each frame when read, as for a bracket whose arrays would not fit on the scratch disk.
    const remade = await run("always", "made-again");
    expect(inMemory.scratch.preparedFrames).toBe("in-memory");
    expect(onDisk.scratch.preparedFrames).toBe("on-disk");
    expect(remade.scratch.preparedFrames).toBe("made-again");
    expect(remade.scratch.framesMadeAgain).toBeGreaterThanOrEqual(files.length);
    // Only the frames' counts went to disk (16 bits a sample), not the prepared arrays beside them.
    expect(remade.scratch.writtenBytes).toBeLessThan(onDisk.scratch.writtenBytes);
    // Stages that work frame by frame say how many frames they have done, ending at all of them.
    for (const stage of ["decode", "limb", "merge-pilot", "merge"]) {
      const seen = counts.get(stage) ?? [];
      expect(seen.length, stage).toBeGreaterThan(0);
      expect(seen.at(-1), stage).toEqual({ done: files.length, total: files.length });
      expect(seen.every((c, k) => k === 0 || c.done >= seen[k - 1].done), stage).toBe(true);
    }
    const masterOf = (dir: string) => readFileSync(join(dir, "master.fits"));
    const a = masterOf(inMemory.outDir);
    const b = masterOf(onDisk.outDir);
    // The header differs only in the creation time; the data units must be equal byte for byte.
    const dataStart = (buf: Buffer) => {
      const text = buf.toString("latin1");
      const end = text.search(/END {77}/);
      return Math.ceil((end + 80) / 2880) * 2880;
    };
    expect(b.length).toBe(a.length);
    expect(b.subarray(dataStart(b)).equals(a.subarray(dataStart(a)))).toBe(true);
    const c = masterOf(remade.outDir);
    expect(c.subarray(dataStart(c)).equals(a.subarray(dataStart(a)))).toBe(true);
    const strip = (r: typeof inMemory.report) => JSON.stringify(r.frames);
    expect(strip(onDisk.report)).toBe(strip(inMemory.report));
    expect(strip(remade.report)).toBe(strip(inMemory.report));
  }, 450_000);
});
