// A site is set but the frames carry no capture time (16-bit TIFFs from a raw
// converter, as the synthetic writer makes them): registration on the corona
// still runs, the master has no helioprojective WCS, and the report says why,
// naming the frames. Registration on the Sun is refused (sun-bad-input.test.ts).
import { readFileSync, rmSync } from "node:fs";
import { basename, join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runReductionOnFiles } from "@/lib/reduction-runner";
import type { SiteSpec } from "@/lib/reduction-runner/sky-site";
import { writeBracketFixture, type BracketFixture } from "./bracket-fixture";

const LUXOR: SiteSpec = { kind: "fixed", location: { latDeg: 25.69, lonDeg: 32.64, elevationM: 80 } };
let fixture: BracketFixture;

beforeAll(async () => {
  fixture = await writeBracketFixture();
}, 180_000);

afterAll(() => rmSync(join(fixture.dir, ".."), { recursive: true, force: true }));

describe("frames without capture times at a known site", () => {
  it("reduce on the corona without a WCS, and the report says so naming the frames", async () => {
    const files = fixture.filesOf("tiff");
    const exposureOverrides = new Map(files.map((f, k) => [basename(f), fixture.exposuresS[k]]));
    const outDir = join(fixture.dir, "..", "untimed-out");
    const { report } = await runReductionOnFiles({ files, outDir, registration: "corona", exposureOverrides, sky: { site: LUXOR } });
    expect(report.notes.join(" ")).toMatch(/no helioprojective WCS: .*synthetic-01\.tif.* no capture time/);
    expect(report.frames.every((f) => f.captureTimeUtc === null)).toBe(true);
    // Without a WCS the master's header has no helioprojective axes.
    const header = readFileSync(join(outDir, "master.fits")).subarray(0, 2880 * 4).toString("latin1");
    expect(header).not.toMatch(/HPLN-TAN/);
    // The TIFFs' offset was never stated: each frame's is found from the bracket (the writer subtracted it, so near zero).
    for (const f of report.frames as { offset: { source: string; dn: number } }[]) {
      expect(f.offset.source).toBe("solved");
      expect(Math.abs(f.offset.dn)).toBeLessThan(2);
    }
  }, 300_000);
});
