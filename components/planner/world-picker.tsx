"use client";
import { geoEquirectangular, geoPath } from "d3-geo";
import { useId, useMemo, useState, type KeyboardEvent, type MouseEvent, type ReactNode } from "react";
import { feature } from "topojson-client";
import type { GeometryCollection, Topology } from "topojson-specification";
import land from "world-atlas/land-110m.json";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import type { PathLines } from "@/lib/planner/path";
import { PathCloseUp } from "./path-close-up";
import { drawPathLines, type Project } from "./path-drawing";

const WIDTH = 720;
const HEIGHT = 360;

/**
 * Latitude, longitude and elevation fields with a world outline to pick a place
 * on (Natural Earth land from the world-atlas package, drawn offline; no map
 * tiles). Click the map, or focus it and move with the arrow keys (1 degree,
 * 10 with Shift).
 */
export function WorldPicker({
  lat,
  lon,
  elev,
  path,
  errors = {},
}: {
  lat?: number;
  lon?: number;
  elev?: number;
  /** The eclipse's path of totality or annularity, drawn under the marker. */
  path?: PathLines | null;
  errors?: { lat?: ReactNode; lon?: ReactNode; elev?: ReactNode };
}) {
  const legendId = useId();
  const [latDeg, setLat] = useState(lat === undefined ? "" : String(lat));
  const [lonDeg, setLon] = useState(lon === undefined ? "" : String(lon));
  const projection = useMemo(() => geoEquirectangular().scale(WIDTH / (2 * Math.PI)).translate([WIDTH / 2, HEIGHT / 2]), []);
  const landOutline = useMemo(() => {
    const topo = land as unknown as Topology<{ land: GeometryCollection }>;
    return geoPath(projection)(feature(topo, topo.objects.land)) ?? "";
  }, [projection]);

  const drawn = useMemo(() => {
    if (!path) return null;
    const project: Project = (p) => projection([p.lonDeg, p.latDeg]) ?? [0, 0];
    return drawPathLines(path, project);
  }, [path, projection]);
  const pathWord = path?.kind === "annular" ? "annularity" : path?.kind === "hybrid" ? "totality or annularity" : "totality";

  const point = latDeg !== "" && lonDeg !== "" ? projection([Number(lonDeg), Number(latDeg)]) : null;

  function pick(e: MouseEvent<SVGSVGElement>) {
    const box = e.currentTarget.getBoundingClientRect();
    const x = ((e.clientX - box.left) / box.width) * WIDTH;
    const y = ((e.clientY - box.top) / box.height) * HEIGHT;
    const ll = projection.invert?.([x, y]);
    if (!ll) return;
    setLon(ll[0].toFixed(2));
    setLat(ll[1].toFixed(2));
  }

  function nudge(e: KeyboardEvent<SVGSVGElement>) {
    const step = e.shiftKey ? 10 : 1;
    const la = Number(latDeg || 0);
    const lo = Number(lonDeg || 0);
    const moves: Record<string, [number, number]> = { ArrowUp: [step, 0], ArrowDown: [-step, 0], ArrowLeft: [0, -step], ArrowRight: [0, step] };
    const m = moves[e.key];
    if (!m) return;
    e.preventDefault();
    setLat(String(Math.max(-90, Math.min(90, la + m[0]))));
    setLon(String((((lo + m[1] + 180) % 360) + 360) % 360 - 180));
  }

  return (
    <div className="flex flex-col gap-3">
      <svg
        viewBox={`0 0 ${WIDTH} ${HEIGHT}`}
        className="w-full max-w-3xl cursor-crosshair rounded-card border border-line bg-surface-sunken"
        role="application"
        aria-label="World map: click a place, or use the arrow keys to move the marker (Shift for 10 degrees)"
        aria-describedby={path ? legendId : undefined}
        tabIndex={0}
        onClick={pick}
        onKeyDown={nudge}
      >
        <path d={landOutline} className="fill-surface-hover stroke-line-strong" strokeWidth={0.5} />
        {drawn ? (
          <g aria-hidden="true" data-testid="path-of-totality">
            <path d={drawn.band} className="fill-accent" fillOpacity={0.28} />
            <path d={drawn.north} className="fill-none stroke-accent" strokeWidth={1} strokeDasharray="3 2" />
            <path d={drawn.south} className="fill-none stroke-accent" strokeWidth={1} strokeDasharray="3 2" />
            <path d={drawn.central} className="fill-none stroke-ink" strokeWidth={1} />
          </g>
        ) : null}
        {point ? (
          <g aria-hidden="true">
            <circle cx={point[0]} cy={point[1]} r={6} className="fill-none stroke-accent" strokeWidth={2} />
            <circle cx={point[0]} cy={point[1]} r={1.5} className="fill-accent" />
          </g>
        ) : null}
      </svg>
      {path ? <PathCloseUp path={path} site={latDeg !== "" && lonDeg !== "" ? { latDeg: Number(latDeg), lonDeg: Number(lonDeg) } : null} /> : null}
      {path ? (
        <p id={legendId} className="flex flex-wrap items-center gap-x-4 gap-y-1 text-sm text-ink-muted">
          <span>
            <span aria-hidden="true" className="mr-1.5 inline-block h-3 w-5 rounded-sm bg-accent/30 align-middle" />
            Shaded: the path of {pathWord}, computed from the positions of the Sun and Moon
          </span>
          <span>
            <span aria-hidden="true" className="mr-1.5 inline-block w-5 border-t border-ink align-middle" />
            central line
          </span>
          <span>
            <span aria-hidden="true" className="mr-1.5 inline-block w-5 border-t border-dashed border-accent align-middle" />
            northern and southern limits
          </span>
        </p>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-3">
        <Field label="Latitude (°, north positive)" error={errors.lat}>
          <Input name="lat" type="number" step="any" min={-90} max={90} value={latDeg} onChange={(e) => setLat(e.target.value)} inputMode="decimal" />
        </Field>
        <Field label="Longitude (°, east positive)" error={errors.lon}>
          <Input name="lon" type="number" step="any" min={-180} max={180} value={lonDeg} onChange={(e) => setLon(e.target.value)} inputMode="decimal" />
        </Field>
        <Field label="Elevation (m)" error={errors.elev}>
          <Input name="elev" type="number" step="any" defaultValue={elev ?? 0} inputMode="decimal" />
        </Field>
      </div>
    </div>
  );
}
