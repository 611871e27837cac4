import { describe, expect, it } from "vitest";
import { AstroError, findLocalCircumstances } from "@/lib/astro";

const sec = (ms: number) => ms / 1000;
const utc = (iso: string) => Date.parse(iso);

describe("local circumstances, 2024 April 8 at 29.6 N, 98.5 W", () => {
  const site = { latDeg: 29.6, lonDeg: -98.5, elevationM: 0 };
  const c = findLocalCircumstances(site, Date.UTC(2024, 3, 8));

  it("is total with contacts within a few seconds of the published times", () => {
    // sunpy's tests (DE440s): partial 17:14:49 to 19:56:00, totality 18:33:44 to 18:35:32 UTC.
    // Times are printed to 1 s and the ephemerides and Delta T differ: 3 s tolerance.
    // Measured here: C1 +1.2 s, C2 +1.5 s, C3 -1.1 s, C4 -0.4 s.
    expect(c.kind).toBe("total");
    expect(Math.abs(sec(c.firstContact.utcMs - utc("2024-04-08T17:14:49Z")))).toBeLessThan(3);
    expect(Math.abs(sec(c.secondContact!.utcMs - utc("2024-04-08T18:33:44Z")))).toBeLessThan(3);
    expect(Math.abs(sec(c.thirdContact!.utcMs - utc("2024-04-08T18:35:32Z")))).toBeLessThan(3);
    expect(Math.abs(sec(c.fourthContact.utcMs - utc("2024-04-08T19:56:00Z")))).toBeLessThan(3);
    expect(Math.abs(c.centralDurationS! - 108)).toBeLessThan(4);
  });

  it("improves on the mean-radius contacts for second and third contact", () => {
    // REFERENCES: astronomy-engine's mean lunar radius gives 18:33:37 and 18:35:35 (7 s and 3 s off).
    const published2 = utc("2024-04-08T18:33:44Z");
    const published3 = utc("2024-04-08T18:35:32Z");
    const ours = Math.abs(c.secondContact!.utcMs - published2) + Math.abs(c.thirdContact!.utcMs - published3);
    const engine = Math.abs(c.engineContactsUtcMs.second! - published2) + Math.abs(c.engineContactsUtcMs.third! - published3);
    expect(ours).toBeLessThan(engine);
  });

  it("orders the contacts, puts maximum between them and reports the Sun high in the south", () => {
    const times = [c.firstContact, c.secondContact!, c.maximum, c.thirdContact!, c.fourthContact].map((e) => e.utcMs);
    expect([...times].sort((a, b) => a - b)).toEqual(times);
    expect(c.magnitude).toBeGreaterThan(1);
    expect(c.obscuration).toBe(1);
    // The Sun culminates near 18:30 UTC there at about 68 deg (90 - 29.6 + 7.6 dec).
    expect(c.maximum.sunAltDeg).toBeGreaterThan(60);
    expect(c.maximum.sunAzDeg).toBeGreaterThan(150);
    expect(c.maximum.sunAzDeg).toBeLessThan(210);
    // First contact on the Sun's western limb: the Moon moves east across it.
    expect(c.firstContact.positionAngleDeg).toBeGreaterThan(180);
  });
});

describe("local circumstances, 2027 August 2", () => {
  it("lasts close to the greatest duration at Luxor", () => {
    const c = findLocalCircumstances({ latDeg: 25.69, lonDeg: 32.64, elevationM: 0 }, Date.UTC(2027, 7, 2));
    // Greatest duration about 6 min 23 s near Luxor (from memory): Luxor is near, not at, the
    // point of greatest duration, and the recalled value is to 1 s: 6 s tolerance. Measured: 380.9 s.
    expect(c.kind).toBe("total");
    expect(Math.abs(c.centralDurationS! - 383)).toBeLessThan(6);
  });

  it("is only partial north of Tunis", () => {
    const c = findLocalCircumstances({ latDeg: 37.2, lonDeg: 10.2, elevationM: 0 }, Date.UTC(2027, 7, 2));
    expect(c.kind).toBe("partial");
    expect(c.secondContact).toBeNull();
    expect(c.thirdContact).toBeNull();
    expect(c.centralDurationS).toBeNull();
    expect(c.magnitude).toBeGreaterThan(0.5);
    expect(c.magnitude).toBeLessThan(1);
    expect(c.obscuration).toBeGreaterThan(0);
    expect(c.obscuration).toBeLessThan(1);
  });
});

describe("local circumstances, errors", () => {
  it("names the site when no eclipse is seen near the date", () => {
    // 2027-08-02 is not visible from Sydney.
    expect(() => findLocalCircumstances({ latDeg: -33.87, lonDeg: 151.21, elevationM: 0 }, Date.UTC(2027, 7, 2))).toThrow(
      /no solar eclipse is visible from latitude -33.87, longitude 151.21/,
    );
  });

  it("refuses a latitude out of range, naming the field", () => {
    const bad = () => findLocalCircumstances({ latDeg: 95, lonDeg: 0, elevationM: 0 }, Date.UTC(2027, 7, 2));
    expect(bad).toThrow(AstroError);
    expect(bad).toThrow(/site\.latDeg/);
  });
});
