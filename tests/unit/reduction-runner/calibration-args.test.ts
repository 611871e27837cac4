import { describe, expect, it } from "vitest";
import { parseReduceArgs, REDUCE_USAGE } from "@/lib/reduction-runner/cli-args";

describe("parseReduceArgs: calibration frames", () => {
  it("takes --bias, --dark and --flat, each repeatable, in the order given", () => {
    const args = parseReduceArgs(["--out", "o", "--bias", "b1.fits", "--dark=d1.fits", "--bias", "b2.fits", "--flat", "f1.fits", "--dark", "d2.fits", "l1.fits", "l2.fits"]);
    expect(args.calibrationFiles).toEqual({ bias: ["b1.fits", "b2.fits"], dark: ["d1.fits", "d2.fits"], flat: ["f1.fits"] });
    expect(args.files).toEqual(["l1.fits", "l2.fits"]);
    expect(parseReduceArgs(["--out", "o", "l1.fits"]).calibrationFiles).toBeUndefined();
    expect(REDUCE_USAGE).toContain("[--bias FILE]... [--dark FILE]... [--flat FILE]...");
  });

  it("refuses a missing file, a file given as two kinds and a light given as calibration", () => {
    expect(() => parseReduceArgs(["--out", "o", "l1.fits", "--dark"])).toThrow(/^--dark: a value is required\nusage:/);
    expect(() => parseReduceArgs(["--out", "o", "--flat=", "l1.fits"])).toThrow(/^--flat: a file is required/);
    expect(() => parseReduceArgs(["--out", "o", "--bias", "x.fits", "--dark", "x.fits", "l1.fits"])).toThrow(/^x\.fits: given twice among --bias, --dark and --flat/);
    expect(() => parseReduceArgs(["--out", "o", "--flat", "l1.fits", "l1.fits", "l2.fits"])).toThrow(/^l1\.fits: given both as a calibration frame and as a frame of the bracket/);
  });
});

describe("parseReduceArgs: the scratch folder", () => {
  it("takes --scratch for the frames kept on disk, and names it when its value is missing", () => {
    expect(parseReduceArgs(["--out", "o", "--scratch", "/mnt/big", "l1.fits", "l2.fits"]).scratchDir).toBe("/mnt/big");
    expect(parseReduceArgs(["--out", "o", "l1.fits"]).scratchDir).toBeUndefined();
    expect(() => parseReduceArgs(["--out", "o", "l1.fits", "--scratch"])).toThrow(/^--scratch: a value is required\nusage:/);
    expect(REDUCE_USAGE).toContain("[--scratch DIR]");
  });
});
