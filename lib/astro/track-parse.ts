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

const TRKPT_RE = /<trkpt\b([^>]*?)(\/>|>([\s\S]*?)<\/trkpt\s*>)/g;
/** A time zone or Z is required: a track time without one could be any of 25 hours. */
const ISO_UTC_RE = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/;

function lineAt(text: string, index: number): number {
  let line = 1;
  for (let i = 0; i < index; i++) if (text.charCodeAt(i) === 10) line++;
  return line;
}

function readAttribute(attributes: string, name: string): string | null {
  const m = new RegExp(`\\b${name}\\s*=\\s*("([^"]*)"|'([^']*)')`).exec(attributes);
  return m ? (m[2] ?? m[3]) : null;
}

function readChild(body: string, name: string): string | null {
  const m = new RegExp(`<${name}\\b[^>]*>([\\s\\S]*?)</${name}\\s*>`).exec(body);
  return m ? m[1].trim() : null;
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

/** Points of every track segment of a GPX file, in file order. */
export function parseGpxTrack(gpx: string): TrackPoint[] {
  if (typeof gpx !== "string" || !/<gpx\b/.test(gpx)) {
    throw new AstroError("bad-track", "the file is not GPX: no <gpx> element", "track");
  }
  const points: TrackPoint[] = [];
  const where: string[] = [];
  for (const m of gpx.matchAll(TRKPT_RE)) {
    const label = `track point ${points.length + 1} (line ${lineAt(gpx, m.index ?? 0)})`;
    const body = m[3] ?? "";
    const rawTime = readChild(body, "time");
    const rawEle = readChild(body, "ele");
    const p: TrackPoint = {
      latDeg: parseNumber(readAttribute(m[1], "lat")),
      lonDeg: parseNumber(readAttribute(m[1], "lon")),
      timeMs: rawTime === null ? NaN : parseIsoUtcMs(rawTime),
    };
    if (rawEle !== null) p.elevationM = parseNumber(rawEle);
    checkPoint(label, p, rawTime);
    points.push(p);
    where.push(label);
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
export function parseCsvTrack(csv: string): TrackPoint[] {
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
  for (let n = headerIndex + 1; n < lines.length; n++) {
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
  }
  checkOrder(points, where);
  return points;
}
