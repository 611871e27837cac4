// The runner's output size and filter strength, and the report's radial profile
// and coverage: renditions, preview and tiles scaled down, master.fits full size,
// coverage.png written, and bad options refused before anything is written.
import { existsSync, readFileSync, rmSync } from "node:fs";
import { basename, join } from "node:path";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readFits } from "@/lib/media";
import { ReductionInputError, runReductionOnFiles } from "@/lib/reduction-runner";
import { computeDeepZoomLayout } from "@/lib/reduction-runner/tile-layout";
import { FIXTURE_FRAMES, FIXTURE_HEIGHT, FIXTURE_WIDTH, writeBracketFixture, type BracketFixture } from "./bracket-fixture";

let fixture: BracketFixture;
let outDir: string;
let report: {
  parameters: { filterStrength: number };
  frames: { name: string; frameId: string | null }[];
  overall: {
    moonRadiusPx: number;
    radialProfile: { centreSource: string; solarRadiusPx: number; stepR: number; rings: { innerR: number; outerR: number; meanLuminance: number; pixelCount: number }[] };
    coverage: { frameCount: number; pixelsByFrames: number[]; map: { width: number; height: number; file: string } };
  };
  outputs: { coverage: string; renditionSize: { width: number; height: number; scale: number; longSidePx: number; masterWidth: number } };
  notes: string[];
};

beforeAll(async () => {
  fixture = await writeBracketFixture();
  const files = fixture.filesOf("fits");
  outDir = join(fixture.dir, "..", "out-small");
  await runReductionOnFiles({
    files, outDir, params: { registration: "moon", filter: "nrgf", filterStrength: 0.6 }, outputLongSidePx: 128,
    frameIds: Object.fromEntries(files.map((f, k) => [basename(f), `frame-${k}`])),
  });
  report = JSON.parse(readFileSync(join(outDir, "report.json"), "utf8"));
}, 120_000);
afterAll(() => rmSync(join(fixture.dir, ".."), { recursive: true, force: true }));

describe("outputLongSidePx", () => {
  it("scales renditions, preview and tiles to the long side and keeps the master full size", async () => {
    // 320 x 256 to a long side of 128: 128 x 102 (256 x 0.4 = 102.4).
    const expected = { width: 128, height: 102 };
    for (const file of ["natural.png", "structure.png", "preview.jpg", "preview-structure.jpg"]) {
      const meta = await sharp(join(outDir, file)).metadata();
      expect({ width: meta.width, height: meta.height }, file).toEqual(expected);
    }
    const dzi = readFileSync(join(outDir, "tiles", "natural.dzi"), "utf8");
    expect(dzi).toContain('Width="128"');
    expect(dzi).toContain('Height="102"');
    expect(computeDeepZoomLayout(128, 102, 254, 1).tileCount).toBeGreaterThan(0);
    const master = await readFits(join(outDir, "master.fits"), "master.fits");
    expect([master.width, master.height]).toEqual([FIXTURE_WIDTH, FIXTURE_HEIGHT]);
    expect(report.outputs.renditionSize).toMatchObject({ width: 128, height: 102, scale: 0.4, longSidePx: 128, masterWidth: FIXTURE_WIDTH });
    expect(report.notes.some((n) => n.includes("scaled by 0.4"))).toBe(true);
  });

  it("records the filter strength and each frame's id", () => {
    expect(report.parameters.filterStrength).toBe(0.6);
    expect(report.frames.map((f) => f.frameId).sort()).toEqual(Array.from({ length: FIXTURE_FRAMES }, (_, k) => `frame-${k}`));
  });

  it("reports a radial profile from one solar radius outward, falling with distance", () => {
    const p = report.overall.radialProfile;
    // No site: the Moon's centre and radius stand in for the Sun's.
    expect(p.centreSource).toBe("moon");
    expect(p.solarRadiusPx).toBeCloseTo(report.overall.moonRadiusPx, 3);
    expect(p.stepR).toBe(0.05);
    expect(p.rings.length).toBeGreaterThan(20);
    expect(p.rings[0].innerR).toBeGreaterThanOrEqual(1);
    const near = p.rings.find((r) => r.innerR >= 1.2)!;
    const far = p.rings.find((r) => r.innerR >= 2.5)!;
    expect(near.meanLuminance).toBeGreaterThan(5 * far.meanLuminance);
  });

  it("writes coverage.png and counts every master pixel once", async () => {
    const c = report.overall.coverage;
    expect(c.frameCount).toBe(FIXTURE_FRAMES);
    expect(c.pixelsByFrames).toHaveLength(FIXTURE_FRAMES + 1);
    expect(c.pixelsByFrames.reduce((a, b) => a + b, 0)).toBe(FIXTURE_WIDTH * FIXTURE_HEIGHT);
    expect(report.outputs.coverage).toBe("coverage.png");
    const meta = await sharp(join(outDir, "coverage.png")).metadata();
    expect([meta.width, meta.height, meta.channels]).toEqual([c.map.width, c.map.height, 1]);
  });
});

describe("bad output options", () => {
  it.each([
    [{ params: { filterStrength: 1.5 } }, /filterStrength: expected a number from 0.05 to 1, got 1.5/],
    [{ outputLongSidePx: 100.5 }, /outputLongSidePx: expected 0 \(full size\) or a whole number/],
    [{ outputLongSidePx: -1 }, /outputLongSidePx/],
  ])("refuses %j before writing anything", async (extra, message) => {
    const out = join(fixture.dir, "..", "out-refused");
    const run = runReductionOnFiles({ files: fixture.filesOf("fits"), outDir: out, ...extra });
    await expect(run).rejects.toThrow(ReductionInputError);
    await expect(run).rejects.toThrow(message);
    expect(existsSync(out)).toBe(false);
  });
});
