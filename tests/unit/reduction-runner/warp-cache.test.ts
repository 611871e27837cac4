// The merge's cache of warped bands on local disk (warp-cache.ts): what is put
// comes back once, by kind and length, into the caller's (longer) arrays; a
// frame that does not fit the budget is refused before anything is written; the
// files go when read and when the cache closes.
import { existsSync, mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { createWarpCache } from "@/lib/reduction-runner/warp-cache";

const parent = mkdtempSync(join(tmpdir(), "warp-cache-test-"));
afterAll(() => rmSync(parent, { recursive: true, force: true }));

describe("the merge's warp cache", () => {
  it("gives back each part once, into longer arrays, with the lengths put", () => {
    const cache = createWarpCache({ parentDir: parent, budgetBytes: 1000 });
    const plane = Float32Array.from([1.5, -2, 3e-8, NaN]);
    const mask = Uint8Array.from([1, 0, 1, 1]);
    expect(cache.reserve(0, 600)).toBe(true);
    // 600 of 1000 bytes taken: a second frame of 600 has no room, one of 400 has.
    expect(cache.reserve(1, 600)).toBe(false);
    expect(() => cache.put(1, 0, [plane])).toThrow(/no room for frame 2/);
    expect(cache.reserve(2, 400)).toBe(true);
    expect(cache.put(0, 3, [plane, mask, new Uint8Array(0)])).toBe(true);
    const into = [new Float32Array(6), new Uint8Array(6), new Uint8Array(6)];
    expect(cache.take(0, 3, into)).toEqual([4, 4, 0]);
    expect(Array.from(into[0].subarray(0, 4))).toEqual(Array.from(plane));
    expect(Array.from(into[1].subarray(0, 4))).toEqual([1, 0, 1, 1]);
    // Read once: the part and its file are gone.
    expect(cache.take(0, 3, into)).toBeUndefined();
    expect(cache.stats()).toEqual({ writtenBytes: 20, readBytes: 20 });
    cache.put(2, 1, [mask]);
    expect(() => cache.take(2, 1, [new Uint8Array(2)])).toThrow(/holds 4 bytes for array 0 of part 1 of frame 3/);
    const dirs = readdirSync(parent).filter((d) => d.startsWith("crownlight-warped-"));
    expect(dirs).toHaveLength(1);
    cache.close();
    expect(existsSync(join(parent, dirs[0]))).toBe(false);
  });

  it("lets a frame go whole when the disk refuses one of its parts", () => {
    const cache = createWarpCache({ parentDir: parent, budgetBytes: 1000 });
    expect(cache.reserve(0, 100)).toBe(true);
    expect(cache.put(0, 0, [Uint8Array.from([1, 2])])).toBe(true);
    // Its folder gone (as a disk that fails would refuse), the next part cannot be written.
    const dir = readdirSync(parent).find((d) => d.startsWith("crownlight-warped-"))!;
    rmSync(join(parent, dir), { recursive: true, force: true });
    expect(cache.put(0, 1, [Uint8Array.from([3])])).toBe(false);
    // Nothing of the frame is left to read: the second pass warps it again.
    expect(cache.take(0, 0, [new Uint8Array(2)])).toBeUndefined();
    expect(() => cache.put(0, 2, [Uint8Array.from([4])])).toThrow(/no room for frame 1/);
    cache.close();
  });
});
