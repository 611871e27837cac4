// The master's sky geometry as a print bundle's metadata carries it (AVM
// spatial fields, the Sun's place), read from the report.json a reduction or a
// composite stored beside its renditions.
import type { LocationPrecision } from "@/db/schema";
import { parseReport } from "@/lib/reductions/report-schema";
import { toPublicObserver } from "@/lib/sites/precision";
import type { MasterSky } from "./metadata";

const num = (v: unknown) => (typeof v === "number" && Number.isFinite(v) ? v : undefined);

/** The master's sky geometry from report.json (overall.sky, read with the report's schema), or null when the reduction has none. */
export function masterSkyFromReport(report: Record<string, unknown>): MasterSky | null {
  if (report.kind === "composite") return compositeSkyFromReport(report);
  const { overall } = parseReport(report);
  const sky = overall.sky;
  const width = overall.masterSize?.width;
  const height = overall.masterSize?.height;
  if (!width || !height) return null;
  const out: MasterSky = { masterWidth: width, masterHeight: height };
  const centre = sky?.sunCentrePx;
  if (typeof centre?.x === "number" && typeof centre.y === "number") out.sunCentrePx = { x: centre.x, y: centre.y };
  if (sky?.plateScaleArcsecPerPx) out.plateScaleArcsecPerPx = sky.plateScaleArcsecPerPx;
  if (typeof sky?.northAngleDeg === "number") out.northAngleDeg = sky.northAngleDeg;
  if (typeof sky?.moonSilhouetteUtc === "string") out.referenceUtc = sky.moonSilhouetteUtc;
  if (sky?.observer) out.observer = { latDeg: sky.observer.latDeg, lonDeg: sky.observer.lonDeg, elevationM: sky.observer.elevationM };
  return out;
}

/** A composite's grid: north up, the Sun at its centre pixel; it stands for several observers, so it names none. */
function compositeSkyFromReport(report: Record<string, unknown>): MasterSky | null {
  const grid = (report.grid ?? {}) as { width?: unknown; height?: unknown; scaleArcsecPerPx?: unknown; sunCentre?: { x?: unknown; y?: unknown }; solarNorthDeg?: unknown };
  const width = num(grid.width);
  const height = num(grid.height);
  if (!width || !height) return null;
  const out: MasterSky = { masterWidth: width, masterHeight: height, northAngleDeg: num(grid.solarNorthDeg) ?? 0 };
  if (num(grid.sunCentre?.x) !== undefined && num(grid.sunCentre?.y) !== undefined) out.sunCentrePx = { x: grid.sunCentre!.x as number, y: grid.sunCentre!.y as number };
  if (num(grid.scaleArcsecPerPx)) out.plateScaleArcsecPerPx = grid.scaleArcsecPerPx as number;
  return out;
}

/**
 * The master's sky geometry as a print bundle may carry it: the report holds the
 * exact observer, and the bundle is for publication, so the Sun's place is
 * computed from the site at its public precision (from the Earth's centre for
 * a hidden site, within the solar parallax of 8.8 arcsec).
 */
export function publicSkyFromReport(report: Record<string, unknown>, precision: LocationPrecision): MasterSky | null {
  const sky = masterSkyFromReport(report);
  if (sky?.observer) sky.observer = toPublicObserver(sky.observer, precision);
  return sky;
}
