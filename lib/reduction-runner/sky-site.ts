// Where the observer was, as the reduction is told it: a fixed site from
// `--site LAT,LON,ELEV`, or a moving one from a GPX or CSV track file
// (`--site-file`). Faults name the option or the file; a track that does not
// cover a frame's instant names the file, the frame and both spans.
import { readFile } from "node:fs/promises";
import { basename } from "node:path";
import { AstroError, interpolateTrack, parseCsvTrack, parseGpxTrack, validateSite, type SiteLocation, type TrackPoint } from "@/lib/astro";
import { ReductionInputError } from "./errors";

export type SiteSpec =
  | { kind: "fixed"; location: SiteLocation }
  | { kind: "track"; points: TrackPoint[]; /** File name, for messages and the report. */ source: string };

/** "LAT,LON[,ELEV]": degrees north, degrees east, metres (0 when left out). */
export function parseSiteText(text: string): SiteSpec {
  const parts = text.split(",").map((p) => p.trim());
  const numbers = parts.map((p) => (/^[+-]?(\d+\.?\d*|\.\d+)$/.test(p) ? Number(p) : NaN));
  if ((parts.length !== 2 && parts.length !== 3) || numbers.some((n) => !Number.isFinite(n))) {
    throw new ReductionInputError("bad-site", `--site "${text}": expected LAT,LON,ELEV in degrees north, degrees east and metres, e.g. 25.29,-104.14,1200`);
  }
  const location = { latDeg: numbers[0], lonDeg: numbers[1], elevationM: numbers[2] ?? 0 };
  try {
    validateSite(location, "--site");
  } catch (error) {
    if (error instanceof AstroError) throw new ReductionInputError("bad-site", `--site "${text}": ${error.message.replace(/^--site\./, "")}`, { cause: error });
    throw error;
  }
  return { kind: "fixed", location };
}

/** A track file, GPX when its text holds a <gpx> element, else CSV (columns time, lat, lon, optional elevation_m). */
export function parseSiteTrackText(text: string, source: string): SiteSpec {
  try {
    const points = /<gpx\b/.test(text) ? parseGpxTrack(text) : parseCsvTrack(text);
    return { kind: "track", points, source };
  } catch (error) {
    if (error instanceof AstroError) throw new ReductionInputError("bad-site", `${source}: ${error.message}`, { cause: error });
    throw error;
  }
}

export async function readSiteTrackFile(path: string): Promise<SiteSpec> {
  const name = basename(path);
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (error) {
    throw new ReductionInputError("bad-site", `${name}: cannot read the site track (${(error as NodeJS.ErrnoException).code ?? "read error"})`, { cause: error });
  }
  return parseSiteTrackText(text, name);
}

/**
 * The observer's place at an instant. A track is interpolated (lib/astro), and an
 * instant outside it (beyond lib/astro's few-second clamp) is refused naming the file.
 */
export function locateSite(site: SiteSpec, utcMs: number, frameName: string): SiteLocation {
  if (site.kind === "fixed") return site.location;
  try {
    return interpolateTrack(site.points, utcMs);
  } catch (error) {
    if (error instanceof AstroError && error.code === "out-of-range") {
      const first = new Date(site.points[0].timeMs).toISOString();
      const last = new Date(site.points[site.points.length - 1].timeMs).toISOString();
      throw new ReductionInputError(
        "bad-site",
        `${site.source}: the track runs from ${first} to ${last} but does not cover ${frameName}, taken at ${new Date(utcMs).toISOString()} (camera time with --clock-offset applied)`,
        { cause: error },
      );
    }
    throw error;
  }
}

/** What the report says of the site: the fixed place, or the track file and span. */
export function describeSite(site: SiteSpec): Record<string, unknown> {
  if (site.kind === "fixed") return { kind: "fixed", ...site.location };
  return {
    kind: "track",
    source: site.source,
    points: site.points.length,
    fromUtc: new Date(site.points[0].timeMs).toISOString(),
    toUtc: new Date(site.points[site.points.length - 1].timeMs).toISOString(),
  };
}
