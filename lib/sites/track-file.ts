// A moving site's track file: GPX or CSV, told apart by content (an XML
// document with <gpx> versus a header row), then parsed and checked point by
// point by lib/astro. Errors name the file and the point or line.
import type { TrackPoint } from "@/db/schema";
import { parseCsvTrack, parseGpxTrack } from "@/lib/astro/track-parse";

export const MAX_TRACK_POINTS = 200_000;

export function parseTrackText(text: string, fileName: string): TrackPoint[] {
  const head = text.slice(0, 2000).trimStart();
  const isGpx = head.startsWith("<?xml") || /<gpx[\s>]/i.test(head);
  let points: TrackPoint[];
  try {
    points = isGpx ? parseGpxTrack(text) : parseCsvTrack(text);
  } catch (err) {
    throw new Error(`${fileName}: ${(err as Error).message}`);
  }
  if (points.length < 2) throw new Error(`${fileName}: a track needs at least two time-stamped points`);
  if (points.length > MAX_TRACK_POINTS) throw new Error(`${fileName}: ${points.length} points is more than the ${MAX_TRACK_POINTS} a track may hold`);
  return points;
}
