import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import sharp from "sharp";
import { afterAll, describe, expect, it } from "vitest";
import { closeExifWriter, formatExifDateTime, writeCaptureExif } from "@/lib/media/exif-write";
import { applyClockOffset, buildExifCaptureTime, parseFitsDate, readExifMetadata, readFitsMetadata } from "@/lib/media/metadata";

const dir = mkdtempSync(join(tmpdir(), "crownlight-meta-"));
afterAll(async () => {
  await closeExifWriter();
  rmSync(dir, { recursive: true, force: true });
});

describe("capture time in UTC from EXIF strings (EXIF 2.32 DateTimeOriginal, SubSecTimeOriginal, OffsetTimeOriginal)", () => {
  it("subtracts the zone offset and keeps the fraction of a second", () => {
    // 13:34:10.5 at UTC-05:00 is 18:34:10.5 UTC (2024 April 8, Texas; arithmetic, not a published value).
    expect(buildExifCaptureTime("2024:04:08 13:34:10", "5", "-05:00")).toEqual({ captureTimeMs: Date.parse("2024-04-08T18:34:10.500Z"), isTimeZoneAssumed: false });
    expect(buildExifCaptureTime("2024:04:09 00:30:00", "025", "+05:30")?.captureTimeMs).toBe(Date.parse("2024-04-08T19:00:00.025Z"));
  });

  it("reads the clock as UTC and says so when the file has no offset", () => {
    expect(buildExifCaptureTime("2024:04:08 18:34:10", undefined, undefined)).toEqual({ captureTimeMs: Date.parse("2024-04-08T18:34:10Z"), isTimeZoneAssumed: true });
    expect(buildExifCaptureTime("not a date")).toBeUndefined();
  });

  it("formats UTC milliseconds back into the three strings", () => {
    const time = Date.parse("2024-04-08T18:34:10.250Z");
    const tags = formatExifDateTime(time, -300);
    expect(tags).toEqual({ dateTimeOriginal: "2024:04:08 13:34:10", subSecTimeOriginal: "250", offsetTimeOriginal: "-05:00" });
    expect(buildExifCaptureTime(tags.dateTimeOriginal!, tags.subSecTimeOriginal, tags.offsetTimeOriginal)?.captureTimeMs).toBe(time);
  });
});

describe("readExifMetadata on a JPEG whose tags ExifTool wrote", () => {
  it("reads exposure, f-number, ISO, camera and the UTC capture time", async () => {
    const path = join(dir, "frame-200.jpg");
    await sharp({ create: { width: 16, height: 16, channels: 3, background: "#204060" } }).jpeg().toFile(path);
    await writeCaptureExif(path, {
      exposureS: 1 / 250,
      fNumber: 8,
      iso: 200,
      ...formatExifDateTime(Date.parse("2024-04-08T18:34:10.250Z"), -300),
      make: "Crownlight synthetic",
      model: "Test body",
    });
    const metadata = await readExifMetadata(path);
    expect(metadata).toEqual({
      exposureS: 0.004,
      fNumber: 8,
      iso: 200,
      make: "Crownlight synthetic",
      model: "Test body",
      captureTimeMs: Date.parse("2024-04-08T18:34:10.250Z"),
      isTimeZoneAssumed: false,
    });
  });

  it("gives an empty description for a file without EXIF", async () => {
    const png = await sharp({ create: { width: 4, height: 4, channels: 3, background: "#000" } }).png().toBuffer();
    expect(await readExifMetadata(png)).toEqual({});
  });
});

describe("readFitsMetadata", () => {
  it("maps the capture cards, EXPOSURE as a fallback for EXPTIME, DATE-OBS with TIME-OBS", () => {
    const header = new Map<string, string | number | boolean>([
      ["EXPOSURE", 2],
      ["DATE-OBS", "2024-04-08"],
      ["TIME-OBS", "18:34:10.125"],
      ["GAIN", 0.5],
      ["INSTRUME", "Camera"],
      ["TELESCOP", "Refractor"],
      ["FOCALLEN", 1500],
      ["XPIXSZ", 3.76],
    ]);
    expect(readFitsMetadata(header)).toEqual({
      exposureS: 2,
      captureTimeMs: Date.parse("2024-04-08T18:34:10.125Z"),
      isTimeZoneAssumed: false,
      gain: 0.5,
      instrument: "Camera",
      telescope: "Refractor",
      focalMm: 1500,
      pitchUm: 3.76,
    });
    expect(parseFitsDate("2024-04-08T18:34:10")).toBe(Date.parse("2024-04-08T18:34:10Z"));
    expect(parseFitsDate("08/04/24")).toBeUndefined();
  });

  it("ignores a zero or negative exposure rather than trusting it", () => {
    expect(readFitsMetadata(new Map([["EXPTIME", 0]])).exposureS).toBeUndefined();
  });
});

describe("applyClockOffset", () => {
  it("moves the capture time back by a clock that ran ahead, and replaces an earlier correction", () => {
    const base = { exposureS: 1, captureTimeMs: Date.parse("2024-04-08T18:34:10Z") };
    const ahead = applyClockOffset(base, 12.5);
    expect(ahead.captureTimeMs).toBe(Date.parse("2024-04-08T18:33:57.500Z"));
    expect(applyClockOffset(ahead, -2).captureTimeMs).toBe(Date.parse("2024-04-08T18:34:12Z"));
    expect(applyClockOffset({ exposureS: 1 }, 5)).toEqual({ exposureS: 1 });
    expect(() => applyClockOffset(base, Number.NaN)).toThrow(/not a finite number/);
  });
});
