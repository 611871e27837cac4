// astropy (Debian python3-astropy) reads the master FITS the runner writes: the
// file verifies, the header cards hold what the reduction reported, and the
// pixels are bit for bit the ones we wrote.
import { createHash } from "node:crypto";
import { readFileSync, rmSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readFits } from "@/lib/media";
import { PIPELINE_VERSION } from "@/lib/imaging/pipeline";
import { runReductionOnFiles } from "@/lib/reduction-runner";
import { runSystemPython } from "@/scripts/bench/system-python";
import { writeBracketFixture, type BracketFixture } from "../reduction-runner/bracket-fixture";

const SCRIPT = `
import sys, json, hashlib
import numpy as np
from astropy.io import fits
with fits.open(sys.argv[1]) as hdul:
    hdul.verify("exception")
    h = hdul[0].header
    data = hdul[0].data
    cards = {k: h[k] for k in h.keys() if k not in ("HISTORY", "COMMENT", "")}
    print(json.dumps({
        "cards": cards,
        "history": [str(x) for x in h["HISTORY"]],
        "shape": list(data.shape),
        "dtype": str(data.dtype),
        "sha256": hashlib.sha256(np.ascontiguousarray(data, dtype=">f4").tobytes()).hexdigest(),
    }))
`;

let fixture: BracketFixture;
let outDir: string;
beforeAll(async () => {
  fixture = await writeBracketFixture();
  outDir = join(fixture.dir, "..", "out");
  await runReductionOnFiles({ files: fixture.filesOf("fits"), outDir, params: { registration: "moon" } });
}, 120_000);
afterAll(() => rmSync(join(fixture.dir, ".."), { recursive: true, force: true }));

describe("master.fits read by astropy", () => {
  it("verifies, and its cards and pixels are what we wrote", async () => {
    const path = join(outDir, "master.fits");
    const astropy = JSON.parse(runSystemPython(SCRIPT, [path], ["numpy", "astropy"]));
    const report = JSON.parse(readFileSync(join(outDir, "report.json"), "utf8"));
    const ours = await readFits(path, "master.fits");

    expect(astropy.shape).toEqual([3, ours.height, ours.width]);
    expect(astropy.dtype).toBe(">f4"); // big-endian float32, BITPIX -32
    const hash = createHash("sha256");
    for (const plane of ours.planes) {
      const bytes = Buffer.alloc(plane.length * 4);
      for (let i = 0; i < plane.length; i++) bytes.writeFloatBE(plane[i], i * 4);
      hash.update(bytes);
    }
    expect(astropy.sha256).toBe(hash.digest("hex"));

    const cards = astropy.cards;
    expect(cards).toMatchObject({ BITPIX: -32, NAXIS: 3, BUNIT: "DN/s", EXPTIME: 1, NCOMBINE: 5, TIMESYS: "UTC", CREATOR: PIPELINE_VERSION, REGMODE: "moon" });
    expect(cards.REFFRAME).toBe(report.overall.referenceFrame);
    // 1-based FITS pixels (WCS Paper I) from the report's 0-based centres; rounded to 3 decimals in the card.
    expect(cards.MOONX).toBeCloseTo(report.overall.moonCentrePx.x + 1, 3);
    expect(cards.MOONY).toBeCloseTo(report.overall.moonCentrePx.y + 1, 3);
    expect(cards.MOONR).toBeCloseTo(report.overall.moonRadiusPx, 3);
    expect(cards.IMCENX).toBe((ours.width + 1) / 2);
    expect(cards.TEXPMIN).toBe(Math.min(...fixture.exposuresS));
    expect(cards.TEXPMAX).toBe(Math.max(...fixture.exposuresS));
    // DATE-AVG: mean of the exposures' midpoints, from the capture times the synthetic files carry.
    const mids = fixture.captureTimesMs.map((t, k) => t + fixture.exposuresS[k] * 500);
    const avgMs = mids.reduce((s, m) => s + m, 0) / mids.length;
    expect(Math.abs(Date.parse(`${cards["DATE-AVG"]}Z`) - avgMs)).toBeLessThanOrEqual(1);
    expect(Date.parse(`${cards["DATE-BEG"]}Z`)).toBe(fixture.captureTimesMs[0]);
    expect(Object.keys(cards).some((k) => /^(CRPIX|CDELT|CTYPE)/.test(k))).toBe(false);

    const history = astropy.history.join("\n");
    expect(history).toContain(`Merged by ${PIPELINE_VERSION}.`);
    for (const key of ["registration = moon", "filter = mgn", "clipFraction = 0.92", "recoverResponse = false"]) expect(history).toContain(`Parameter ${key}`);
    expect(history).toContain("No WCS");
    expect(astropy.history.filter((h: string) => h.startsWith("Frame "))).toHaveLength(5);
  });
});
