import Link from "next/link";
import { formatPoint } from "@/components/eclipses/eclipse-table";
import type { TotalityReach } from "@/lib/planner/path";

/**
 * For a place that sees no totality: how far away totality (or annularity) is and in which
 * direction, then what to photograph here instead, always through a filter.
 */
export function PartialPhaseAdvice({
  localKind,
  eclipseKind,
  reach,
  planHref,
}: {
  localKind: "partial" | "annular";
  eclipseKind: "total" | "annular" | "hybrid" | "partial";
  reach: TotalityReach | null;
  /** The planner's address for the nearest point, to plan there instead. */
  planHref: string | null;
}) {
  const goal = eclipseKind === "annular" ? "annularity" : "totality";
  return (
    <section aria-labelledby="no-totality" className="rounded-card border border-line-strong bg-surface-raised p-5">
      <h2 id="no-totality" className="text-xl font-semibold">
        {localKind === "annular" ? "An annular eclipse: the Sun is never covered completely" : `No ${goal} here`}
      </h2>
      {localKind === "partial" ? (
        reach ? (
          <p className="mt-2" data-testid="totality-reach">
            The nearest place that sees {goal} is about <strong>{reach.distanceKm} km</strong> to the <strong>{reach.direction}</strong> ({formatPoint(reach.point.latDeg, reach.point.lonDeg, 2)}), at the
            edge of the path shown on the map.{" "}
            {planHref ? (
              <Link href={planHref} className="underline">
                Plan for a place just inside the path
              </Link>
            ) : null}
          </p>
        ) : (
          <p className="mt-2">No place on Earth sees {eclipseKind === "partial" ? "totality or annularity" : goal} in this eclipse: it is partial everywhere.</p>
        )
      ) : null}
      <h3 className="mt-4 font-semibold">Photographing the partial phase</h3>
      <ul className="mt-2 list-disc space-y-1 pl-5">
        <li>
          The filter stays on from first to fourth contact: {localKind === "annular" ? "even at its deepest the ring of the Sun is bright enough to harm eyes and sensors." : "here the Sun is never fully covered."}
        </li>
        <li>Use a certified full-aperture solar filter made for your lens or telescope, taped so the wind cannot lift it; check it for pinholes against a lamp first.</li>
        <li>Look only through certified solar viewers (ISO 12312-2), never through an unfiltered finder, lens or binoculars.</li>
        <li>Start from the ladder below for your filter, bracket a stop either side, and focus on sunspots or the Sun&apos;s edge.</li>
        <li>A frame every few minutes, at the same settings, shows the Moon moving across the Sun; the timeline gives the start, the deepest point and the end.</li>
        <li>Follow local guidance and experienced observers at your site.</li>
      </ul>
    </section>
  );
}
