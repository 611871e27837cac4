import { describe, expect, it } from "vitest";
import { findCalibrationFault, isCalibrationKind, type FrameShape } from "@/lib/bracket-sets/calibration-check";

const shape = (name: string, width: number, height: number, extra: Partial<FrameShape> = {}): FrameShape => ({
  originalFileName: name, format: "fits", width, height, bitDepth: 16, planeCount: 1, ...extra,
});

describe("findCalibrationFault", () => {
  const lights = [shape("l1.fits", 6000, 4000), shape("l2.fits", 6000, 4000), shape("odd-crop.fits", 3000, 2000)];

  it("accepts a 16-bit frame of the lights' size and planes", () => {
    expect(findCalibrationFault("flat", shape("f.fits", 6000, 4000), lights)).toBeNull();
    expect(isCalibrationKind("light")).toBe(false);
    expect(isCalibrationKind("bias")).toBe(true);
  });

  it("compares with the size most light frames share", () => {
    expect(findCalibrationFault("dark", shape("d.fits", 3000, 2000), lights)).toBe(
      "d.fits: 3000 x 2000 pixels, but the light frames of this set are 6000 x 4000; a dark frame must come from the same camera at the same size, uncropped.",
    );
  });

  it("refuses 8-bit files whatever their size, naming the format", () => {
    expect(findCalibrationFault("flat", shape("f.jpg", 6000, 4000, { format: "jpeg", bitDepth: 8, planeCount: 3 }), lights)).toMatch(/^f\.jpg: an 8-bit JPEG cannot serve as a flat frame/);
    expect(findCalibrationFault("bias", shape("b.png", 6000, 4000, { format: "png", bitDepth: 8 }), [])).toMatch(/^b\.png: an 8-bit PNG cannot serve as a bias frame/);
  });

  it("refuses other colour planes, and skips the test when a plane count is unknown", () => {
    expect(findCalibrationFault("dark", shape("d.tif", 6000, 4000, { planeCount: 3 }), lights)).toMatch(/^d\.tif: 3 colour planes, but the light frames of this set have one grey plane/);
    expect(findCalibrationFault("dark", shape("d.tif", 6000, 4000, { planeCount: undefined }), lights)).toBeNull();
  });

  it("without lights, compares with the other calibration frames; with neither, accepts", () => {
    expect(findCalibrationFault("dark", shape("d.fits", 100, 100), [], [shape("b.fits", 200, 100)])).toMatch(/^d\.fits: 100 x 100 pixels, but the other calibration frames of this set are 200 x 100/);
    expect(findCalibrationFault("dark", shape("d.fits", 100, 100), [], [])).toBeNull();
  });
});

describe("the light frames' colour planes, whatever order the rows come in", () => {
  const shape = (name: string, planeCount: number, bitDepth = 16, format = "fits") => ({ originalFileName: name, format, width: 128, height: 96, bitDepth, planeCount });
  // Two grey raws, one colour raw marked light by mistake, and a phone's JPEG (8-bit, never calibrated).
  const lights = [shape("light-1.fits", 1), shape("light-2.fits", 1), shape("dark-colour.fits", 3), shape("flat-phone.jpg", 3, 8, "jpeg")];
  it("takes the count most linear lights share, in either order", () => {
    for (const order of [lights, [...lights].reverse(), [lights[2], lights[3], lights[0], lights[1]]]) {
      expect(findCalibrationFault("dark", shape("dark-good.fits", 1), order)).toBeNull();
      expect(findCalibrationFault("dark", shape("dark-colour-2.fits", 3), order)).toMatch(/3 colour planes, but the light frames of this set have one grey plane/);
    }
  });
});
