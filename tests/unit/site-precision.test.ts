import { describe, expect, it } from "vitest";
import { toPublicPosition } from "@/lib/sites/precision";

describe("public position of a site", () => {
  it("shows an exact site as it is", () => {
    expect(toPublicPosition(25.6872, 32.6396, "exact")).toEqual({ latDeg: 25.6872, lonDeg: 32.6396, precision: "exact" });
  });

  it("rounds to a 0.1 degree grid, within about 10 km of the truth", () => {
    const p = toPublicPosition(25.6872, 32.6396, "rounded")!;
    expect(p).toEqual({ latDeg: 25.7, lonDeg: 32.6, precision: "rounded" });
    // Distance from the true place, equirectangular (fine at this scale): at most
    // half a grid step in each axis, about 7.8 km at the equator.
    const kmPerDeg = 111.2;
    const dLat = (p.latDeg - 25.6872) * kmPerDeg;
    const dLon = (p.lonDeg - 32.6396) * kmPerDeg * Math.cos((25.6872 * Math.PI) / 180);
    expect(Math.hypot(dLat, dLon)).toBeLessThan(10);
  });

  it("never prints more decimals than the grid allows", () => {
    const p = toPublicPosition(-33.3333333, -70.6666666, "rounded")!;
    expect(String(p.latDeg)).toBe("-33.3");
    expect(String(p.lonDeg)).toBe("-70.7");
  });

  it("shows nothing of a hidden site", () => {
    expect(toPublicPosition(36.53, -6.29, "hidden")).toBeNull();
  });
});
