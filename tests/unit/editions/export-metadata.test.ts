// The pure parts of a print bundle: export sizes never enlarge, the AVM
// spatial fields follow FITS conventions, GPS only for exact sites, the
// copyright notice follows the licence, and the house-style texts.
import { describe, expect, it } from "vitest";
import { exportJobId } from "@/lib/editions/export/active";
import { buildCaptionsText, buildCreditsText } from "@/lib/editions/export/house-style";
import { avmSpatial, buildPlateMetadata, copyrightNotice, metadataTags, sunRaDecDeg, type ExportPlateInput } from "@/lib/editions/export/metadata";
import { planPrintSize } from "@/lib/editions/export/render";
import { compareWithRendition, pixelsForWidth } from "@/lib/editions/print-sizes";

const sky = {
  masterWidth: 4000,
  masterHeight: 3000,
  sunCentrePx: { x: 1999.5, y: 1499.5 },
  plateScaleArcsecPerPx: 1.5,
  northAngleDeg: -20,
  referenceUtc: "2027-08-02T10:43:00Z",
  observer: { latDeg: 25.7, lonDeg: 32.65, elevationM: 80 },
};

const plate: ExportPlateInput = {
  slug: "luxor-inner-corona",
  version: 2,
  title: "Inner corona over Luxor",
  caption: "Streamers to four solar radii.",
  altText: "A black disk with pale streamers.",
  acquiredBy: "Nadia Fairweather",
  processedBy: "Tomasz Wielgosz",
  licence: "CC-BY-4.0",
  creditLine: "Nadia Fairweather / Kestrel Ridge AS",
  societyName: "Kestrel Ridge Astronomical Society",
  plateUrl: "http://localhost:3000/plates/luxor-inner-corona/v/2",
  rendition: "natural",
  eclipseDate: "2027-08-02",
  captureStartUtc: "2027-08-02T10:42:51.000Z",
  captureEndUtc: "2027-08-02T10:43:20.000Z",
  exposuresS: [0.001, 0.004, 0.25],
  kit: { name: "Ridge 600 mm", camera: "Halden C24", focalMm: 600, fNumber: 8 },
  site: { name: "West bank", precision: "rounded", latDeg: 25.7, lonDeg: 32.65, elevationM: 80 },
  sky,
};

describe("export sizes", () => {
  it("uses the slot's width when the rendition has it (88 mm at 300 dpi = 1039 px, shared/REFERENCES.md)", () => {
    const needed = compareWithRendition("single-column", null, { width: 4000, height: 3000 }).needed;
    expect(planPrintSize(needed, { width: 4000, height: 3000 }, { widthMm: 88, dpi: 300 })).toEqual({ width: 1039, height: 779, dpi: 300, widthMm: 88, shortfall: null });
  });

  it("keeps the rendition's pixels and lowers the dpi instead of enlarging", () => {
    // 180 mm at 300 dpi = 2126 px (REFERENCES.md) against a 1600 px rendition: 1600 / (180 / 25.4) = 225.8 dpi.
    const needed = { width: pixelsForWidth(180, 300), height: 1595 };
    const plan = planPrintSize(needed, { width: 1600, height: 1200 }, { widthMm: 180, dpi: 300 });
    expect(plan).toMatchObject({ width: 1600, height: 1200, dpi: 225.8, widthMm: 180 });
    expect(plan.shortfall).toContain("asks for 2126 px at 300 dpi but the rendition has 1600 px");
  });

  it("says so for a screen slot too, without a dpi", () => {
    const plan = planPrintSize({ width: 2048, height: 1536 }, { width: 1280, height: 960 }, { widthMm: null, dpi: null });
    expect(plan).toMatchObject({ width: 1280, height: 960, dpi: null });
    expect(plan.shortfall).toMatch(/2048 px .* 1280 px/);
  });
});

describe("AVM spatial fields", () => {
  it("puts the reference pixel at the Sun's centre in FITS convention (1-based, rows from the bottom)", () => {
    const s = avmSpatial(sky, 4000, 3000)!;
    // Master pixel (1999.5, 1499.5), 0-based from the top, is FITS (2000.5, 1500.5) in a 3000-row image.
    expect(s.referencePixel).toEqual([2000.5, 1500.5]);
    expect(s.referenceDimension).toEqual([4000, 3000]);
    expect(s.scale).toEqual([-1.5 / 3600, 1.5 / 3600].map((v) => Number(v.toFixed(10))));
    expect(s.rotation).toBe(340);
  });

  it("scales with the exported width about pixel centres", () => {
    const s = avmSpatial({ ...sky, sunCentrePx: { x: 0, y: 0 } }, 2000, 1500)!;
    // The centre of master pixel 0 is at 0.5 master px = 0.25 exported px, i.e. exported pixel -0.25 (0-based).
    expect(s.referencePixel).toEqual([0.75, 1500.25]);
    expect(s.scale[1]).toBeCloseTo(3 / 3600, 9);
  });

  it("is absent without a plate scale, a north angle, an instant or an observer", () => {
    for (const drop of ["plateScaleArcsecPerPx", "northAngleDeg", "referenceUtc", "observer", "sunCentrePx"] as const) {
      const partial = { ...sky };
      delete partial[drop];
      expect(avmSpatial(partial, 4000, 3000), drop).toBeNull();
    }
    expect(avmSpatial(null, 4000, 3000)).toBeNull();
  });

  it("gives the Sun's place near 2027 August 2: RA about 133 deg, Dec about +17.7 deg (astronomy-engine; rough values from memory of the season)", () => {
    const [ra, dec] = sunRaDecDeg("2027-08-02T10:43:00Z", sky.observer);
    expect(ra).toBeGreaterThan(130);
    expect(ra).toBeLessThan(136);
    expect(dec).toBeGreaterThan(17);
    expect(dec).toBeLessThan(18.5);
  });
});

describe("plate metadata", () => {
  it("leaves GPS out unless the site is exact", () => {
    expect(buildPlateMetadata(plate, 1039, 779).gps).toBeNull();
    expect(Object.keys(metadataTags(buildPlateMetadata(plate, 1039, 779), 300)).filter((k) => k.startsWith("GPS:"))).toEqual([]);
    const exact = buildPlateMetadata({ ...plate, site: { ...plate.site!, precision: "exact", latDeg: -33.9, lonDeg: -70.6 } }, 1039, 779);
    const tags = metadataTags(exact, 300);
    expect(tags).toMatchObject({ "GPS:GPSLatitude": 33.9, "GPS:GPSLatitudeRef": "S", "GPS:GPSLongitude": 70.6, "GPS:GPSLongitudeRef": "W" });
    expect(buildPlateMetadata({ ...plate, site: { ...plate.site!, precision: "hidden" } }, 1039, 779).gps).toBeNull();
  });

  it("names creators once, the facility and instrument from the kit, and the total exposure", () => {
    const m = buildPlateMetadata({ ...plate, processedBy: plate.acquiredBy }, 1039, 779);
    expect(m.creators).toEqual(["Nadia Fairweather"]);
    expect(m.avm.facility).toEqual(["Ridge 600 mm"]);
    expect(m.avm.instrument).toEqual(["Halden C24"]);
    expect(m.avm.temporalIntegrationTime).toEqual([0.255]);
    expect(m.avm.id).toBe("luxor-inner-corona-v2-natural");
    expect(buildPlateMetadata({ ...plate, kit: null }, 1039, 779).avm.facility).toEqual([]);
  });

  it("writes the licence into the copyright notice", () => {
    expect(copyrightNotice("Nadia Fairweather", "2027", "CC-BY-4.0")).toBe("© 2027 Nadia Fairweather. Licensed under CC BY 4.0.");
    expect(copyrightNotice("Nadia Fairweather", "2027", "all-rights-reserved")).toBe("© 2027 Nadia Fairweather. All rights reserved.");
    expect(copyrightNotice("Nadia Fairweather", "2027", "CC0-1.0")).toMatch(/public domain/);
  });

  it("tags the resolution only for printed slots", () => {
    const m = buildPlateMetadata(plate, 1039, 779);
    expect(metadataTags(m, 300)).toMatchObject({ XResolution: 300, YResolution: 300, ResolutionUnit: "inches" });
    expect(metadataTags(m, null).XResolution).toBeUndefined();
  });
});

describe("house style", () => {
  const edition = { title: "Corona Notes", issueLabel: "No. 41", societyName: "Kestrel Ridge Astronomical Society", embargoDate: "2027-09-01" };
  const entry = {
    position: 1,
    slotLabel: "Single column, 88 mm at 300 dpi",
    title: "Inner corona over Luxor",
    caption: "Streamers to four solar radii",
    creditLine: "Nadia Fairweather / Kestrel Ridge AS",
    acquiredBy: "Nadia Fairweather",
    processedBy: "Tomasz Wielgosz",
    licenceName: "Creative Commons Attribution 4.0 International",
    licenceUri: "http://creativecommons.org/licenses/by/4.0/",
    files: ["a.tif", "a.jpg"],
  };

  it("sets a caption as title, caption and credit in brackets, with the embargo on top", () => {
    const text = buildCaptionsText(edition, [entry]);
    expect(text.split("\n").slice(0, 3)).toEqual(["Kestrel Ridge Astronomical Society: Corona Notes, No. 41", "Captions, in print order", "Embargoed until 2027-09-01: nothing here may appear elsewhere before that day."]);
    expect(text).toContain("Plate 1 (Single column, 88 mm at 300 dpi)\nInner corona over Luxor. Streamers to four solar radii. (Nadia Fairweather / Kestrel Ridge AS)");
  });

  it("lists credits with the licence and the files", () => {
    const text = buildCreditsText({ ...edition, embargoDate: null }, [entry]);
    expect(text).not.toContain("Embargoed");
    expect(text).toContain("Data: Nadia Fairweather. Processing: Tomasz Wielgosz. Kestrel Ridge Astronomical Society.");
    expect(text).toContain("Files: a.tif, a.jpg");
  });
});

describe("export job ids", () => {
  it("match the literal the stale-export query joins on (lib/editions/export/active.ts)", () => {
    expect(exportJobId("0b9d8d7e-2f61-4c55-9a3e-5b1d2c3e4f50")).toBe("edition.export__exportId=0b9d8d7e-2f61-4c55-9a3e-5b1d2c3e4f50");
  });
});
