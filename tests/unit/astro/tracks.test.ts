import { describe, expect, it } from "vitest";
import { AstroError, interpolateTrack, parseCsvTrack, parseGpxTrack } from "@/lib/astro";

const GPX = `<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="test" xmlns="http://www.topografix.com/GPX/1/1">
  <trk><name>test track</name><trkseg>
    <trkpt lat="34.60" lon="11.40"><ele>12.5</ele><time>2027-08-02T09:00:00Z</time></trkpt>
    <trkpt lon='11.50' lat='34.70'>
      <time>2027-08-02T09:10:00Z</time>
    </trkpt>
    <trkpt lat="34.80" lon="11.60"><time>2027-08-02T09:20:00.500+00:00</time></trkpt>
  </trkseg></trk>
</gpx>`;

describe("GPX tracks", () => {
  it("reads points with either attribute order and quoting, optional elevation and times", () => {
    const pts = parseGpxTrack(GPX);
    expect(pts).toHaveLength(3);
    expect(pts[0]).toEqual({ latDeg: 34.6, lonDeg: 11.4, elevationM: 12.5, timeMs: Date.parse("2027-08-02T09:00:00Z") });
    expect(pts[1].lonDeg).toBe(11.5);
    expect(pts[1].elevationM).toBeUndefined();
    expect(pts[2].timeMs).toBe(Date.parse("2027-08-02T09:20:00.500Z"));
  });

  it("names the point and line of a point without a timestamp", () => {
    const bad = GPX.replace("<time>2027-08-02T09:10:00Z</time>", "");
    expect(() => parseGpxTrack(bad)).toThrow(AstroError);
    expect(() => parseGpxTrack(bad)).toThrow(/track point 2 \(line 5\): the timestamp is missing/);
  });

  it("names a latitude out of range and times that go backwards", () => {
    expect(() => parseGpxTrack(GPX.replace('lat="34.80"', 'lat="94.80"'))).toThrow(/track point 3 \(line 8\): latitude must be a number in \[-90, 90\]/);
    expect(() => parseGpxTrack(GPX.replace("09:20:00.500", "09:05:00"))).toThrow(/track point 3 \(line 8\): time does not increase/);
  });

  it("refuses a time without a zone and a file that is not GPX", () => {
    expect(() => parseGpxTrack(GPX.replace("09:10:00Z", "09:10:00"))).toThrow(/track point 2 .*not an ISO 8601 UTC time/);
    expect(() => parseGpxTrack("<kml></kml>")).toThrow(/not GPX/);
  });
});

describe("CSV tracks", () => {
  const CSV = ["time,lat,lon,elevation_m,speed", "2027-08-02T09:00:00Z,34.6,11.4,10,5", "", "2027-08-02T09:10:00Z,34.7,11.5,,5"].join("\n");

  it("reads columns by header name and skips blank lines", () => {
    const pts = parseCsvTrack(CSV);
    expect(pts).toHaveLength(2);
    expect(pts[0]).toEqual({ timeMs: Date.parse("2027-08-02T09:00:00Z"), latDeg: 34.6, lonDeg: 11.4, elevationM: 10 });
    expect(pts[1].elevationM).toBeUndefined();
  });

  it("names the line of a bad value and a missing column", () => {
    expect(() => parseCsvTrack(CSV.replace(",34.7,", ",abc,"))).toThrow(/line 4: latitude/);
    expect(() => parseCsvTrack(CSV.replace(",11.5,", ",200,"))).toThrow(/line 4: longitude must be a number in \[-180, 180\]/);
    expect(() => parseCsvTrack(CSV.replace("2027-08-02T09:10:00Z", ""))).toThrow(/line 4: the timestamp is missing/);
    expect(() => parseCsvTrack(CSV.replace("time,", "when,"))).toThrow(/line 1: the header has no "time" column/);
  });

  it("needs two points", () => {
    expect(() => parseCsvTrack("time,lat,lon\n2027-08-02T09:00:00Z,1,2")).toThrow(/at least two points/);
  });
});

describe("position on a track", () => {
  const pts = parseGpxTrack(GPX);

  it("interpolates linearly between fixes", () => {
    const p = interpolateTrack(pts, Date.parse("2027-08-02T09:05:00Z"));
    expect(p.latDeg).toBeCloseTo(34.65, 12);
    expect(p.lonDeg).toBeCloseTo(11.45, 12);
    // Elevation: 12.5 m at the first fix and none (0) at the second.
    expect(p.elevationM).toBeCloseTo(6.25, 12);
  });

  it("crosses the 180th meridian the short way", () => {
    const dateLine = [
      { timeMs: 0, latDeg: 10, lonDeg: 179.8 },
      { timeMs: 1000, latDeg: 10, lonDeg: -179.8 },
    ];
    expect(interpolateTrack(dateLine, 500).lonDeg).toBeCloseTo(180, 9);
    expect(interpolateTrack(dateLine, 750).lonDeg).toBeCloseTo(-179.9, 9);
  });

  it("takes an end point a few seconds outside and refuses beyond", () => {
    const first = pts[0].timeMs;
    expect(interpolateTrack(pts, first - 5_000).latDeg).toBe(34.6);
    expect(() => interpolateTrack(pts, first - 60_000)).toThrow(/outside the track, which runs from 2027-08-02T09:00:00.000Z/);
    expect(() => interpolateTrack(pts, first - 5_000, 0)).toThrow(AstroError);
  });
});
