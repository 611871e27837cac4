import { describe, expect, it } from "vitest";
import { compareWithRendition, pixelsForWidth, SLOT_PRESETS, slotWidthPx } from "@/lib/editions/print-sizes";

describe("print sizes", () => {
  // shared/REFERENCES.md, "Print sizes (computed)": 300 dpi at 88 mm is 1039 px, at 120 mm 1417 px, at 180 mm 2126 px.
  it.each([
    ["single-column", 1039],
    ["wide-column", 1417],
    ["full-width", 2126],
  ] as const)("gives the REFERENCES.md check value for %s", (slot, px) => {
    expect(slotWidthPx(slot)).toBe(px);
  });

  it("gives every preset a width from round(mm / 25.4 x dpi) or its screen width", () => {
    // cover: 210 mm / 25.4 x 300 = 2480.3 -> 2480; web is a screen slot of 2048 px.
    expect(slotWidthPx("cover")).toBe(2480);
    expect(slotWidthPx("web")).toBe(2048);
    for (const slot of SLOT_PRESETS) expect(Number.isInteger(slotWidthPx(slot))).toBe(true);
  });

  it("computes custom widths and matches the reference values through the custom path too", () => {
    expect(slotWidthPx("custom", { widthMm: 88, dpi: 300 })).toBe(1039);
    expect(slotWidthPx("custom", { widthMm: 25.4, dpi: 72 })).toBe(72);
    expect(pixelsForWidth(60, 150)).toBe(354); // 60 / 25.4 x 150 = 354.33
  });

  it("refuses absurd parameters", () => {
    expect(() => pixelsForWidth(0, 300)).toThrow(/widthMm/);
    expect(() => pixelsForWidth(88, -1)).toThrow(/dpi/);
    expect(() => pixelsForWidth(Number.NaN, 300)).toThrow(/widthMm/);
    expect(() => slotWidthPx("custom")).toThrow(/custom/);
    expect(() => compareWithRendition("web", null, { width: 0, height: 10 })).toThrow(/positive/);
  });

  it("keeps the aspect ratio and does not warn when the rendition is large enough", () => {
    const r = compareWithRendition("full-width", null, { width: 3000, height: 2000 });
    expect(r.needed).toEqual({ width: 2126, height: 1417 });
    expect(r.enlargement).toBeNull();
    expect(r.warning).toBeNull();
  });

  it("flags enlargement beyond the rendition and says by how much", () => {
    // 1280 x 960, like the Luxor demo bracket: 180 mm at 300 dpi needs 2126 px, 1.66 times 1280.
    const r = compareWithRendition("full-width", null, { width: 1280, height: 960 });
    expect(r.needed).toEqual({ width: 2126, height: 1595 });
    expect(r.enlargement).toBeCloseTo(2126 / 1280, 6);
    expect(r.warning).toContain("66%");
    expect(r.warning).toContain("1280 x 960");
    // The export keeps the pixels: 1280 / (180 / 25.4) = 180.6 dpi.
    expect(r.warning).toContain("keeps 1280 px rather than enlarge, so it prints 180 mm wide at 180.6 dpi");
  });

  it("does not warn at exactly the rendition's width", () => {
    expect(compareWithRendition("single-column", null, { width: 1039, height: 700 }).enlargement).toBeNull();
    expect(compareWithRendition("single-column", null, { width: 1038, height: 700 }).enlargement).toBeGreaterThan(1);
  });
});
