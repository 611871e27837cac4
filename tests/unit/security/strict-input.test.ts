// Numbers and dates read strictly wherever people or files give them: "0x20"
// is not 32 degrees, month 13 is not January of the next year.
import { describe, expect, it } from "vitest";
import { parseExposure } from "@/components/bracket-sets/exposure-text";
import { parseCsvTrack, parseGpxTrack } from "@/lib/astro/track-parse";
import { correctFrameSchema } from "@/lib/bracket-sets/schemas";
import { kitInputSchema } from "@/lib/kits/kits";
import { buildExifCaptureTime, parseFitsDate, readFitsMetadata, utcFromParts } from "@/lib/media/metadata";
import { isPlausibleExposure } from "@/lib/media/exposure";
import { fixedSiteSchema } from "@/lib/sites/sites";
import { parseStrictNumber } from "@/lib/strict-number";
import { parseInput } from "@/lib/validation";

describe("the strict number reader", () => {
  it("reads plain decimal notation", () => {
    expect([parseStrictNumber("-6.29"), parseStrictNumber(" 25.69 "), parseStrictNumber("1e-3"), parseStrictNumber(".5"), parseStrictNumber("+3")]).toEqual([-6.29, 25.69, 0.001, 0.5, 3]);
  });

  it("refuses what Number() would read: hex, binary, octal, blanks, Infinity", () => {
    for (const text of ["0x20", "0b11", "0o17", "", "   ", "Infinity", "-Infinity", "1e999", "12abc", "1,5", "NaN"]) expect(parseStrictNumber(text), text).toBeNaN();
    // The values Number() gives them, for the record: this is what was being accepted.
    expect([Number("0x20"), Number("  "), Number("0b11")]).toEqual([32, 0, 3]);
  });
});

describe("forms and files read numbers strictly", () => {
  const site = { name: "Luxor west bank", kind: "fixed", latDeg: "25.69", lonDeg: "32.64", elevationM: "80" };

  it("refuses a latitude written 0x20, naming the field", () => {
    expect(() => parseInput(fixedSiteSchema, { ...site, latDeg: "0x20" })).toThrow(/^Latitude: expected a number of degrees in decimal notation \(latitude\)/);
    expect(parseInput(fixedSiteSchema, site)).toMatchObject({ latDeg: 25.69, lonDeg: 32.64, elevationM: 80, publicLabel: "" });
    // A blank elevation takes its default; a blank latitude is refused, not read as 0.
    expect(parseInput(fixedSiteSchema, { ...site, elevationM: "" }).elevationM).toBe(0);
    expect(() => parseInput(fixedSiteSchema, { ...site, latDeg: " " })).toThrow(/^Latitude: /);
  });

  it("reads an exposure typed in the frame table strictly", () => {
    expect([parseExposure("1/250"), parseExposure("0.004"), parseExposure("2 s")]).toEqual([0.004, 0.004, 2]);
    expect([parseExposure("0x10"), parseExposure(" "), parseExposure("Infinity")]).toEqual([null, null, null]);
  });

  it("refuses a kit's focal length written in hex", () => {
    const kit = { name: "Refractor", camera: "Mono camera", sensorWidthMm: "13.2", sensorHeightMm: "8.8", pixelPitchUm: "2.4", focalMm: "0x258", fNumber: "7", mount: "equatorial" };
    expect(() => parseInput(kitInputSchema, kit)).toThrow(/^Focal length \(mm\): expected a number \(mm\)/);
    expect(parseInput(kitInputSchema, { ...kit, focalMm: "600" }).focalMm).toBe(600);
  });

  it("refuses a track point whose latitude is written in hex, naming the line", () => {
    const csv = "time,lat,lon\n2027-08-02T09:00:00Z,34.6,11.4\n2027-08-02T09:01:00Z,0x20,11.41\n";
    expect(() => parseCsvTrack(csv)).toThrow(/line 3/);
    const gpx = `<?xml version="1.0"?><gpx><trk><trkseg><trkpt lat="34.6" lon="11.4"><time>2027-08-02T09:00:00Z</time></trkpt><trkpt lat="0x20" lon="11.41"><time>2027-08-02T09:01:00Z</time></trkpt></trkseg></trk></gpx>`;
    expect(() => parseGpxTrack(gpx)).toThrow();
  });
});

describe("dates that do not exist are refused, never rolled over", () => {
  it("finds no instant in month 13, 31 April, 29 February of a common year, or 24 h", () => {
    expect(utcFromParts(2027, 13, 2)).toBeUndefined();
    expect(utcFromParts(2027, 4, 31)).toBeUndefined();
    expect(utcFromParts(2027, 2, 29)).toBeUndefined();
    expect(utcFromParts(2027, 8, 2, 24, 0, 0)).toBeUndefined();
    // 2028 is a leap year (Gregorian rule).
    expect(utcFromParts(2028, 2, 29)).toBe(Date.parse("2028-02-29T00:00:00Z"));
  });

  it("names DATE-OBS in the refusal of a FITS frame", () => {
    expect(() => parseFitsDate("2027-13-02T10:05:30")).toThrow(RangeError);
    expect(() => readFitsMetadata(new Map([["DATE-OBS", "2027-13-02T10:05:30.000"]]), "month-13.fits")).toThrow(
      'month-13.fits: card DATE-OBS: "2027-13-02T10:05:30.000" is not a real date and time; nothing was rolled over into another day',
    );
    expect(() => readFitsMetadata(new Map([["DATE-OBS", "2027-02-30"], ["TIME-OBS", "10:05:30"]]), "feb-30.fits")).toThrow(/card DATE-OBS \(with TIME-OBS\)/);
  });

  it("refuses an impossible EXIF DateTimeOriginal, but reads a never-set clock as no time", () => {
    expect(() => buildExifCaptureTime("2027:13:02 10:05:30")).toThrow(/DateTimeOriginal "2027:13:02 10:05:30" is not a real date and time/);
    expect(buildExifCaptureTime("0000:00:00 00:00:00")).toBeUndefined();
  });
});

describe("exposure times", () => {
  it("are plausible between a microsecond and an hour", () => {
    expect([1e-6, 1 / 8000, 0.5, 3600].every(isPlausibleExposure)).toBe(true);
    expect([1e-7, 3601, 1e9, 1e30, Number.NaN, Number.POSITIVE_INFINITY].some(isPlausibleExposure)).toBe(false);
  });

  it("typed by the photographer are held to the same range", () => {
    expect(() => parseInput(correctFrameSchema, { exposureS: 1e9 })).toThrow(/Exposure time: must be at most 3600 s/);
    expect(() => parseInput(correctFrameSchema, { exposureS: 1e-9 })).toThrow(/Exposure time: must be at least 0.000001 s/);
    expect(parseInput(correctFrameSchema, { exposureS: 0.004 }).exposureS).toBe(0.004);
  });
});
