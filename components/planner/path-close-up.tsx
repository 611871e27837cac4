"use client";
import { geoEquirectangular, geoPath } from "d3-geo";
import { useMemo } from "react";
import { feature } from "topojson-client";
import type { GeometryCollection, Topology } from "topojson-specification";
import land from "world-atlas/land-110m.json";
import type { GeoPoint } from "@/lib/astro/central-path";
import type { PathLines } from "@/lib/planner/path";
import { drawPathLines, type Project } from "./path-drawing";

const WIDTH = 720;
const HEIGHT = 360;
/** Degrees of map around the place and the nearest part of the central line. */
const MARGIN_DEG = 6;

/**
 * The path near the chosen place (or near greatest eclipse), large enough to tell the limits
 * apart: at world scale a 250 km band is a few pixels wide. Drawing only; the world map above
 * is where a place is picked.
 */
export function PathCloseUp({ path, site }: { path: PathLines; site: GeoPoint | null }) {
  const drawing = useMemo(() => {
    const middle = path.central[Math.floor(path.central.length / 2)];
    const focus = site ?? middle;
    if (!focus) return null;
    // The central point nearest the place (a rough flat distance is enough to choose the window).
    const near = path.central.reduce((best, p) => {
      const d = (q: GeoPoint) => Math.hypot(q.latDeg - focus.latDeg, ((q.lonDeg - focus.lonDeg + 540) % 360) - 180);
      return d(p) < d(best) ? p : best;
    }, path.central[0]);
    const lats = [focus.latDeg, near.latDeg];
    const lons = [focus.lonDeg, near.lonDeg];
    if (Math.max(...lons) - Math.min(...lons) > 180) return null;
    const box = {
      type: "MultiPoint" as const,
      coordinates: [
        [Math.min(...lons) - MARGIN_DEG, Math.max(-89, Math.min(...lats) - MARGIN_DEG)],
        [Math.max(...lons) + MARGIN_DEG, Math.min(89, Math.max(...lats) + MARGIN_DEG)],
      ],
    };
    const projection = geoEquirectangular().fitExtent(
      [
        [0, 0],
        [WIDTH, HEIGHT],
      ],
      box,
    );
    const project: Project = (p) => projection([p.lonDeg, p.latDeg]) ?? [0, 0];
    const topo = land as unknown as Topology<{ land: GeometryCollection }>;
    return {
      land: geoPath(projection)(feature(topo, topo.objects.land)) ?? "",
      lines: drawPathLines(path, project),
      marker: site ? project(site) : null,
    };
  }, [path, site]);
  if (!drawing) return null;
  return (
    <figure className="flex flex-col gap-1">
      <svg viewBox={`0 0 ${WIDTH} ${HEIGHT}`} className="w-full max-w-3xl rounded-card border border-line bg-surface-sunken" aria-hidden="true" data-testid="path-close-up">
        <path d={drawing.land} className="fill-surface-hover stroke-line-strong" strokeWidth={0.8} />
        <path d={drawing.lines.band} className="fill-accent" fillOpacity={0.28} />
        <path d={drawing.lines.north} className="fill-none stroke-accent" strokeWidth={1.5} strokeDasharray="6 4" />
        <path d={drawing.lines.south} className="fill-none stroke-accent" strokeWidth={1.5} strokeDasharray="6 4" />
        <path d={drawing.lines.central} className="fill-none stroke-ink" strokeWidth={1.5} />
        {drawing.marker ? (
          <g>
            <circle cx={drawing.marker[0]} cy={drawing.marker[1]} r={8} className="fill-none stroke-accent" strokeWidth={2.5} />
            <circle cx={drawing.marker[0]} cy={drawing.marker[1]} r={2.5} className="fill-accent" />
          </g>
        ) : null}
      </svg>
      <figcaption className="text-sm text-ink-muted">{site ? "Close-up: the path near the chosen place (ringed)." : "Close-up: the path near the middle of its track."}</figcaption>
    </figure>
  );
}
