// The synthetic-bracket writers (scripts/lib-synth) read back through decodeFrame
// with the levels, exposure and capture time they were given.
import { existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { encodeSrgb } from "@/lib/imaging/srgb";
import { decodeFrame, toLinearFrame } from "@/lib/media/decode";
import { closeExifWriter } from "@/lib/media/exif-write";
import { createModelBracket } from "@/scripts/lib-synth/from-model";
import { parseSynthArgs } from "@/scripts/lib-synth/parse-args";
import type { SynthBracket } from "@/scripts/lib-synth/types";
import { writeSyntheticBracket } from "@/scripts/lib-synth/write-bracket";

const dir = mkdtempSync(join(tmpdir(), "crownlight-synth-"));
afterAll(async () => {
  await closeExifWriter();
  rmSync(dir, { recursive: true, force: true });
});

const w = 32, h = 24, black = 512, white = 16383;
const dn = [8000, 4000, 12000];
const captureTimeMs = Date.parse("2024-04-08T18:34:10.250Z");
const flatBracket: SynthBracket = {
  width: w,
  height: h,
  blackLevel: black,
  whiteLevel: white,
  frames: [{ name: "flat-01", planes: dn.map((v) => new Float32Array(w * h).fill(v)), exposureS: 1 / 125, captureTimeMs }],
  truth: { purpose: "test" },
};
const linear = (v: number) => (v - black) / (white - black);

describe("synthetic bracket files", () => {
  it("TIFF, JPEG, FITS and DNG decode to the same linear levels, exposure and UTC time", async () => {
    await writeSyntheticBracket(flatBracket, dir, ["tiff", "jpeg", "fits", "dng"], 300);
    const centre = (h / 2) * w + w / 2;

    const tiff = await decodeFrame(join(dir, "flat-01.tif"), "flat-01.tif");
    expect([tiff.format, tiff.bitDepth, tiff.encoding]).toEqual(["tiff", 16, "linear"]);
    dn.forEach((v, c) => expect(tiff.image.planes[c][centre]).toBe(Math.round(linear(v) * 65535)));

    const jpeg = await decodeFrame(join(dir, "flat-01.jpg"), "flat-01.jpg");
    expect([jpeg.format, jpeg.encoding]).toEqual(["jpeg", "srgb8"]);
    expect(jpeg.metadata).toMatchObject({ exposureS: 0.008, make: "Crownlight synthetic", captureTimeMs, isTimeZoneAssumed: false });
    // The 8-bit code is the sRGB encoding (IEC 61966-2-1) of the linear level, within one code (JPEG's YCbCr rounding).
    dn.forEach((v, c) => expect(Math.abs(jpeg.image.planes[c][centre] - Math.round(encodeSrgb(linear(v)) * 255))).toBeLessThanOrEqual(1));

    const fits = await decodeFrame(join(dir, "flat-01.fits"), "flat-01.fits");
    expect([fits.bitDepth, fits.whiteLevel]).toEqual([16, white - black]);
    expect(fits.metadata).toMatchObject({ exposureS: 0.008, captureTimeMs, instrument: "Crownlight synthetic Synthetic bracket generator" });
    dn.forEach((v, c) => expect(fits.image.planes[c][centre]).toBe(v - black));

    const dng = await decodeFrame(join(dir, "flat-01.dng"), "flat-01.dng");
    expect([dng.format, dng.encoding]).toEqual(["dng", "linear"]);
    expect(dng.metadata).toMatchObject({ exposureS: 0.008, captureTimeMs });
    // LibRaw maps BlackLevel..WhiteLevel to 0..65535; the colour matrix is the sRGB inverse to 4 decimals.
    dn.forEach((v, c) => expect(Math.abs(dng.image.planes[c][centre] / 65535 - linear(v))).toBeLessThan(0.005));

    const frame = toLinearFrame(dng);
    expect([frame.exposureS, frame.captureTimeMs]).toEqual([0.008, captureTimeMs]);
  });

  it("writes a model bracket with truth.json and the radiance as FITS", async () => {
    const out = join(dir, "model");
    const bracket = createModelBracket({ width: 64, height: 48, frames: 2, seed: 7 });
    await writeSyntheticBracket(bracket, out, ["fits"]);
    const truth = JSON.parse(readFileSync(join(out, "truth.json"), "utf8"));
    expect(truth.synthetic).toBe(true);
    expect(truth.frames.map((f: { files: { fits: string } }) => f.files.fits)).toEqual(["synthetic-01.fits", "synthetic-02.fits"]);
    expect(truth.moonInFrame).toHaveLength(2);
    expect(existsSync(join(out, "truth-radiance.fits"))).toBe(true);
    const second = await decodeFrame(join(out, "synthetic-02.fits"), "synthetic-02.fits");
    expect(second.metadata.exposureS).toBe(1);
  });
});

describe("parseSynthArgs", () => {
  it("reads the options and refuses bad ones by name", () => {
    expect(parseSynthArgs(["--out", "x", "--width=640", "--frames", "3", "--formats", "fits,dng"])).toMatchObject({ outDir: "x", width: 640, height: 800, frames: 3, formats: ["fits", "dng"] });
    expect(() => parseSynthArgs(["--width", "100"])).toThrow(/^--out: a folder to write into is required/);
    expect(() => parseSynthArgs(["--out", "x", "--frames", "0"])).toThrow('--frames: expected an integer from 1 to 40, got "0"');
    expect(() => parseSynthArgs(["--out", "x", "--formats", "tiff,gif"])).toThrow('--formats: "gif" is not one of tiff, jpeg, fits, dng');
    expect(() => parseSynthArgs(["--out", "x", "--colour", "red"])).toThrow(/^unknown option --colour/);
  });
});
