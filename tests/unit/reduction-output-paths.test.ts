// Which paths the reduction files route serves, and the names and URLs it gives them.
import { describe, expect, it } from "vitest";
import { buildOutputDownloadName, buildOutputUrl, findOutputContentType, isReductionOutputPath } from "@/lib/reductions/files/manifest";

describe("isReductionOutputPath", () => {
  it.each([
    "master.fits", "natural.png", "structure.png", "preview.jpg", "preview-structure.jpg", "coverage.png", "report.json",
    "tiles/natural.dzi", "tiles/structure_files/12/3_4.jpg", "tiles/natural-iiif/info.json",
    "tiles/structure-iiif/5632,3584,368,416/368,416/0/default.jpg", "tiles/natural-iiif/full/max/0/default.jpg",
  ])("serves %s", (path) => expect(isReductionOutputPath(path)).toBe(true));

  it.each([
    "", "../master.fits", "tiles/../report.json", "/master.fits", "tiles/natural_files/../../report.json", "tiles/other.dzi",
    "master.fits.bak", "Master.fits", "tiles/natural_files/1/a_b.jpg", "tiles/natural-iiif/info.json/../../x", "report.json%00", "tiles\\natural.dzi",
  ])("refuses %j", (path) => expect(isReductionOutputPath(path)).toBe(false));
});

describe("content types, download names and URLs", () => {
  it("types each output by its extension", () => {
    expect(findOutputContentType("master.fits")).toBe("application/fits");
    expect(findOutputContentType("tiles/natural.dzi")).toBe("application/xml");
    expect(findOutputContentType("tiles/natural_files/0/0_0.jpg")).toBe("image/jpeg");
  });

  it("names downloads after the set, the reduction and the file, in header-safe characters", () => {
    expect(buildOutputDownloadName("Luxor: “long lens” é", "1a2b3c4d-0000-4000-8000-000000000000", "natural.png")).toBe("luxor-long-lens-e-1a2b3c4d-natural.png");
    expect(buildOutputDownloadName("!!!", "1a2b3c4d-0000", "tiles/natural.dzi")).toBe("bracket-set-1a2b3c4d-tiles-natural.dzi");
  });

  it("builds the route's URL, with ?download=1 when asked", () => {
    expect(buildOutputUrl("abc", "tiles/natural.dzi")).toBe("/api/reductions/abc/files/tiles/natural.dzi");
    expect(buildOutputUrl("abc", "master.fits", { download: true })).toBe("/api/reductions/abc/files/master.fits?download=1");
  });
});
