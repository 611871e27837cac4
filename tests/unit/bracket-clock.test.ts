// The camera clock's offset from a frame that photographed a trusted clock:
// offset = camera capture time - the true time the clock showed; true time =
// camera time - offset (the convention of bracket_sets.clock_offset_s).
import { describe, expect, it } from "vitest";
import { clockOffsetFromFrame, computeClockOffsetS } from "@/lib/bracket-sets/clock";
import { updateBracketSetSchema } from "@/lib/bracket-sets/schemas";

describe("computeClockOffsetS", () => {
  it("is positive when the camera ran ahead and negative when it was behind", () => {
    const camera = Date.UTC(2027, 7, 2, 10, 6, 12, 500);
    expect(computeClockOffsetS(camera, Date.UTC(2027, 7, 2, 10, 4, 0))).toBe(132.5);
    expect(computeClockOffsetS(camera, Date.UTC(2027, 7, 2, 10, 7, 0))).toBe(-47.5);
  });

  it("gives back the true time when applied", () => {
    const camera = Date.UTC(2027, 7, 2, 8, 47, 3, 250);
    const shown = Date.UTC(2027, 7, 2, 8, 45, 58, 0);
    expect(camera - computeClockOffsetS(camera, shown) * 1000).toBe(shown);
  });
});

describe("clockOffsetFromFrame", () => {
  it("reads a time with a zone other than UTC", () => {
    // 12:04:00+02:00 is 10:04:00 UTC.
    const offset = clockOffsetFromFrame({ fileName: "clock.jpg", captureMs: Date.UTC(2027, 7, 2, 10, 4, 30) }, "2027-08-02T12:04:00+02:00");
    expect(offset).toBe(30);
  });

  it("refuses a frame without a capture time, naming the file", () => {
    expect(() => clockOffsetFromFrame({ fileName: "IMG_0042.JPG", captureMs: null }, "2027-08-02T10:04:00Z")).toThrow(/IMG_0042\.JPG has no capture time/);
  });

  it("refuses an offset of more than a day", () => {
    expect(() => clockOffsetFromFrame({ fileName: "clock.jpg", captureMs: Date.UTC(2027, 7, 2, 10, 4) }, "2026-08-02T10:04:00Z")).toThrow(/at most a day/);
  });
});

describe("updateBracketSetSchema", () => {
  it("takes either an offset or a frame with the time shown", () => {
    expect(updateBracketSetSchema.safeParse({ clockOffsetS: -12.5 }).success).toBe(true);
    expect(updateBracketSetSchema.safeParse({ clockFrameId: "6f1c2a3b-1d2e-4f5a-8b9c-0d1e2f3a4b5c", clockShownAt: "2027-08-02T10:04:00Z" }).success).toBe(true);
  });

  it("names the missing or doubled field", () => {
    const both = updateBracketSetSchema.safeParse({ clockOffsetS: 3, clockShownAt: "2027-08-02T10:04:00Z" });
    expect(both.success).toBe(false);
    expect(both.error?.issues[0].path).toEqual(["clockOffsetS"]);
    const noTime = updateBracketSetSchema.safeParse({ clockFrameId: "6f1c2a3b-1d2e-4f5a-8b9c-0d1e2f3a4b5c" });
    expect(noTime.error?.issues[0].path).toEqual(["clockShownAt"]);
    const badTime = updateBracketSetSchema.safeParse({ clockFrameId: "6f1c2a3b-1d2e-4f5a-8b9c-0d1e2f3a4b5c", clockShownAt: "ten past ten" });
    expect(badTime.error?.issues[0].path).toEqual(["clockShownAt"]);
    expect(updateBracketSetSchema.safeParse({}).success).toBe(false);
  });
});
