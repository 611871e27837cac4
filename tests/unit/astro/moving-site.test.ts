import { describe, expect, it } from "vitest";
import { findLocalCircumstances, findLocalCircumstancesOnTrack, type TrackPoint } from "@/lib/astro";

// Gulf of Gabes, inside the path of 2027 August 2; the times bracket totality there.
const START = Date.parse("2027-08-02T09:03:00Z");
const END = Date.parse("2027-08-02T09:23:00Z");
const DAY = Date.UTC(2027, 7, 2);

describe("local circumstances on a moving site", () => {
  it("equals the fixed site when the track stands still", () => {
    const still: TrackPoint[] = [
      { timeMs: START, latDeg: 34.6, lonDeg: 11.4 },
      { timeMs: END, latDeg: 34.6, lonDeg: 11.4 },
    ];
    const moving = findLocalCircumstancesOnTrack(still, DAY);
    const fixed = findLocalCircumstances({ latDeg: 34.6, lonDeg: 11.4, elevationM: 0 }, DAY);
    expect(moving.kind).toBe("total");
    expect(Math.abs(moving.secondContact!.utcMs - fixed.secondContact!.utcMs)).toBeLessThan(2);
    expect(Math.abs(moving.thirdContact!.utcMs - fixed.thirdContact!.utcMs)).toBeLessThan(2);
  });

  it("lengthens totality when travelling with the shadow and shortens it against", () => {
    // 250 m/s is about 0.00273 deg of longitude per second at 34.6 N: 3.3 deg in 20 minutes.
    const spanDeg = 0.00273 * ((END - START) / 1000);
    const eastbound: TrackPoint[] = [
      { timeMs: START, latDeg: 34.6, lonDeg: 11.4 - spanDeg / 2 },
      { timeMs: END, latDeg: 34.6, lonDeg: 11.4 + spanDeg / 2 },
    ];
    const westbound = eastbound.map((p, i) => ({ ...p, lonDeg: eastbound[1 - i].lonDeg }));
    const withShadow = findLocalCircumstancesOnTrack(eastbound, DAY);
    const againstShadow = findLocalCircumstancesOnTrack(westbound, DAY);
    // The umbra runs east at well under 1 km/s here, so 0.25 km/s changes totality by tens of seconds.
    expect(withShadow.centralDurationS! - againstShadow.centralDurationS!).toBeGreaterThan(20);
  });

  it("refuses an empty track", () => {
    expect(() => findLocalCircumstancesOnTrack([], DAY)).toThrow(/track has no points/);
  });
});
