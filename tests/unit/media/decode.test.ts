import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import sharp from "sharp";
import { afterAll, describe, expect, it } from "vitest";
import { decodeFrame, toLinearFrame } from "@/lib/media/decode";
import { encodeDng } from "@/lib/media/dng-write";
import { encodePng16 } from "@/lib/media/encode";
import { MediaError } from "@/lib/media/errors";
import { encodeFits } from "@/lib/media/fits-write";

const dir = mkdtempSync(join(tmpdir(), "crownlight-decode-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const ramp = (n: number, scale: number, offset = 0) => Uint16Array.from({ length: n }, (_, i) => (i * scale + offset) % 65536);

describe("decodeFrame: rasters through sharp", () => {
  it("keeps every value of a 16-bit RGB PNG, as linear data", async () => {
    const w = 40, h = 30;
    const planes = [ramp(w * h, 53), ramp(w * h, 17, 1000), ramp(w * h, 41, 60000)];
    const png = await encodePng16({ width: w, height: h, planes });
    const decoded = await decodeFrame(png, "frame-100.png");
    expect([decoded.format, decoded.bitDepth, decoded.encoding, decoded.whiteLevel]).toEqual(["png", 16, "linear", 65535]);
    planes.forEach((plane, p) => expect(Array.from(decoded.image.planes[p])).toEqual(Array.from(plane)));
  });

  it("keeps every value of a 16-bit grey LZW TIFF read from a path", async () => {
    const w = 33, h = 21;
    const plane = ramp(w * h, 97);
    const path = join(dir, "frame-101.tif");
    await sharp(plane, { raw: { width: w, height: h, channels: 1 } }).toColourspace("grey16").tiff({ compression: "lzw" }).toFile(path);
    const decoded = await decodeFrame(path, "frame-101.tif");
    expect([decoded.format, decoded.bitDepth, decoded.image.planes.length]).toEqual(["tiff", 16, 1]);
    expect(Array.from(decoded.image.planes[0])).toEqual(Array.from(plane));
  });

  it("reads 8-bit PNG codes exactly and marks them sRGB-encoded", async () => {
    const codes = Uint8Array.from({ length: 64 }, (_, i) => i * 4);
    const png = await sharp(codes, { raw: { width: 8, height: 8, channels: 1 } }).png().toBuffer();
    const decoded = await decodeFrame(png, "frame-102.png");
    expect([decoded.bitDepth, decoded.encoding, decoded.blackLevel, decoded.whiteLevel]).toEqual([8, "srgb8", 0, 255]);
    expect(Array.from(decoded.image.planes[0])).toEqual(Array.from(codes));
  });

  it("reads a flat JPEG within one code of its value", async () => {
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 200, g: 128, b: 30 } } }).jpeg({ quality: 95 }).toBuffer();
    const decoded = await decodeFrame(jpeg, "frame-103.jpg");
    expect([decoded.format, decoded.image.planes.length]).toEqual(["jpeg", 3]);
    [200, 128, 30].forEach((value, p) => expect(Math.abs(decoded.image.planes[p][24 * 64 + 32] - value)).toBeLessThanOrEqual(1));
  });
});

describe("decodeFrame: camera raw through LibRaw (dcraw_emu)", () => {
  it("decodes our DNG linearly: (raw - BlackLevel) / (WhiteLevel - BlackLevel) x 65535 (DNG 1.4 linearization)", async () => {
    const w = 64, h = 48, black = 256, white = 4095;
    // Left half 3800 DN above black (near saturation), right half 1900.
    const mosaic = Uint16Array.from({ length: w * h }, (_, i) => black + (i % w < 32 ? 3800 : 1900));
    const dng = encodeDng({ width: w, height: h, mosaic, blackLevel: black, whiteLevel: white, exposureS: 1 / 250, fNumber: 8, iso: 100, make: "Crownlight synthetic", model: "Bayer test" });
    const decoded = await decodeFrame(Buffer.from(dng), "frame-104.dng");
    expect([decoded.format, decoded.bitDepth, decoded.encoding]).toEqual(["dng", 16, "linear"]);
    expect(decoded.metadata.exposureS).toBeCloseTo(0.004, 12);
    const expected = (dn: number) => (dn / (white - black)) * 65535;
    for (const plane of decoded.image.planes) {
      expect(Math.abs(plane[24 * w + 10] - expected(3800))).toBeLessThanOrEqual(2);
      expect(Math.abs(plane[24 * w + 50] - expected(1900))).toBeLessThanOrEqual(2);
    }
  });
});

describe("decodeFrame: FITS through fitsjs", () => {
  it("gives physical values, FITS metadata and the 16-bit white level", async () => {
    const plane = Uint16Array.from([0, 100, 65535, 30000]);
    const fits = encodeFits({
      width: 2,
      height: 2,
      planes: [plane],
      cards: [
        { key: "EXPTIME", value: 0.5 },
        { key: "DATE-OBS", value: "2024-04-08T18:34:10.500" },
        { key: "INSTRUME", value: "Test camera" },
      ],
    });
    const decoded = await decodeFrame(Buffer.from(fits), "frame-105.fits");
    expect(Array.from(decoded.image.planes[0])).toEqual([0, 100, 65535, 30000]);
    // BZERO 32768 + BSCALE 1 x 32767: the largest unsigned 16-bit value.
    expect([decoded.bitDepth, decoded.whiteLevel, decoded.encoding]).toEqual([16, 65535, "linear"]);
    expect(decoded.metadata).toMatchObject({ exposureS: 0.5, instrument: "Test camera", captureTimeMs: Date.parse("2024-04-08T18:34:10.500Z") });
  });
});

describe("toLinearFrame", () => {
  const decodedWithout = async () => decodeFrame(await sharp({ create: { width: 4, height: 4, channels: 3, background: "#808080" } }).png().toBuffer(), "frame-007.jpg.png");

  it("refuses a frame without an exposure time, naming the file", async () => {
    const decoded = { ...(await decodedWithout()), name: "frame-007.jpg" };
    const error = (() => {
      try {
        toLinearFrame(decoded);
      } catch (e) {
        return e as MediaError;
      }
    })();
    expect(error).toBeInstanceOf(MediaError);
    expect(error?.code).toBe("missing-exposure");
    expect(error?.message).toBe("frame-007.jpg: no exposure time in the file; give one");
  });

  it("takes the photographer's exposure and refuses a non-positive one", async () => {
    const decoded = await decodedWithout();
    const frame = toLinearFrame(decoded, 0.25);
    expect([frame.exposureS, frame.encoding, frame.whiteLevel, frame.image.width]).toEqual([0.25, "srgb8", 255, 4]);
    expect(() => toLinearFrame(decoded, 0)).toThrow("frame-007.jpg.png: the exposure time given, 0 s, is not a positive number of seconds");
  });
});

