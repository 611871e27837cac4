// The country a position lies in, from Natural Earth's 1:110m country outlines
// (the world-atlas package, offline). Coarse on purpose: the gallery filters by
// country, and a site's exact position may be hidden while its country is not.
import { geoContains } from "d3-geo";
import { feature } from "topojson-client";
import type { Feature, FeatureCollection, Geometry } from "geojson";
import countries110m from "world-atlas/countries-110m.json";
import type { Topology, GeometryCollection } from "topojson-specification";

/** Shown for a position on no country's outline: ships and aircraft, small islands. */
export const AT_SEA = "At sea";

let outlines: Feature<Geometry, { name: string }>[] | null = null;

function loadOutlines(): Feature<Geometry, { name: string }>[] {
  if (!outlines) {
    const topo = countries110m as unknown as Topology<{ countries: GeometryCollection<{ name: string }> }>;
    outlines = (feature(topo, topo.objects.countries) as FeatureCollection<Geometry, { name: string }>).features;
  }
  return outlines;
}

export function findCountry(latDeg: number, lonDeg: number): string {
  if (!Number.isFinite(latDeg) || !Number.isFinite(lonDeg)) return AT_SEA;
  const hit = loadOutlines().find((f) => geoContains(f, [lonDeg, latDeg]));
  return hit?.properties.name ?? AT_SEA;
}
