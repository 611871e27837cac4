// Times and exposures given for many frames at once: the CSV reader (every bad
// row named by line and column), times of day on the eclipse's date, times in
// shot order from a first time and an interval, and exposures shown as typed.
import { describe, expect, it } from "vitest";
import { formatExposure, parseExposure } from "@/lib/bracket-sets/exposure-text";
import { assignIntervalTimes, compareShotOrder, describeCsvProblems, parseCameraTime, parseTimesCsv } from "@/lib/bracket-sets/frame-times";
import { describeReductionFailure, rewordRunnerMessage } from "@/lib/reductions/failure-text";
import { assessRunChoices } from "@/lib/reductions/run-options";
import { ReductionInputError } from "@/lib/reduction-runner/errors";
import { describeOrientation } from "@/lib/bracket-sets/orientation";

const DAY = "2027-08-02";
const at = (iso: string) => Date.parse(iso);

describe("camera times", () => {
  it("reads ISO 8601 with Z or an offset, and a bare time of day as UTC on the eclipse's date", () => {
    expect(parseCameraTime("2027-08-02T10:04:31.25Z")).toEqual({ ms: at("2027-08-02T10:04:31.250Z") });
    // 12:04:31 at +02:00 is 10:04:31 UTC.
    expect(parseCameraTime("2027-08-02T12:04:31+02:00")).toEqual({ ms: at("2027-08-02T10:04:31Z") });
    expect(parseCameraTime("2027-08-02 12:04:31+0200")).toEqual({ ms: at("2027-08-02T10:04:31Z") });
    expect(parseCameraTime("10:04:31.5", DAY)).toEqual({ ms: at("2027-08-02T10:04:31.500Z") });
    expect(parseCameraTime("9:04:31", DAY)).toEqual({ ms: at("2027-08-02T09:04:31Z") });
  });

  it("refuses times without a zone, impossible dates and clock fields, in words", () => {
    expect(parseCameraTime("2027-08-02T10:04:31")).toEqual({ problem: expect.stringContaining("has no time zone") });
    // Date.parse would roll 30 February into March; a camera's list with it is wrong.
    expect(parseCameraTime("2027-02-30T10:00:00Z")).toEqual({ problem: expect.stringContaining("is not a date") });
    expect(parseCameraTime("2027-08-02T24:00:00Z")).toEqual({ problem: expect.stringContaining("hour 24 is past 23") });
    expect(parseCameraTime("10:61:00", DAY)).toEqual({ problem: expect.stringContaining("minute 61") });
    // Without the eclipse's date a bare time cannot be placed.
    expect(parseCameraTime("10:04:31")).toEqual({ problem: expect.stringContaining("2027-08-02T10:04:31.25Z") });
  });
});

describe("the times CSV", () => {
  it("reads file, capture_time and exposure_s in any order, with quotes, folders, other separators and empty cells", () => {
    const csv = '\uFEFFnote;exposure_s;file;capture_time\r\nfirst;1/1000;"cards/IMG_0001.TIF";2027-08-02T10:04:40Z\r\n;0.2817;IMG_0002.TIF;\r\nx;;IMG_0003.TIF;10:04:44.5\r\n';
    const { rows, problems } = parseTimesCsv(csv, DAY);
    expect(problems).toEqual([]);
    expect(rows).toEqual([
      { line: 2, fileName: "IMG_0001.TIF", captureMs: at("2027-08-02T10:04:40Z"), exposureS: 0.001 },
      { line: 3, fileName: "IMG_0002.TIF", exposureS: 0.2817 },
      { line: 4, fileName: "IMG_0003.TIF", captureMs: at("2027-08-02T10:04:44.500Z") },
    ]);
  });

  it("names every bad row by line and column", () => {
    const csv = ["file,capture_time,exposure_s", "a.fits,2027-08-02T10:04:40Z,1/250", "b.fits,2027-08-02T10:04:41,1/125", "c.fits,2027-08-02T10:04:42Z,-2", "a.fits,,0.5", ",,", '"d.fits,2027'].join("\n");
    const { problems } = parseTimesCsv(csv, DAY);
    expect(problems).toEqual([
      { line: 3, column: "capture_time", message: expect.stringContaining("has no time zone") },
      { line: 4, column: "exposure_s", message: expect.stringContaining("is not a positive number of seconds") },
      { line: 5, column: "file", message: "a.fits is listed again (first on line 2)" },
      { line: 6, column: "file", message: "is empty" },
      { line: 7, column: null, message: "a quoted field is not closed" },
    ]);
    const text = describeCsvProblems("times.csv", problems);
    expect(text).toMatch(/^times\.csv was not used, nothing was changed\. line 3, column capture_time: /);
    expect(text).toContain("line 4, column exposure_s:");
  });

  it("refuses a header without the needed columns, an empty file, and a header with no rows", () => {
    expect(parseTimesCsv("name,time\na,b", DAY).problems[0]).toEqual({ line: 1, column: null, message: expect.stringContaining('found "name", "time"') });
    expect(parseTimesCsv("\n\n", DAY).problems[0].message).toContain("the file is empty");
    expect(parseTimesCsv("file,exposure_s\n", DAY).problems[0].message).toContain("no frames under it");
  });
});

describe("times in shot order", () => {
  it("sorts by the camera's numbering and spaces the frames by the interval", () => {
    const items = ["IMG_10.CR2", "IMG_9.CR2", "img_11.cr2", "IMG_8.CR2"].map((fileName) => ({ fileName }));
    const first = at("2027-08-02T10:04:40Z");
    const timed = assignIntervalTimes(items, first, 0.7);
    expect(timed.map((t) => t.item.fileName)).toEqual(["IMG_8.CR2", "IMG_9.CR2", "IMG_10.CR2", "img_11.cr2"]);
    // 0.7 s apart, each computed from the first (3 x 0.7 s = 2.1 s, not three rounded steps).
    expect(timed.map((t) => t.captureMs - first)).toEqual([0, 700, 1400, 2100]);
    expect(compareShotOrder("a2.fits", "a10.fits")).toBeLessThan(0);
  });

  it("refuses an interval outside 1 ms to an hour", () => {
    expect(() => assignIntervalTimes([{ fileName: "a" }], 0, 0)).toThrow(RangeError);
    expect(() => assignIntervalTimes([{ fileName: "a" }], 0, 3601)).toThrow(RangeError);
  });
});

describe("exposures as typed", () => {
  it("shows fractions only where the value is one, and decimals at their precision", () => {
    expect(formatExposure(0.2817)).toBe("0.2817 s");
    expect(formatExposure(1 / 250)).toBe("1/250 s");
    expect(formatExposure(0.004)).toBe("1/250 s");
    expect(formatExposure(1 / 3)).toBe("1/3 s");
    expect(formatExposure(0.3)).toBe("0.3 s");
    expect(formatExposure(2.5)).toBe("2.5 s");
    expect(formatExposure(1)).toBe("1 s");
    expect(parseExposure("1/250 s")).toBeCloseTo(0.004, 12);
    expect(parseExposure("4e-3")).toBeCloseTo(0.004, 12);
    expect(parseExposure("-1")).toBeNull();
    expect(parseExposure("0")).toBeNull();
    expect(parseExposure("fast")).toBeNull();
  });
});

describe("runs offered and reasons in words", () => {
  it("does not offer alignment on the Sun when a frame has no time, and says which", () => {
    const choices = assessRunChoices([{ fileName: "a.tif", hasTime: true }, { fileName: "b.tif", hasTime: false }], true);
    expect(choices.sun.isOffered).toBe(false);
    expect(choices.sun.note).toContain("1 of 2 frames have none (b.tif)");
    expect(choices.corona).toEqual({ isOffered: true, note: expect.stringContaining("no sky coordinates") });
    expect(assessRunChoices([{ fileName: "a.tif", hasTime: true }], true).sun).toEqual({ isOffered: true, note: null });
  });

  it("words the runner's failures without its command-line options", () => {
    const orientation = new ReductionInputError(
      "orientation-unknown",
      "Image orientation unknown: the Moon moved only 0.21 px against the corona over the bracket's 4.0 s, too little to find it (estimate 12.0 +- 40.0 deg); say how the camera was mounted (the kit's mount, or --north-angle on the command line)",
    );
    const text = describeReductionFailure(orientation);
    expect(text).not.toMatch(/--[a-z]/);
    expect(text).toContain("the Moon moved only 0.21 px");
    expect(text).toContain("give the north angle on the bracket set's page");
    const times = describeReductionFailure(new ReductionInputError("missing-capture-time", "a.tif, b.tif: no capture time in the file (EXIF DateTimeOriginal or FITS DATE-OBS); --register sun needs each frame's time"));
    expect(times).toMatch(/^These frames have no capture time: a\.tif, b\.tif\. Give their times/);
    expect(rewordRunnerMessage("x: the track runs from A to B but does not cover f, taken at T (camera time with --clock-offset applied)")).toContain("with the set's clock offset applied");
    expect(rewordRunnerMessage("first part; --unknown-option: mystery")).toBe("first part");
  });

  it("asks for the mount or a north angle when nothing gives north", () => {
    expect(describeOrientation(null, null)).toMatchObject({ source: "estimated", needsAnswer: true });
    expect(describeOrientation({ name: "Lens", mount: "hand-held" }, null).text).toContain("hand-held camera");
    expect(describeOrientation({ name: "Lens", mount: "equatorial" }, null)).toMatchObject({ source: "mount", needsAnswer: false });
    expect(describeOrientation({ name: "Lens", mount: "hand-held" }, -12.5)).toMatchObject({ source: "given", text: expect.stringContaining("12.5° clockwise") });
  });
});

describe("the file picker and the reach chart's gaps", () => {
  it("offers exactly the extensions ingest reads", async () => {
    const { FRAME_EXTENSIONS } = await import("@/components/bracket-sets/upload-limits");
    const { EXTENSION_FORMATS } = await import("@/lib/media/sniff");
    expect([...FRAME_EXTENSIONS].sort()).toEqual(Object.keys(EXTENSION_FORMATS).sort());
  });

  it("finds stretches no frame covers well, from the limb out", async () => {
    const { findReachGaps } = await import("@/lib/bracket-sets/triage");
    // Two bands that meet, then a hole from 2.4 to 3.1, and a band inside another.
    const bands = [
      { from: 1.05, to: 1.6 },
      { from: 1.6, to: 2.4 },
      { from: 3.1, to: 5.0 },
      { from: 3.5, to: 4.0 },
      { from: null, to: null },
    ];
    expect(findReachGaps(bands, 1)).toEqual([
      { from: 1, to: 1.05 },
      { from: 2.4, to: 3.1 },
    ]);
    expect(findReachGaps([], 1)).toEqual([]);
  });
});
