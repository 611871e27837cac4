// Our calibration masters against astropy's ccdproc (Debian python3-ccdproc 2.4 on
// astropy 5.2): the same synthetic bias, dark and flat frames are written to FITS
// (BITPIX 16, BZERO 32768, as cameras write them), read by both sides, and combined
// with sigma clipping and a median; ccdproc also does the bias and scaled-dark
// subtraction of the flats (subtract_bias, subtract_dark with scale=True).
//
// Tolerance: both sides combine the same integers with the same rule; ccdproc works
// in float64 and we keep float32 planes, so masters agree to float32 rounding
// (1e-3 DN on values up to 16383 DN; 1e-5 on the normalised flat). A pixel whose value
// sits exactly on a clipping bound can go either way when the two sides sum in a
// different order: at most 0.01 % of pixels may differ beyond the tolerance.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { buildCalibrationMasters, combineSigmaClippedMedian, type CalibrationMasters } from "@/lib/imaging/calibrate";
import { createSensorModel, synthesizeBiasFrames, synthesizeDarkFrames, synthesizeFlatFrames } from "@/lib/imaging/synth-calibration";
import type { LinearFrame } from "@/lib/imaging/types";
import { decodeFrame } from "@/lib/media";
import { writeFitsFile } from "@/lib/media/fits-write";
import { runPython } from "../media/python-reference";

const W = 96;
const H = 72;

const SCRIPT = `
import sys, json
import numpy as np
import astropy.units as u
from astropy.nddata import CCDData
import ccdproc
from ccdproc import Combiner
from astropy.stats import sigma_clip

d = sys.argv[1]
names = json.load(open(d + "/names.json"))
load = lambda kind: [CCDData.read(d + "/" + n, unit="adu") for n in names[kind]]

def combine(ccds, **clip):
    c = Combiner(ccds)
    c.sigma_clipping(**clip)
    rejected = float(np.mean(c.data_arr.mask))
    return c.median_combine(), rejected

out = {}
bias, out["bias"] = combine(load("bias"))
# ccdproc 2.4's Combiner.sigma_clipping passes maxiters to astropy twice when it is given
# ("got multiple values for keyword argument 'maxiters'"), so the robust variant calls
# astropy's sigma_clip the way Combiner does (axis 0, masked) and takes numpy's masked median.
stack = np.array([c.data for c in load("bias")], dtype=float)
clipped = sigma_clip(stack, sigma_lower=3, sigma_upper=3, maxiters=5, cenfunc="median", stdfunc="mad_std", axis=0, masked=True)
out["biasRobust"] = float(np.mean(clipped.mask))
bias_robust = CCDData(np.ma.median(clipped, axis=0).filled(np.nan), unit="adu")
darks = load("darks")
dark_exposure = darks[0].header["EXPTIME"] * u.second
dark, out["dark"] = combine([ccdproc.subtract_bias(c, bias) for c in darks])
flats = []
for c in load("flats"):
    c = ccdproc.subtract_bias(c, bias)
    # The combined dark keeps no header, so the exposures are given as quantities.
    c = ccdproc.subtract_dark(c, dark, data_exposure=c.header["EXPTIME"] * u.second, dark_exposure=dark_exposure, scale=True)
    flats.append(CCDData(c.data / np.median(c.data), unit="adu"))
flat, out["flat"] = combine(flats)
flat_data = flat.data / np.median(flat.data)
for name, data in (("bias", bias.data), ("biasRobust", bias_robust.data), ("dark", dark.data), ("flat", flat_data)):
    np.ascontiguousarray(data, dtype="<f8").tofile(d + "/" + name + ".f64")
out["version"] = ccdproc.__version__
print(json.dumps(out))
`;

let dir: string;
let ours: CalibrationMasters;
let frames: { bias: LinearFrame[]; darks: LinearFrame[]; flats: LinearFrame[] };
let theirs: { bias: number; biasRobust: number; dark: number; flat: number; version: string };

/** Adds a cosmic-ray-like hit to some pixels of one frame, so that there is something to reject. */
function addHits(frame: LinearFrame, seed: number): void {
  for (let k = 0; k < 40; k++) frame.image.planes[0][(seed * 7919 + k * 104729) % (W * H)] += 3000 + 10 * k;
}

async function writeAndRead(kind: string, list: LinearFrame[]): Promise<LinearFrame[]> {
  const read: LinearFrame[] = [];
  for (const f of list) {
    await writeFitsFile(join(dir, f.name), {
      width: W, height: H,
      planes: [Uint16Array.from(f.image.planes[0])],
      cards: [{ key: "EXPTIME", value: f.exposureS, real: true }, { key: "SATURATE", value: f.whiteLevel }, { key: "IMAGETYP", value: kind }],
    });
    const d = await decodeFrame(join(dir, f.name), f.name);
    read.push({ name: d.name, image: d.image, exposureS: d.metadata.exposureS ?? NaN, blackLevel: d.blackLevel, whiteLevel: d.whiteLevel, encoding: d.encoding });
  }
  return read;
}

function readF64(name: string): Float64Array {
  const b = readFileSync(join(dir, `${name}.f64`));
  return new Float64Array(b.buffer, b.byteOffset, b.byteLength / 8);
}

/** Share of pixels where ours and theirs differ by more than tol (absolute). */
function shareBeyond(a: Float32Array, b: Float64Array, tol: number): number {
  expect(a.length).toBe(b.length);
  let n = 0;
  for (let i = 0; i < a.length; i++) if (!(Math.abs(a[i] - b[i]) <= tol)) n++;
  return n / a.length;
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "crownlight-ccdproc-"));
  const sensor = createSensorModel({ width: W, height: H, channels: 1, seed: 31 });
  // 12 and more frames: with fewer than 11, 3-sigma clipping about the mean cannot reject anything (Samuelson 1968).
  const bias = synthesizeBiasFrames(sensor, 13, 32);
  const darks = synthesizeDarkFrames(sensor, Array(12).fill(10), 33);
  const flats = synthesizeFlatFrames(sensor, 12, { levelDn: 8000, exposureS: 1.5, seed: 34 });
  addHits(bias[3], 1);
  addHits(darks[5], 2);
  addHits(flats[7], 3);
  frames = { bias: await writeAndRead("bias", bias), darks: await writeAndRead("dark", darks), flats: await writeAndRead("flat", flats) };
  writeFileSync(join(dir, "names.json"), JSON.stringify({ bias: bias.map((f) => f.name), darks: darks.map((f) => f.name), flats: flats.map((f) => f.name) }));
  theirs = JSON.parse(runPython(SCRIPT, [dir], ["numpy", "astropy", "ccdproc"]));
  ours = buildCalibrationMasters(frames);
}, 120_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("calibration masters against ccdproc", () => {
  it("reads the frames back from our FITS files as they were written", () => {
    expect(frames.darks[0].exposureS).toBe(10);
    expect(frames.flats[0].exposureS).toBe(1.5);
    expect(frames.bias[0].whiteLevel).toBe(16383);
    expect(theirs.version).toMatch(/^2\./);
  });

  it("bias master: ccdproc's default clipping (3 sigma about the mean, std, one round) and median", () => {
    expect(shareBeyond(ours.bias![0], readF64("bias"), 1e-3)).toBeLessThanOrEqual(1e-4);
    expect(ours.summary.bias!.rejectedFraction).toBeGreaterThan(0);
    expect(Math.abs(ours.summary.bias!.rejectedFraction - theirs.bias)).toBeLessThanOrEqual(1e-4);
  });

  it("bias master with the robust options: median, mad_std, up to 5 rounds (astropy's sigma_clip)", () => {
    const robust = combineSigmaClippedMedian(frames.bias.map((f) => f.image.planes[0]), { centre: "median", spread: "mad-std", maxRounds: 5 });
    expect(shareBeyond(robust.combined, readF64("biasRobust"), 1e-3)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(robust.rejectedFraction - theirs.biasRobust)).toBeLessThanOrEqual(1e-4);
  });

  it("dark master, bias subtracted", () => {
    expect(ours.darks).toHaveLength(1);
    expect(shareBeyond(ours.darks[0].planes[0], readF64("dark"), 1e-3)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(ours.darks[0].rejectedFraction - theirs.dark)).toBeLessThanOrEqual(1e-4);
  });

  it("flat master: bias and scaled dark subtracted, each flat over its median, combined, over its median", () => {
    expect(ours.summary.flat!.offsetMethods.every((m) => m === "scaled-dark")).toBe(true);
    expect(shareBeyond(ours.flat![0], readF64("flat"), 1e-5)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(ours.summary.flat!.rejectedFraction - theirs.flat)).toBeLessThanOrEqual(1e-4);
  });
});
