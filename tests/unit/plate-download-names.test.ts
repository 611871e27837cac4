import { describe, expect, it } from "vitest";
import { isPlateDownloadName, plateDownloadName } from "@/lib/plates/download-names";
import { filterEclipses, parseEclipseFilter } from "@/lib/eclipses/filter";

describe("plate download names", () => {
  it("follow one pattern: slug, version, what, extension", () => {
    expect(plateDownloadName("corona-over-luxor", 2, "web")).toBe("corona-over-luxor-v2-web.jpg");
    expect(plateDownloadName("corona-over-luxor", 2, "natural")).toBe("corona-over-luxor-v2-natural-16bit.png");
    expect(plateDownloadName("corona-over-luxor", 2, "structure")).toBe("corona-over-luxor-v2-structure-16bit.png");
    expect(plateDownloadName("corona-over-luxor", 2, "master")).toBe("corona-over-luxor-v2-master.fits");
    expect(plateDownloadName("Odd \"slug\"/..", 1, "master")).toBe("odd-slug-v1-master.fits");
  });

  it("accept a name from an address only for the very file it names", () => {
    expect(isPlateDownloadName("corona-over-luxor-v2-master.fits", "master.fits")).toBe(true);
    expect(isPlateDownloadName("corona-over-luxor-v2-master.fits", "natural.png")).toBe(false);
    expect(isPlateDownloadName("corona-v1-natural-16bit.png", "natural.png")).toBe(true);
    expect(isPlateDownloadName('x"; filename="evil.exe', "master.fits")).toBe(false);
    expect(isPlateDownloadName("corona-v1-master.fits\r\nSet-Cookie: a=b", "master.fits")).toBe(false);
    expect(isPlateDownloadName("corona-v1-web.jpg", "preview.jpg")).toBe(false);
  });
});

describe("eclipse list filter", () => {
  const rows = (["total", "annular", "hybrid", "partial"] as const).map((kind, i) => ({ id: `2030-0${i + 1}-01`, kind, peakAt: "", peakLatDeg: null, peakLonDeg: null, name: null, featured: false }));

  it("keeps one kind", () => {
    const { filter, problems } = parseEclipseFilter({ kind: "hybrid", when: "past" });
    expect(problems).toEqual([]);
    expect(filter).toEqual({ kind: "hybrid", when: "past" });
    expect(filterEclipses(rows, filter).map((e) => e.kind)).toEqual(["hybrid"]);
  });

  it("names a bad value and shows everything instead", () => {
    const { filter, problems } = parseEclipseFilter({ kind: "blue", when: ["soon"] });
    expect(filter).toEqual({});
    expect(problems).toHaveLength(2);
    expect(problems[0]).toMatch(/^Kind: expected total, annular, hybrid or partial; the address gave “blue”/);
    expect(filterEclipses(rows, filter)).toHaveLength(4);
  });
});
