// The frame pool decodes, searches for defects, prepares and compares the
// registration's pairs in worker threads exactly what the calling thread would,
// from planes in memory or spilled to disk, and a file it cannot do comes back
// undefined for the caller to redo.
import { rmSync, writeFileSync } from "node:fs";
import { basename, dirname, join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { decodeFrame, toLinearFrame } from "@/lib/media";
import { planBracket, planBracketOnThreads } from "@/lib/imaging/bracket-plan";
import { findFrameOutliers } from "@/lib/imaging/calibrate-defects";
import { prepareFrame } from "@/lib/imaging/pipeline";
import { createSrgbDecodeTable } from "@/lib/imaging/srgb";
import { DEFAULT_REDUCTION_PARAMS, type LinearFrame } from "@/lib/imaging/types";
import { createFrameSpill } from "@/lib/reduction-runner/frame-spill";
import { createPreparePool, PREPARE_WORKERS, type PreparePool } from "@/lib/reduction-runner/prepare-pool";
import { writeBracketFixture, type BracketFixture } from "./bracket-fixture";

let fixture: BracketFixture;
let pool: PreparePool;

beforeAll(async () => {
  fixture = await writeBracketFixture();
  pool = createPreparePool();
}, 180_000);
afterAll(async () => {
  await pool.close();
  rmSync(dirname(fixture.dir), { recursive: true, force: true });
});

async function decodeHere(path: string, exposureS: number): Promise<LinearFrame> {
  return toLinearFrame(await decodeFrame(path, basename(path)), exposureS);
}

function expectSamePrepared(got: ReturnType<typeof prepareFrame> | undefined, expected: ReturnType<typeof prepareFrame>): void {
  expect(got).toBeDefined();
  expect(got!.limb).toEqual(expected.limb);
  expect(got!.luminance).toEqual(expected.luminance);
  expect(got!.linear.clipped).toEqual(expected.linear.clipped);
  expect(got!.linear.noiseFloor).toEqual(expected.linear.noiseFloor);
  expect(got!.linear.noiseSigma).toBe(expected.linear.noiseSigma);
  expect(got!.linear.masked).toBe(expected.linear.masked);
  expect(got!.linear.planes).toEqual(expected.linear.planes);
}

describe("prepare pool", () => {
  it.each(["tiff", "jpeg"] as const)("decodes %s frames as the calling thread does, and searches linear ones for defects", async (format) => {
    const path = fixture.filesOf(format)[1];
    const pooled = await pool.decode(path, basename(path), true);
    const local = await decodeHere(path, fixture.exposuresS[1]);
    expect(pooled).toBeDefined();
    pooled!.decoded.image.planes.forEach((plane, c) => expect(plane).toEqual(local.image.planes[c]));
    if (format === "jpeg") expect(pooled!.outliers).toBeUndefined();
    else expect(pooled!.outliers).toEqual(findFrameOutliers(local));
  });

  it.each(["tiff", "jpeg"] as const)("writes a decoded %s frame's planes into a spill's folder, which the spill adopts and reads back as decoded", async (format) => {
    const path = fixture.filesOf(format)[1];
    const local = await decodeHere(path, fixture.exposuresS[1]);
    const spill = createFrameSpill();
    try {
      const pooled = await pool.decode(path, basename(path), format === "tiff", spill.dir);
      expect(pooled?.spilled).toHaveLength(local.image.planes.length);
      // The reply carries one empty array per plane, so that the planes can be counted without a read.
      expect(pooled!.decoded.image.planes.map((p) => p.length)).toEqual(local.image.planes.map(() => 0));
      // Whole counts go to disk in 16 bits, half a float plane's bytes.
      expect(pooled!.spilled!.map((f) => f.kind)).toEqual(local.image.planes.map(() => "f32-u16"));
      const image = pooled!.decoded.image;
      spill.adoptField(image, "planes", pooled!.spilled!);
      expect(spill.stats().writtenBytes).toBe(local.image.planes.length * local.image.width * local.image.height * 2);
      image.planes.forEach((plane, c) => expect(plane).toEqual(local.image.planes[c]));
      // Another thread reads them through the same files.
      expect(spill.filesOf(image, "planes")).toEqual(pooled!.spilled);
      if (format === "tiff") expect(pooled!.outliers).toEqual(findFrameOutliers(local));
      expect(() => spill.adoptField({ planes: [] as Float32Array[] }, "planes", [{ ...pooled!.spilled![0], path: join(fixture.dir, "elsewhere.bin") }])).toThrow(/not in the spill's folder/);
    } finally {
      spill.close();
    }
  });

  it.each(["tiff", "jpeg"] as const)("prepares %s frames as the calling thread does", async (format) => {
    const frame = await decodeHere(fixture.filesOf(format)[1], fixture.exposuresS[1]);
    const expected = prepareFrame(frame, DEFAULT_REDUCTION_PARAMS, frame.encoding === "srgb8" ? createSrgbDecodeTable() : undefined);
    expectSamePrepared(await pool.prepare(frame, DEFAULT_REDUCTION_PARAMS), expected);
  });

  it("prepares a frame with a defect map, from planes spilled to disk, and hands back the caller's own map", async () => {
    const frame = await decodeHere(fixture.filesOf("tiff")[2], fixture.exposuresS[2]);
    const { width, height } = frame.image;
    const badPixels = new Uint8Array(width * height);
    // A few defects, one of them beside the limb's band: the repaired luminance must match.
    for (const i of [5 * width + 7, (height >> 1) * width + (width >> 1), (height >> 1) * width + (width >> 2)]) badPixels[i] = 1;
    const withDefects: LinearFrame = { ...frame, badPixels };
    const expected = prepareFrame(withDefects, DEFAULT_REDUCTION_PARAMS);
    const spill = createFrameSpill();
    try {
      spill.spillField(withDefects.image, "planes");
      const files = spill.filesOf(withDefects.image, "planes");
      expect(files).toHaveLength(frame.image.planes.length);
      const got = await pool.prepare(withDefects, DEFAULT_REDUCTION_PARAMS, files);
      expectSamePrepared(got, expected);
      expect(got!.linear.masked).toBe(badPixels);
    } finally {
      spill.close();
    }
  });

  it("answers undefined for a file it cannot decode, and keeps working", async () => {
    const bad = join(fixture.dir, "not-an-image.tif");
    writeFileSync(bad, "II*\0 this is not a TIFF");
    expect(await pool.decode(bad, basename(bad), true)).toBeUndefined();
    const path = fixture.filesOf("tiff")[0];
    expect((await pool.decode(path, basename(path), false))?.decoded).toBeDefined();
  });

  it("answers undefined for a frame it cannot prepare, and keeps working", async () => {
    const frame = await decodeHere(fixture.filesOf("tiff")[0], fixture.exposuresS[0]);
    expect(await pool.prepare(frame, { ...DEFAULT_REDUCTION_PARAMS, clipFraction: 2 })).toBeUndefined();
    expect(await pool.prepare(frame, DEFAULT_REDUCTION_PARAMS)).toBeDefined();
  });

  it("compares a registration's pairs in its threads, and plans the bracket to the very same transforms as one thread does", async () => {
    const frames = await Promise.all(fixture.filesOf("tiff").map((path, i) => decodeHere(path, fixture.exposuresS[i])));
    // A lens-capped frame among them: its pair fails in the worker as it does here, and it is left out the same way.
    const capped: LinearFrame = { ...frames[2], name: "lens-cap.tif", image: { ...frames[2].image, planes: frames[2].image.planes.map((p) => p.map(() => frames[2].blackLevel)) } };
    const bracket = [...frames, capped];
    const here = planBracket(bracket, [], DEFAULT_REDUCTION_PARAMS).plan;
    let sent = 0;
    let answered = 0;
    const threaded = (await planBracketOnThreads(bracket, [], DEFAULT_REDUCTION_PARAMS, {}, async (task) => {
      sent++;
      const outcome = await pool.registerPair(task);
      if (outcome) answered++;
      return outcome;
    }, PREPARE_WORKERS)).plan;
    expect(sent).toBeGreaterThanOrEqual(bracket.length - 1);
    expect(answered).toBe(sent);
    expect(here.leftOut.map((l) => l.name)).toEqual(["lens-cap.tif"]);
    expect(threaded.registration).toEqual(here.registration);
    expect(threaded.leftOut).toEqual(here.leftOut);
    expect(threaded.moons).toEqual(here.moons);
    expect(threaded.transmissions).toEqual(here.transmissions);
    // A pool that can do nothing: every pair is compared on the calling thread, with the same plan.
    const refused = (await planBracketOnThreads(bracket, [], DEFAULT_REDUCTION_PARAMS, {}, async () => undefined, PREPARE_WORKERS)).plan;
    expect(refused.registration).toEqual(here.registration);
  });
});
