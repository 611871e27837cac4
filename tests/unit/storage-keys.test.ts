// Object keys: unique per frame, safe characters only, never a path that climbs
// out of its prefix, and the extension kept when a long name is cut.
import { describe, expect, it } from "vitest";
import { buildOriginalKey, buildThumbnailKey, countParts, MAX_FILE_SIZE_BYTES, MAX_PARTS, PART_SIZE_BYTES, toSafeFileName } from "@/lib/storage";

const SET = "0b6f1f5e-3c1d-4c56-9a53-2f0a4c1e7d10";
const FRAME = "9d2c7a61-55e4-4f0b-8c3e-5b1d2a7f0c99";

describe("toSafeFileName", () => {
  it("keeps an ordinary camera name as it is", () => {
    expect(toSafeFileName("IMG_0042.CR3")).toBe("IMG_0042.CR3");
  });

  it("drops folders, including Windows ones and attempts to climb", () => {
    expect(toSafeFileName("../../etc/passwd")).toBe("passwd");
    expect(toSafeFileName("C:\\Users\\me\\Totality\\frame 1.tif")).toBe("frame-1.tif");
  });

  it("folds accents and replaces other characters", () => {
    expect(toSafeFileName("Cádiz corona #3 (1⁄250 s).jpg")).toBe("Cadiz-corona-3-1-250-s.jpg");
  });

  it("never starts with a dot and never comes back empty", () => {
    expect(toSafeFileName(".hidden.fits")).toBe("hidden.fits");
    expect(toSafeFileName("…")).toBe("file");
    expect(toSafeFileName("")).toBe("file");
  });

  it("cuts a long name to 120 characters and keeps the extension", () => {
    const safe = toSafeFileName(`${"x".repeat(300)}.fits`);
    expect(safe).toHaveLength(120);
    expect(safe.endsWith(".fits")).toBe(true);
  });
});

describe("key builders", () => {
  it("puts an original under its set and frame", () => {
    expect(buildOriginalKey(SET, FRAME, "sub/dir/IMG 7.tif")).toBe(`originals/${SET}/${FRAME}/IMG-7.tif`);
  });

  it("gives two frames with the same file name different keys", () => {
    const other = "1a2b3c4d-0000-4000-8000-000000000001";
    expect(buildOriginalKey(SET, FRAME, "a.tif")).not.toBe(buildOriginalKey(SET, other, "a.tif"));
  });

  it("puts thumbnails under derived/", () => {
    expect(buildThumbnailKey(SET, FRAME)).toBe(`derived/${SET}/frames/${FRAME}/thumbnail.jpg`);
  });

  it("refuses an id that is not a UUID, so no key can be steered elsewhere", () => {
    expect(() => buildOriginalKey("../x", FRAME, "a.tif")).toThrow(/bracket set id must be a UUID/);
    expect(() => buildThumbnailKey(SET, "")).toThrow(/frame id must be a UUID/);
  });
});

describe("limits", () => {
  it("fits the largest file into S3's part count", () => {
    expect(countParts(MAX_FILE_SIZE_BYTES)).toBe(256);
    expect(countParts(MAX_FILE_SIZE_BYTES)).toBeLessThanOrEqual(MAX_PARTS);
    expect(PART_SIZE_BYTES).toBeGreaterThanOrEqual(5 * 1024 * 1024);
  });

  it("counts parts at the boundaries", () => {
    expect(countParts(1)).toBe(1);
    expect(countParts(PART_SIZE_BYTES)).toBe(1);
    expect(countParts(PART_SIZE_BYTES + 1)).toBe(2);
  });
});
