// The planner's pure parts on the demo scenario's eclipse (2027 August 2).
// Contact times themselves are checked against published values in
// tests/unit/astro; here we check what the planner builds from them.
import { describe, expect, it } from "vitest";
import { buildLadderCsv, buildTimelineCalendar } from "@/lib/planner/exports";
import { computeFieldPlan } from "@/lib/planner/plan";
import { planFileName } from "@/lib/planner/route-helpers";
import { findCentralPath, findTotalityReach, roundDistanceKm } from "@/lib/planner/path";
import { parsePlannerQuery, plannerQuerySchema } from "@/lib/planner/resolve";
import { resolveSensor } from "@/lib/planner/sensor-formats";

// 2027-08-02 greatest eclipse from our own catalogue search; the planner only
// needs a date near the maximum.
const PEAK = Date.UTC(2027, 7, 2, 10, 7);
const luxor = { latDeg: 25.69, lonDeg: 32.64, elevationM: 80, name: "Luxor" };

describe("field plan", () => {
  const plan = computeFieldPlan({
    eclipseId: "2027-08-02",
    eclipsePeakUtcMs: PEAK,
    site: luxor,
    kit: { name: "lens", fNumber: 8, focalMm: 800, pixelPitchUm: 4.3, sensorWidthMm: 36, sensorHeightMm: 24, mount: "equatorial" },
    isos: [100, 400],
  });

  it("orders the timeline C1, C2, maximum, C3, C4 and counts from second contact", () => {
    expect(plan.timeline.map((e) => e.key)).toEqual(["C1", "C2", "MAX", "C3", "C4"]);
    const times = plan.timeline.map((e) => e.utcMs);
    expect([...times].sort((a, b) => a - b)).toEqual(times);
    expect(plan.timeline[1].fromSecondContactS).toBe(0);
    expect(plan.timeline[3].fromSecondContactS).toBe(Math.round(plan.circumstances.centralDurationS!));
  });

  it("gives a ladder row for every phenomenon and ISO, exposures following t = f^2 / (ISO 2^Q) (NASA RP 1369)", () => {
    expect(plan.ladder).toHaveLength(12 * 2);
    for (const s of plan.ladder) expect(s.exposureS).toBeCloseTo((8 * 8) / (s.iso * 2 ** s.q), 12);
  });

  it("draws the frame in solar radii from the kit (36 x 24 mm at 800 mm)", () => {
    // Computed: field angle 2 atan(18 / 800) = 2.578 deg = 9281 arcsec across, over the day's
    // solar radius (about 946 arcsec in early August) = 9.81 radii.
    expect(plan.frame!.widthRsun).toBeCloseTo(9281 / plan.sunSemiDiameterArcsec, 1);
    expect(plan.sunSemiDiameterArcsec).toBeGreaterThan(944);
    expect(plan.sunSemiDiameterArcsec).toBeLessThan(948);
    expect(plan.frame!.widthRsun / plan.frame!.heightRsun).toBeCloseTo(1.5, 2);
  });

  it("puts solar north at P from image up on an equatorial mount squared to north", () => {
    expect(plan.northInImageDeg).toBe(0);
    expect(plan.solarNorthInImageDeg).toBeCloseTo(plan.pDeg, 9);
  });

  it("writes an iCalendar with one event per contact, in UTC, with whole seconds", () => {
    const ics = buildTimelineCalendar(plan, { eclipseId: "2027-08-02", siteName: "Luxor", latDeg: 25.69, lonDeg: 32.64 });
    expect(ics).toMatch(/^BEGIN:VCALENDAR/);
    expect(ics.match(/BEGIN:VEVENT/g)).toHaveLength(5);
    const c2 = new Date(Math.round(plan.timeline[1].utcMs / 1000) * 1000).toISOString().replace(/[-:]/g, "").slice(0, 15) + "Z";
    expect(ics).toContain(`DTSTART:${c2}`);
    expect(ics).toContain("GEO:25.69;32.64");
  });

  it("keeps every timeline instant in whole seconds, so the calendar and the page show the same second", () => {
    const ics = buildTimelineCalendar(plan, { eclipseId: "2027-08-02", siteName: "Luxor", latDeg: 25.69, lonDeg: 32.64 });
    const starts = [...ics.matchAll(/DTSTART:(\d{8}T\d{6}Z)/g)].map((m) => m[1]);
    expect(starts).toHaveLength(plan.timeline.length);
    plan.timeline.forEach((e, i) => {
      expect(e.utcMs % 1000).toBe(0);
      // What the timeline table prints in its UTC column (HH:MM:SS) is this instant's clock.
      expect(starts[i]).toBe(new Date(e.utcMs).toISOString().replace(/[-:]/g, "").slice(0, 15) + "Z");
    });
    // Rounded, not cut: within half a second of the contact itself.
    expect(Math.abs(plan.timeline[1].utcMs - plan.circumstances.secondContact!.utcMs)).toBeLessThanOrEqual(500);
  });

  it("writes a CSV ladder with a header and quoted cells where needed (RFC 4180)", () => {
    const csv = buildLadderCsv(plan);
    const lines = csv.trimEnd().split("\r\n");
    expect(lines[0]).toBe("phenomenon,iso,f_number,exposure_s,marked_speed,reach_rsun,filter_density");
    expect(lines).toHaveLength(1 + 24);
    expect(lines[1]).toMatch(/^"Partial phase, ND 5.0 filter",100,8,/);
  });
});

describe("planner query", () => {
  it("names the field and the fault for bad input", () => {
    const r = plannerQuerySchema.safeParse({ lat: "91", isos: "100,abc", tz: "Mars/Olympus" });
    expect(r.success).toBe(false);
    const fields = r.error!.issues.map((i) => i.path[0]).sort();
    expect(fields).toEqual(["isos", "lat", "tz"]);
  });

  it("reads the address field by field: a bad value is reported in words and the rest is kept", () => {
    const { query, problems } = parsePlannerQuery({ lat: "abc", lon: "12.5", isos: "100,800", sensor: "potato", tz: ["Europe/Madrid", "UTC"] });
    expect(query.lat).toBeUndefined();
    expect(query.lon).toBe(12.5);
    expect(query.isos).toEqual([100, 800]);
    expect(query.tz).toBe("Europe/Madrid");
    expect(problems.map((p) => p.field).sort()).toEqual(["lat", "sensor"]);
    expect(problems.find((p) => p.field === "lat")!.message).toBe("Latitude: expected a number from -90 to 90 degrees (north positive); the address gave “abc”.");
    for (const p of problems) expect(p.message).not.toMatch(/^(lat|sensor)\b/);
  });

  it("asks for the other sensor size when only one is typed", () => {
    const { problems } = parsePlannerQuery({ sw: "23.5", sh: "" });
    expect(problems).toEqual([{ field: "sh", label: "Sensor height", message: "Sensor height: needed as well when the other size is typed." }]);
  });

  it("takes a sensor from the list, and typed sizes over it", () => {
    expect(resolveSensor({ sensor: "full-frame" })).toEqual({ widthMm: 36, heightMm: 24 });
    expect(resolveSensor({ sensor: "full-frame", sw: 17.3, sh: 13 })).toEqual({ widthMm: 17.3, heightMm: 13 });
    expect(resolveSensor({ sw: 17.3 })).toBeNull();
    expect(resolveSensor({})).toBeNull();
  });

  it("defaults to ISO 100 and 400 in UTC", () => {
    const q = plannerQuerySchema.parse({});
    expect(q.isos).toEqual([100, 400]);
    expect(q.tz).toBe("UTC");
  });

  it("makes safe download names", () => {
    const name = planFileName({ eclipse: { id: "2027-08-02" }, input: { site: { name: "Cádiz / playa \"La Victoria\"" } } } as never, "ics");
    expect(name).toBe("eclipse-2027-08-02-ca-diz-playa-la-victoria.ics");
  });
});

describe("field plan on a moving site", () => {
  it("follows a ship's track: contacts differ from those of its starting point", () => {
    // A ship steaming 30 km east-north-east during the eclipse in the Gulf of Gabes.
    const track = [
      { timeMs: Date.UTC(2027, 7, 2, 7, 30), latDeg: 34.5, lonDeg: 11.2 },
      { timeMs: Date.UTC(2027, 7, 2, 10, 30), latDeg: 34.7, lonDeg: 11.5 },
    ];
    const common = { eclipseId: "2027-08-02", eclipsePeakUtcMs: PEAK, kit: { name: "lens", fNumber: 8 }, isos: [100] };
    const moving = computeFieldPlan({ ...common, site: { latDeg: 34.5, lonDeg: 11.2, elevationM: 0, name: "ship", track } });
    const still = computeFieldPlan({ ...common, site: { latDeg: 34.5, lonDeg: 11.2, elevationM: 0, name: "start" } });
    expect(moving.circumstances.kind).toBe("total");
    expect(moving.timeline[1].utcMs).not.toBe(still.timeline[1].utcMs);
    // First contact happens where the ship was at 08:3x, still near its start: within a few seconds.
    expect(Math.abs(moving.timeline[0].utcMs - still.timeline[0].utcMs)).toBeLessThan(60_000);
  });
});

describe("outside the path", () => {
  const eclipse = { id: "2027-08-02", peakAt: new Date(PEAK).toISOString() };

  it("gives a partial site the partial ladder only, and the way to totality", () => {
    const tunis = { latDeg: 36.8, lonDeg: 10.18, elevationM: 0, name: "Tunis" };
    const plan = computeFieldPlan({ eclipseId: "2027-08-02", eclipsePeakUtcMs: PEAK, site: tunis, kit: { name: "lens", fNumber: 8 }, isos: [100] });
    expect(plan.circumstances.kind).toBe("partial");
    expect(new Set(plan.ladder.map((s) => s.phenomenon))).toEqual(new Set(["partial-nd5", "partial-nd4"]));
    const reach = findTotalityReach(findCentralPath(eclipse)!, tunis)!;
    expect(reach.direction).toMatch(/^south/);
    // The suggested place is inside the path: it sees totality.
    const inside = computeFieldPlan({ eclipseId: "2027-08-02", eclipsePeakUtcMs: PEAK, site: { ...reach.inside, elevationM: 0, name: "inside" }, kit: { name: "lens", fNumber: 8 }, isos: [100] });
    expect(inside.circumstances.kind).toBe("total");
  });

  it("remembers a path once computed", () => {
    expect(findCentralPath(eclipse)).toBe(findCentralPath(eclipse));
  });

  it("rounds distances the way people say them", () => {
    expect(roundDistanceKm(0.3)).toBe(1);
    expect(roundDistanceKm(7.6)).toBe(8);
    expect(roundDistanceKm(43)).toBe(45);
    expect(roundDistanceKm(236)).toBe(240);
  });
});
