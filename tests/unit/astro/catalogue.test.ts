import { describe, expect, it } from "vitest";
import { listSolarEclipses } from "@/lib/astro";

describe("eclipse catalogue", () => {
  const list = listSolarEclipses(2000, 2050);
  const on = (dateIso: string) => list.find((e) => e.dateIso === dateIso);

  it("finds a sane number of eclipses in 2000-2050", () => {
    // From memory: about 224 solar eclipses per century, so 110 to 120 in 51 years.
    // Measured: 114.
    expect(list.length).toBeGreaterThanOrEqual(110);
    expect(list.length).toBeLessThanOrEqual(120);
    // Every calendar year has at least two and at most five solar eclipses (from memory).
    for (let y = 2000; y <= 2050; y++) {
      const n = list.filter((e) => e.dateIso.startsWith(String(y))).length;
      expect(n, String(y)).toBeGreaterThanOrEqual(2);
      expect(n, String(y)).toBeLessThanOrEqual(5);
    }
    // In time order, each at least one lunation (29.3 days) after the previous.
    for (let i = 1; i < list.length; i++) {
      expect(list[i].peakUtcMs - list[i - 1].peakUtcMs).toBeGreaterThan(29 * 86_400_000);
    }
  });

  it("knows the central eclipses of 2023 to 2027", () => {
    expect(on("2024-04-08")?.kind).toBe("total");
    expect(on("2023-10-14")?.kind).toBe("annular");
    const luxor = on("2027-08-02");
    expect(luxor?.kind).toBe("total");
    // Greatest eclipse in Egypt, near Luxor (from memory): a box around Upper Egypt.
    expect(luxor!.peakLatDeg!).toBeGreaterThan(22);
    expect(luxor!.peakLatDeg!).toBeLessThan(30);
    expect(luxor!.peakLonDeg!).toBeGreaterThan(28);
    expect(luxor!.peakLonDeg!).toBeLessThan(36);
  });

  it("tells hybrid eclipses from total ones", () => {
    // Hybrid (annular-total) eclipses of 2013 November 3 and 2023 April 20 (from memory).
    expect(on("2013-11-03")?.kind).toBe("hybrid");
    expect(on("2023-04-20")?.kind).toBe("hybrid");
    expect(on("2017-08-21")?.kind).toBe("total");
  });

  it("has no point for a partial eclipse", () => {
    const partial = list.find((e) => e.kind === "partial")!;
    expect(partial.peakLatDeg).toBeNull();
    expect(partial.peakLonDeg).toBeNull();
  });

  it("names the field of a bad year range", () => {
    expect(() => listSolarEclipses(2030, 2020)).toThrow(/toYear/);
    expect(() => listSolarEclipses(2020.5, 2021)).toThrow(/fromYear must be a whole year/);
  });
});
