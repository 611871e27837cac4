// Track parsing must cost work in proportion to the file, not to its square:
// any member can send a track, and it is parsed on the request. The parser
// counts the characters it examines; a quadratic scan (looking up each
// point's line from the start of the text) would examine about n^2/2 and fail
// both the per-character bound and the 10x ratio below. CPU times are printed
// for the record, never asserted.
import { performance } from "node:perf_hooks";
import { describe, expect, it } from "vitest";
import { parseCsvTrack, parseGpxTrack, type ScanStats } from "@/lib/astro";
import { parseTrackText } from "@/lib/sites/track-file";
import { MAX_TRACK_POINTS } from "@/lib/sites/limits";

const START_MS = Date.parse("2027-08-02T08:00:00Z");

function gpxTrack(n: number): string {
  const parts = ['<?xml version="1.0" encoding="UTF-8"?>\n<gpx version="1.1" creator="cost-test" xmlns="http://www.topografix.com/GPX/1/1">\n<trk><trkseg>\n'];
  for (let i = 0; i < n; i++) {
    const t = new Date(START_MS + i * 1000).toISOString();
    parts.push(`  <trkpt lat="${(34 + i * 1e-6).toFixed(6)}" lon="${(11 + i * 1e-6).toFixed(6)}">\n    <ele>12</ele>\n    <time>${t}</time>\n  </trkpt>\n`);
  }
  parts.push("</trkseg></trk>\n</gpx>\n");
  return parts.join("");
}

function csvTrack(n: number): string {
  const rows = ["time,lat,lon,elevation_m"];
  for (let i = 0; i < n; i++) rows.push(`${new Date(START_MS + i * 1000).toISOString()},${(34 + i * 1e-6).toFixed(6)},${(11 + i * 1e-6).toFixed(6)},12`);
  return rows.join("\n") + "\n";
}

function measure(parse: (text: string, o: { stats: ScanStats }) => unknown[], text: string) {
  const stats: ScanStats = { charsExamined: 0 };
  const t0 = performance.now();
  const points = parse(text, { stats });
  return { points: points.length, chars: stats.charsExamined, ms: performance.now() - t0, perChar: stats.charsExamined / text.length };
}

describe("track parsing cost", () => {
  for (const [format, make, parse] of [
    ["GPX", gpxTrack, parseGpxTrack],
    ["CSV", csvTrack, parseCsvTrack],
  ] as const) {
    it(`${format}: 200,000 points examine about ten times what 20,000 do, a few passes over the text`, () => {
      const small = measure(parse, make(20_000));
      const large = measure(parse, make(MAX_TRACK_POINTS));
      expect(small.points).toBe(20_000);
      expect(large.points).toBe(200_000);
      // A linear scan reads each character a bounded number of times.
      expect(large.perChar).toBeLessThanOrEqual(4);
      const ratio = large.chars / small.chars;
      expect(ratio).toBeGreaterThan(9);
      expect(ratio).toBeLessThan(11);
      console.log(`${format} track: 200k/20k examined ${ratio.toFixed(2)}x, CPU ${(large.ms / small.ms).toFixed(2)}x (${large.ms.toFixed(0)} ms for 200,000 points)`);
    });
  }

  it("refuses points that are never closed after one pass, naming the first", () => {
    const n = 100_000;
    const text = `<gpx>\n${'<trkpt lat="1" lon="1"><time>2027-08-02T09:00:00Z</time>\n'.repeat(n)}</gpx>`;
    const stats: ScanStats = { charsExamined: 0 };
    expect(() => parseGpxTrack(text, { stats })).toThrow(/track point 1 \(line 2\): the point has no closing <\/trkpt>/);
    expect(stats.charsExamined / text.length).toBeLessThanOrEqual(2);
  });

  it("refuses a start tag without its '>' and element names that only begin alike", () => {
    expect(() => parseGpxTrack('<gpx>\n<trkpt lat="1" lon="1"')).toThrow(/track point 1 \(line 2\): the <trkpt> tag is not closed/);
    // <trkptx> and <timezone> are other elements: skipped, not read as points or times.
    const text = '<gpx><trkptx lat="9" lon="9"></trkptx><trkpt lat="1" lon="1"><timezone>x</timezone><time>2027-08-02T09:00:00Z</time></trkpt><trkpt lat="2" lon="2"/></gpx>';
    expect(() => parseGpxTrack(text)).toThrow(/track point 2 \(line 1\): the timestamp is missing/);
  });

  it("stops at the point limit instead of reading on", () => {
    const stats: ScanStats = { charsExamined: 0 };
    const text = gpxTrack(1000);
    expect(() => parseGpxTrack(text, { maxPoints: 100, stats })).toThrow(/more than the 100 points a track may hold/);
    expect(stats.charsExamined).toBeLessThan(text.length / 2);
    expect(() => parseTrackText(csvTrack(MAX_TRACK_POINTS + 1), "ship.csv")).toThrow(/^ship\.csv: the track has more than the 200000 points/);
  });
});
