// Tracks of moving sites (ships, aircraft) from GPX 1.1 or CSV text.
// No XML package is installed, and GPX track points are simple, so a small
// scanner reads <trkpt lat=".." lon=".."> elements with optional <ele> and
// <time> children; everything else in the file is ignored. Errors name the
// point (1-based, in file order) and its line.
import { AstroError } from "./errors";
import { parseStrictNumber } from "@/lib/strict-number";

export interface TrackPoint {
  timeMs: number;
  latDeg: number;
  lonDeg: number;
  elevationM?: number;
}

/** A time zone or Z is required: a track time without one could be any of 25 hours. */
const ISO_UTC_RE = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/;

/**
 * Work a parse did, in characters examined. Every search below moves forward
 * only, so the count stays a small multiple of the text's length; tests use it
 * to show that the cost is linear (a track is sent by any member).
 */
export interface ScanStats {
  charsExamined: number;
}

export interface TrackParseOptions {
  /** Refuse the track as soon as it has more points than this. */
  maxPoints?: number;
  stats?: ScanStats;
}

/** Line numbers for increasing positions in one text, each character read once. */
class LineCounter {
  private index = 0;
  private line = 1;

  constructor(
    private readonly text: string,
    private readonly stats: ScanStats,
  ) {}

  at(index: number): number {
    for (let i = this.index; i < index; i++) if (this.text.charCodeAt(i) === 10) this.line++;
    if (index > this.index) {
      this.stats.charsExamined += index - this.index;
      this.index = index;
    }
    return this.line;
  }
}

/** indexOf that adds the stretch it read to the stats. */
function find(text: string, needle: string, from: number, stats: ScanStats): number {
  const at = text.indexOf(needle, from);
  stats.charsExamined += (at < 0 ? text.length : at + needle.length) - from;
  return at;
}

function isNameEnd(code: number): boolean {
  // whitespace, '>' or '/': the element name ends here (<time> but not <timezone>)
  return code === 32 || code === 9 || code === 10 || code === 13 || code === 62 || code === 47;
}

/** The next start tag of `name` at or after `from`: where it begins and the index of its '>', or null. */
function findStartTag(text: string, name: string, from: number, stats: ScanStats): { start: number; close: number } | null {
  let pos = from;
  for (;;) {
    const start = find(text, `<${name}`, pos, stats);
    if (start < 0) return null;
    if (!isNameEnd(text.charCodeAt(start + name.length + 1))) {
      pos = start + 1;
      continue;
    }
    const close = find(text, ">", start + name.length + 1, stats);
    return { start, close };
  }
}

function readAttribute(attributes: string, name: string): string | null {
  const m = new RegExp(`\\b${name}\\s*=\\s*("([^"]*)"|'([^']*)')`).exec(attributes);
  return m ? (m[2] ?? m[3]) : null;
}

/** The text of the first <name> child in a point's body, or null when there is none (or it is not closed). */
function readChild(body: string, name: string, stats: ScanStats): string | null {
  const tag = findStartTag(body, name, 0, stats);
  if (!tag || tag.close < 0) return null;
  if (body.charCodeAt(tag.close - 1) === 47) return "";
  const end = find(body, `</${name}`, tag.close + 1, stats);
  return end < 0 ? null : body.slice(tag.close + 1, end).trim();
}

/** Plain decimal notation only (lib/strict-number.ts): "0x20" is not 32. */
function parseNumber(raw: string | null): number {
  return raw === null ? NaN : parseStrictNumber(raw);
}

/** Parses an ISO 8601 instant that names its offset; NaN when it does not. */
export function parseIsoUtcMs(raw: string): number {
  const s = raw.trim();
  if (!ISO_UTC_RE.test(s)) return NaN;
  return Date.parse(s);
}

function checkPoint(where: string, p: { latDeg: number; lonDeg: number; timeMs: number; elevationM?: number }, rawTime: string | null): void {
  if (!Number.isFinite(p.latDeg) || p.latDeg < -90 || p.latDeg > 90) {
    throw new AstroError("bad-track", `${where}: latitude must be a number in [-90, 90]`, "lat");
  }
  if (!Number.isFinite(p.lonDeg) || p.lonDeg < -180 || p.lonDeg > 180) {
    throw new AstroError("bad-track", `${where}: longitude must be a number in [-180, 180]`, "lon");
  }
  if (rawTime === null || rawTime.trim() === "") {
    throw new AstroError("bad-track", `${where}: the timestamp is missing`, "time");
  }
  if (!Number.isFinite(p.timeMs)) {
    throw new AstroError("bad-track", `${where}: the timestamp "${rawTime}" is not an ISO 8601 UTC time such as 2027-08-02T09:13:00Z`, "time");
  }
  if (p.elevationM !== undefined && !Number.isFinite(p.elevationM)) {
    throw new AstroError("bad-track", `${where}: the elevation is not a number`, "elevation");
  }
}

function checkOrder(points: TrackPoint[], where: string[]): void {
  if (points.length < 2) {
    throw new AstroError("bad-track", `a track needs at least two points with times, found ${points.length}`, "track");
  }
  for (let i = 1; i < points.length; i++) {
    if (points[i].timeMs <= points[i - 1].timeMs) {
      throw new AstroError("bad-track", `${where[i]}: time does not increase after the previous point`, "time");
    }
  }
}

function checkCount(points: TrackPoint[], options: TrackParseOptions): void {
  if (options.maxPoints !== undefined && points.length > options.maxPoints) {
    throw new AstroError("bad-track", `the track has more than the ${options.maxPoints} points a track may hold`, "track");
  }
}

/**
 * Points of every track segment of a GPX file, in file order. One pass: each
 * search starts where the previous one ended, so the work grows with the
 * file's length, never with its square.
 */
export function parseGpxTrack(gpx: string, options: TrackParseOptions = {}): TrackPoint[] {
  if (typeof gpx !== "string" || !/<gpx\b/.test(gpx)) {
    throw new AstroError("bad-track", "the file is not GPX: no <gpx> element", "track");
  }
  const stats = options.stats ?? { charsExamined: 0 };
  const lines = new LineCounter(gpx, stats);
  const points: TrackPoint[] = [];
  const where: string[] = [];
  let pos = 0;
  for (;;) {
    const tag = findStartTag(gpx, "trkpt", pos, stats);
    if (!tag) break;
    const label = `track point ${points.length + 1} (line ${lines.at(tag.start)})`;
    if (tag.close < 0) throw new AstroError("bad-track", `${label}: the <trkpt> tag is not closed with ">"`, "track");
    const selfClosing = gpx.charCodeAt(tag.close - 1) === 47;
    const attributes = gpx.slice(tag.start + 6, selfClosing ? tag.close - 1 : tag.close);
    let body = "";
    pos = tag.close + 1;
    if (!selfClosing) {
      const end = find(gpx, "</trkpt", pos, stats);
      if (end < 0) throw new AstroError("bad-track", `${label}: the point has no closing </trkpt>`, "track");
      body = gpx.slice(pos, end);
      const endClose = find(gpx, ">", end, stats);
      pos = endClose < 0 ? gpx.length : endClose + 1;
    }
    const rawTime = readChild(body, "time", stats);
    const rawEle = readChild(body, "ele", stats);
    const p: TrackPoint = {
      latDeg: parseNumber(readAttribute(attributes, "lat")),
      lonDeg: parseNumber(readAttribute(attributes, "lon")),
      timeMs: rawTime === null ? NaN : parseIsoUtcMs(rawTime),
    };
    if (rawEle !== null) p.elevationM = parseNumber(rawEle);
    checkPoint(label, p, rawTime);
    points.push(p);
    where.push(label);
    checkCount(points, options);
  }
  checkOrder(points, where);
  return points;
}

function splitCsvLine(line: string): string[] {
  return line.split(",").map((f) => f.trim().replace(/^"(.*)"$/, "$1").trim());
}

/**
 * A CSV track: a header row naming the columns time (ISO 8601 UTC), lat, lon and optionally
 * elevation_m, in any order; other columns are ignored; blank lines are skipped.
 */
export function parseCsvTrack(csv: string, options: TrackParseOptions = {}): TrackPoint[] {
  if (typeof csv !== "string") throw new AstroError("bad-track", "the CSV track must be text", "track");
  const lines = csv.replace(/^\uFEFF/, "").split(/\r?\n/);
  const headerIndex = lines.findIndex((l) => l.trim() !== "");
  if (headerIndex < 0) throw new AstroError("bad-track", "the CSV track is empty", "track");
  const header = splitCsvLine(lines[headerIndex]).map((h) => h.toLowerCase());
  const column = (name: string, required: boolean): number => {
    const i = header.indexOf(name);
    if (i < 0 && required) {
      throw new AstroError("bad-track", `line ${headerIndex + 1}: the header has no "${name}" column (expected time, lat, lon, optional elevation_m)`, name);
    }
    return i;
  };
  const iTime = column("time", true);
  const iLat = column("lat", true);
  const iLon = column("lon", true);
  const iEle = column("elevation_m", false);

  const points: TrackPoint[] = [];
  const where: string[] = [];
  const stats = options.stats ?? { charsExamined: 0 };
  stats.charsExamined += csv.length; // the split above
  for (let n = headerIndex + 1; n < lines.length; n++) {
    stats.charsExamined += lines[n].length;
    if (lines[n].trim() === "") continue;
    const label = `line ${n + 1}`;
    const f = splitCsvLine(lines[n]);
    const rawTime = f[iTime] ?? null;
    const p: TrackPoint = {
      latDeg: parseNumber(f[iLat] ?? null),
      lonDeg: parseNumber(f[iLon] ?? null),
      timeMs: rawTime ? parseIsoUtcMs(rawTime) : NaN,
    };
    if (iEle >= 0 && (f[iEle] ?? "") !== "") p.elevationM = parseNumber(f[iEle]);
    checkPoint(label, p, rawTime || null);
    points.push(p);
    where.push(label);
    checkCount(points, options);
  }
  checkOrder(points, where);
  return points;
}
