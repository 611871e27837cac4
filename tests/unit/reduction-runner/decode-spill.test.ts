// Frames kept on disk (frame-spill.ts) are written as they are decoded and must
// not come back into memory until a stage needs their pixels: describing a
// decoded frame once read every spilled plane back (to count the planes), and
// the spill's cache then held about 0.5 GB of them through the preparation of a
// 24-megapixel bracket.
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { basename, join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { decodeFrame } from "@/lib/media";
import { decodeBracketFiles } from "@/lib/reduction-runner/decode-frames";
import { createFrameSpill } from "@/lib/reduction-runner/frame-spill";
import { createModelBracket } from "@/scripts/lib-synth/from-model";
import { writeSyntheticBracket } from "@/scripts/lib-synth/write-bracket";

let dir: string;
let files: string[];
let exposures: Map<string, number>;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "crownlight-decode-spill-"));
  const bracket = createModelBracket({ width: 96, height: 80, frames: 3, seed: 5 });
  const written = await writeSyntheticBracket(bracket, dir, ["tiff"]);
  files = written.map((w) => join(dir, w.files.tiff!));
  exposures = new Map(written.map((w, k) => [basename(files[k]), w.exposureS]));
}, 60_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("decoding a bracket with its frames kept on disk", () => {
  it("writes every frame's planes once and reads none of them back", async () => {
    const spill = createFrameSpill({ cacheBytes: 1024 ** 3 });
    try {
      const { frames, provenance } = await decodeBracketFiles(files, exposures, undefined, undefined, undefined, spill);
      // A 16-bit file's decoded planes hold whole counts 0 to 65535: they go to disk as 16 bits a sample.
      const planeBytes = 96 * 80 * 2;
      expect(spill.stats()).toEqual({ writtenBytes: files.length * 3 * planeBytes, readBytes: 0, cachedBytes: 0 });
      expect(provenance.map((p) => p.planeCount)).toEqual([3, 3, 3]);
      // What was written is the frame: read back on demand, equal to a decode of the file.
      const direct = await decodeFrame(files[1], basename(files[1]));
      frames[1].image.planes.forEach((plane, c) => expect(plane).toEqual(direct.image.planes[c]));
      expect(spill.stats().readBytes).toBe(3 * planeBytes);
    } finally {
      spill.close();
    }
  });
});
