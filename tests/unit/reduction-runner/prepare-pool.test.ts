// The frame pool decodes and prepares in worker threads exactly what the calling
// thread would, and a file it cannot do comes back undefined for the caller to redo.
import { rmSync, writeFileSync } from "node:fs";
import { basename, dirname, join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { decodeFrame, toLinearFrame } from "@/lib/media";
import { prepareFrame } from "@/lib/imaging/pipeline";
import { createSrgbDecodeTable } from "@/lib/imaging/srgb";
import { DEFAULT_REDUCTION_PARAMS } from "@/lib/imaging/types";
import { createPreparePool, type PreparePool } from "@/lib/reduction-runner/prepare-pool";
import { writeBracketFixture, type BracketFixture } from "./bracket-fixture";

let fixture: BracketFixture;
let pool: PreparePool;

beforeAll(async () => {
  fixture = await writeBracketFixture();
  pool = createPreparePool();
});
afterAll(async () => {
  await pool.close();
  rmSync(dirname(fixture.dir), { recursive: true, force: true });
});

describe("prepare pool", () => {
  it.each(["tiff", "jpeg"] as const)("gives the same planes, masks and limb fit as the calling thread for %s frames", async (format) => {
    const path = fixture.filesOf(format)[1];
    const exposureS = fixture.exposuresS[1];
    const pooled = await pool.run(path, basename(path), DEFAULT_REDUCTION_PARAMS, exposureS);
    expect(pooled?.prepared).toBeDefined();
    expect(pooled!.preparedExposureS).toBe(exposureS);
    const local = await decodeFrame(path, basename(path));
    const frame = toLinearFrame(local, exposureS);
    const expected = prepareFrame(frame, DEFAULT_REDUCTION_PARAMS, frame.encoding === "srgb8" ? createSrgbDecodeTable() : undefined);
    pooled!.decoded.image.planes.forEach((plane, c) => expect(plane).toEqual(local.image.planes[c]));
    const got = pooled!.prepared!;
    expect(got.limb).toEqual(expected.limb);
    expect(got.luminance).toEqual(expected.luminance);
    expect(got.linear.clipped).toEqual(expected.linear.clipped);
    expect(got.linear.noiseFloor).toEqual(expected.linear.noiseFloor);
    expect(got.linear.planes.length).toBe(expected.linear.planes.length);
  });

  it("answers undefined for a file it cannot decode, and keeps working", async () => {
    const bad = join(fixture.dir, "not-an-image.tif");
    writeFileSync(bad, "II*\0 this is not a TIFF");
    expect(await pool.run(bad, basename(bad), DEFAULT_REDUCTION_PARAMS, 1)).toBeUndefined();
    const path = fixture.filesOf("tiff")[0];
    expect((await pool.run(path, basename(path), DEFAULT_REDUCTION_PARAMS, fixture.exposuresS[0]))?.prepared).toBeDefined();
  });
});
