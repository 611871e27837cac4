// What the plate's public page will reveal of the observing site, at the
// precision the photographer chose, with a warning when it is exact.
import type { LocationCheckDto } from "@/lib/plates/desk-view";

const fmt = (deg: number, pos: string, neg: string, digits: number) => `${Math.abs(deg).toFixed(digits)}° ${deg >= 0 ? pos : neg}`;

export function LocationCheck({ location }: { location: LocationCheckDto | null }) {
  if (!location) return <p className="text-sm">The set has no site on record.</p>;
  const { shown } = location;
  return (
    <div className="flex max-w-3xl flex-col gap-2 text-sm">
      <p>
        Site “{location.siteName}” (the photographer&apos;s private name), precision <strong>{location.precision}</strong>.{" "}
        {shown
          ? `The public page shows ${location.publicLabel ? `the label “${location.publicLabel}”, ` : "no label, "}the country and ${fmt(shown.latDeg, "N", "S", shown.precision === "exact" ? 5 : 1)}, ${fmt(shown.lonDeg, "E", "W", shown.precision === "exact" ? 5 : 1)}${shown.precision === "rounded" ? " (rounded to about 10 km)" : ""}.`
          : "The public page shows nothing of the site: no name, no country, no position."}
      </p>
      {location.warning ? (
        <p role="note" className="rounded-control border border-warn/50 bg-warn/10 p-3">
          {location.warning}
        </p>
      ) : null}
    </div>
  );
}
