import { describe, expect, it } from "vitest";
import { AT_SEA, findCountry } from "@/lib/geo/country";
import { findPublicOutput } from "@/lib/reductions/files/manifest";

const classifyReductionPath = (path: string, of: "reduction" | "composite" = "reduction") => findPublicOutput(path, of)?.entry.kind ?? null;
import { factsFromReport, geometryFromReport, slugify } from "@/lib/plates/publish";

describe("plate slugs", () => {
  it("keeps letters and digits, folds accents, and joins words with hyphens", () => {
    expect(slugify("Cádiz: the inner corona, 2027!")).toBe("cadiz-the-inner-corona-2027");
    expect(slugify("???")).toBe("plate");
    expect(slugify("x".repeat(200))).toHaveLength(80);
  });
});

describe("geometry for the viewer", () => {
  const report = {
    frames: [
      { exposure: { seconds: 0.125 }, sky: { midExposureUtc: "2027-08-02T10:04:46.062Z" } },
      { exposure: { seconds: 0.002 }, sky: { midExposureUtc: "2027-08-02T10:04:40.001Z" } },
    ],
    overall: {
      referenceFrame: "luxor-02.fits",
      masterSize: { width: 4000, height: 3000 },
      moonCentrePx: { x: 2010, y: 1490 },
      moonRadiusPx: 412,
      dynamicRangeStops: 13.2,
      sky: { sunCentrePx: { x: 2000, y: 1500 }, sunRadiusPx: 400, solarNorthAngleDeg: 21.5, plateScaleArcsecPerPx: 2.4, moonSilhouetteUtc: "2027-08-02T10:04:43.000Z" },
    },
  };

  it("scales master pixels to a smaller rendition and the plate scale inversely", () => {
    const g = geometryFromReport(report, 2000);
    expect(g.sunCentre).toEqual({ x: 1000, y: 750 });
    expect(g.sunRadiusPx).toBe(200);
    expect(g.moonCentre).toEqual({ x: 1005, y: 745 });
    expect(g.moonRadiusPx).toBe(206);
    expect(g.solarNorthAngleDeg).toBe(21.5);
    expect(g.plateScaleArcsecPerPx).toBe(4.8);
  });

  it("leaves out what the report lacks (no site: no Sun, no north)", () => {
    const g = geometryFromReport({ overall: { masterSize: { width: 100, height: 80 }, moonCentrePx: { x: 50, y: 40 }, moonRadiusPx: 10, sky: {} } }, 100);
    expect(g).toEqual({ moonCentre: { x: 50, y: 40 }, moonRadiusPx: 10 });
  });

  it("gathers exposures and the capture span in order", () => {
    const f = factsFromReport(report);
    expect(f.exposuresS).toEqual([0.002, 0.125]);
    expect(f.captureStartUtc).toBe("2027-08-02T10:04:40.001Z");
    expect(f.captureEndUtc).toBe("2027-08-02T10:04:46.062Z");
    expect(f.masterSize).toEqual({ width: 4000, height: 3000 });
  });
});

describe("country of a site", () => {
  // Natural Earth 1:110m outlines; the towns are well inside their countries.
  it("places Luxor in Egypt, Cadiz in Spain, and a ship in the Strait of Sicily at sea", () => {
    expect(findCountry(25.69, 32.64)).toBe("Egypt");
    expect(findCountry(36.53, -6.29)).toBe("Spain");
    expect(findCountry(37.4, 11.4)).toBe(AT_SEA);
  });
});

describe("reduction file paths", () => {
  it("serves tiles, the preview and downloads, and nothing else", () => {
    expect(classifyReductionPath("natural.dzi")).toBe("tile");
    expect(classifyReductionPath("structure_files/12/3_4.jpg")).toBe("tile");
    expect(classifyReductionPath("natural-iiif/info.json")).toBe("tile");
    expect(classifyReductionPath("natural-iiif/5632,3584,368,416/368,416/0/default.jpg")).toBe("tile");
    expect(classifyReductionPath("natural-iiif/full/375,250/0/default.jpg")).toBe("tile");
    expect(classifyReductionPath("preview.jpg")).toBe("preview");
    expect(classifyReductionPath("master.fits")).toBe("download");
    expect(classifyReductionPath("report.json")).toBeNull();
    expect(classifyReductionPath("../../originals/x")).toBeNull();
    expect(classifyReductionPath("natural_files/../../x.jpg")).toBeNull();
    // Stored under tiles/, asked for without it; nothing else under tiles/.
    expect(findPublicOutput("natural.dzi", "reduction")?.path).toBe("tiles/natural.dzi");
    expect(classifyReductionPath("tiles/natural.dzi")).toBeNull();
    expect(classifyReductionPath("preview-structure.jpg")).toBeNull();
    expect(classifyReductionPath("coverage.png")).toBeNull();
  });

  it("serves a composite's contribution map, which a reduction does not have", () => {
    expect(classifyReductionPath("contribution.jpg", "composite")).toBe("preview");
    expect(classifyReductionPath("contribution.jpg")).toBeNull();
    expect(classifyReductionPath("report.json", "composite")).toBeNull();
  });
});

describe("a plate's credit line", () => {
  it("follows the society's template, with the year of publication and the licence's short name", async () => {
    const { plateCreditLine } = await import("@/lib/plates/credit");
    const plate = { acquiredBy: "Nadia Fairweather", processedBy: "Crownlight pipeline (crownlight-imaging 0.1.0)", licence: "CC-BY-SA-4.0" as const, publishedAt: "2027-08-20T10:00:00.000Z" };
    expect(plateCreditLine("{acquiredBy} / {society}; processing: {processedBy}", "Kestrel Ridge Astronomical Society", plate)).toBe(
      "Nadia Fairweather / Kestrel Ridge Astronomical Society; processing: Crownlight pipeline (crownlight-imaging 0.1.0)",
    );
    expect(plateCreditLine("© {year} {acquiredBy}, {licence}", "KRAS", plate)).toBe("© 2027 Nadia Fairweather, CC BY-SA 4.0");
    expect(() => plateCreditLine("{photographer}", "KRAS", plate)).toThrow();
  });
});
