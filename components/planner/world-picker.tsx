"use client";
import { geoEquirectangular, geoPath } from "d3-geo";
import { useMemo, useState, type KeyboardEvent, type MouseEvent } from "react";
import { feature } from "topojson-client";
import type { GeometryCollection, Topology } from "topojson-specification";
import land from "world-atlas/land-110m.json";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";

const WIDTH = 720;
const HEIGHT = 360;

/**
 * Latitude, longitude and elevation fields with a world outline to pick a place
 * on (Natural Earth land from the world-atlas package, drawn offline; no map
 * tiles). Click the map, or focus it and move with the arrow keys (1 degree,
 * 10 with Shift).
 */
export function WorldPicker({ lat, lon, elev }: { lat?: number; lon?: number; elev?: number }) {
  const [latDeg, setLat] = useState(lat === undefined ? "" : String(lat));
  const [lonDeg, setLon] = useState(lon === undefined ? "" : String(lon));
  const projection = useMemo(() => geoEquirectangular().scale(WIDTH / (2 * Math.PI)).translate([WIDTH / 2, HEIGHT / 2]), []);
  const path = useMemo(() => {
    const topo = land as unknown as Topology<{ land: GeometryCollection }>;
    return geoPath(projection)(feature(topo, topo.objects.land)) ?? "";
  }, [projection]);

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
        tabIndex={0}
        onClick={pick}
        onKeyDown={nudge}
      >
        <path d={path} className="fill-surface-hover stroke-line-strong" strokeWidth={0.5} />
        {point ? (
          <g aria-hidden="true">
            <circle cx={point[0]} cy={point[1]} r={6} className="fill-none stroke-accent" strokeWidth={2} />
            <circle cx={point[0]} cy={point[1]} r={1.5} className="fill-accent" />
          </g>
        ) : null}
      </svg>
      <div className="grid gap-4 sm:grid-cols-3">
        <Field label="Latitude (°, north positive)">
          <Input name="lat" type="number" step="any" min={-90} max={90} value={latDeg} onChange={(e) => setLat(e.target.value)} inputMode="decimal" />
        </Field>
        <Field label="Longitude (°, east positive)">
          <Input name="lon" type="number" step="any" min={-180} max={180} value={lonDeg} onChange={(e) => setLon(e.target.value)} inputMode="decimal" />
        </Field>
        <Field label="Elevation (m)">
          <Input name="elev" type="number" step="any" defaultValue={elev ?? 0} inputMode="decimal" />
        </Field>
      </div>
    </div>
  );
}
