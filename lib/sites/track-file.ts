// A moving site's track file: GPX or CSV, told apart by content (an XML
// document with <gpx> versus a header row), then parsed and checked point by
// point by lib/astro. Errors name the file and the point or line.
import type { TrackPoint } from "@/db/schema";
import { parseCsvTrack, parseGpxTrack } from "@/lib/astro/track-parse";
import { MAX_TRACK_POINTS } from "./limits";

export function parseTrackText(text: string, fileName: string): TrackPoint[] {
  const head = text.slice(0, 2000).trimStart();
  const isGpx = head.startsWith("<?xml") || /<gpx[\s>]/i.test(head);
  let points: TrackPoint[];
  try {
    const options = { maxPoints: MAX_TRACK_POINTS };
    points = isGpx ? parseGpxTrack(text, options) : parseCsvTrack(text, options);
  } catch (err) {
    throw new Error(`${fileName}: ${(err as Error).message}`);
  }
  if (points.length < 2) throw new Error(`${fileName}: a track needs at least two time-stamped points`);
  return points;
}
