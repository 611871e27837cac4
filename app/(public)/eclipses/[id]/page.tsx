import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { foundOr404 } from "@/app/_server/found";
import { formatPoint } from "@/components/eclipses/eclipse-table";
import { describeEclipse } from "@/components/eclipses/eclipse-words";
import { PlateCard } from "@/components/gallery/plate-card";
import { PageTitle } from "@/components/page-title";
import { EmptyState } from "@/components/ui/empty-state";
import { getDb } from "@/db/client";
import { computeCentralPathAt } from "@/lib/astro/central-path";
import { findLocalCircumstances, type LocalCircumstances } from "@/lib/astro/local-circumstances";
import { findEclipse } from "@/lib/eclipses/eclipses";
import { listPublishedPlates } from "@/lib/plates/public";

type Props = { params: Promise<{ id: string }> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { id } = await params;
  return { title: `Solar eclipse of ${id}`, description: `Circumstances and the society's plates of the solar eclipse of ${id}.` };
}

/** To the nearest second, as the planner shows contact times. */
function hms(ms: number): string {
  return new Date(Math.round(ms / 1000) * 1000).toISOString().slice(11, 19);
}

/** Contacts at the point of greatest eclipse, computed from the ephemeris; null when the eclipse has no central line. */
function circumstancesAtPeak(lat: number | null, lon: number | null, peakAt: string): LocalCircumstances | null {
  if (lat === null || lon === null) return null;
  try {
    return findLocalCircumstances({ latDeg: lat, lonDeg: lon, elevationM: 0 }, Date.parse(peakAt));
  } catch {
    return null;
  }
}

export default async function EclipsePage({ params }: Props) {
  const { id } = await params;
  if (!/^\d{4}-\d{2}-\d{2}$/.test(id)) notFound();
  const db = getDb();
  const eclipse = await foundOr404(findEclipse(db, id));
  const { plates } = await listPublishedPlates(db, { eclipseId: id, limit: 60 });
  const c = circumstancesAtPeak(eclipse.peakLatDeg, eclipse.peakLonDeg, eclipse.peakAt);
  const sites = new Map<string, { name: string; country: string | null; plates: { slug: string; title: string }[] }>();
  for (const p of plates) {
    const key = `${p.siteLabel ?? ""}|${p.siteCountry}`;
    const s = sites.get(key) ?? { name: p.siteLabel ?? "", country: p.siteCountry, plates: [] };
    s.plates.push({ slug: p.slug, title: p.title });
    sites.set(key, s);
  }
  // One instant for "greatest eclipse" everywhere on the page: the maximum computed at its point
  // (the catalogue's search instant differs by a second or two: it leaves out the Moon's light time).
  const greatestMs = c ? c.maximum.utcMs : Date.parse(eclipse.peakAt);
  const width = c && eclipse.kind !== "partial" ? (computeCentralPathAt(Date.parse(eclipse.peakAt), greatestMs)?.widthKm ?? null) : null;
  const title = describeEclipse(eclipse);
  return (
    <>
      <PageTitle
        title={title}
        lead={
          <>
            {eclipse.name ? <span className="block font-medium text-ink">{eclipse.name}</span> : null}
            Greatest eclipse at <span data-testid="greatest-eclipse">{hms(greatestMs)}</span> UTC, {formatPoint(eclipse.peakLatDeg, eclipse.peakLonDeg)}.
          </>
        }
      >
        <Link href={`/planner?eclipse=${eclipse.id}`}>Plan for this eclipse</Link>
      </PageTitle>
      <div className="flex flex-col gap-10">
        {c ? (
          <section aria-labelledby="circ-h">
            <h2 id="circ-h" className="mb-3 text-xl font-semibold">
              At the point of greatest eclipse
            </h2>
            <dl className="grid max-w-2xl grid-cols-[max-content_1fr] gap-x-6 gap-y-2 text-sm">
              <dt className="text-ink-muted">First contact</dt>
              <dd className="font-mono">{hms(c.firstContact.utcMs)} UTC</dd>
              {c.secondContact ? (
                <>
                  <dt className="text-ink-muted">Second contact</dt>
                  <dd className="font-mono">{hms(c.secondContact.utcMs)} UTC</dd>
                </>
              ) : null}
              <dt className="text-ink-muted">Maximum (greatest eclipse)</dt>
              <dd className="font-mono">
                <span data-testid="maximum-time">{hms(c.maximum.utcMs)}</span> UTC, Sun {c.maximum.sunApparentAltDeg.toFixed(0)}° high
              </dd>
              {c.thirdContact ? (
                <>
                  <dt className="text-ink-muted">Third contact</dt>
                  <dd className="font-mono">{hms(c.thirdContact.utcMs)} UTC</dd>
                </>
              ) : null}
              <dt className="text-ink-muted">Fourth contact</dt>
              <dd className="font-mono">{hms(c.fourthContact.utcMs)} UTC</dd>
              {c.centralDurationS !== null ? (
                <>
                  <dt className="text-ink-muted">{c.kind === "total" ? "Totality" : "Annularity"}</dt>
                  <dd className="font-mono">
                    {Math.floor(c.centralDurationS / 60)} min {Math.round(c.centralDurationS % 60)} s
                  </dd>
                </>
              ) : null}
              {width !== null ? (
                <>
                  <dt className="text-ink-muted">Path width</dt>
                  <dd className="font-mono">{Math.round(width)} km</dd>
                </>
              ) : null}
              <dt className="text-ink-muted">Magnitude</dt>
              <dd className="font-mono">{c.magnitude.toFixed(3)}</dd>
            </dl>
            <p className="mt-3 max-w-prose text-sm text-warn">
              Look at or photograph the partly eclipsed Sun only through a certified solar filter; filters come off only in totality. Follow local guidance and experienced
              observers.
            </p>
          </section>
        ) : null}
        <section aria-labelledby="sites-h">
          <h2 id="sites-h" className="mb-3 text-xl font-semibold">
            Sites with results
          </h2>
          {sites.size ? (
            <ul className="flex flex-col gap-2" aria-labelledby="sites-h">
              {[...sites.values()].map((s) => {
                const place = [s.name, s.country].filter(Boolean).join(", ") || "A site kept private";
                return (
                  <li key={`${s.name}|${s.country}`}>
                    {s.plates.length === 1 ? (
                      <Link href={`/plates/${s.plates[0].slug}`} className="underline">{place}</Link>
                    ) : (
                      <>
                        <span className="font-medium">{place}</span>:{" "}
                        {s.plates.map((p, i) => (
                          <span key={p.slug}>
                            {i > 0 ? ", " : ""}
                            <Link href={`/plates/${p.slug}`} className="underline">{p.title}</Link>
                          </span>
                        ))}
                      </>
                    )}
                    <span className="text-ink-muted">
                      {" "}
                      ({s.plates.length} plate{s.plates.length === 1 ? "" : "s"})
                    </span>
                  </li>
                );
              })}
            </ul>
          ) : (
            <p className="text-ink-muted">No published results yet.</p>
          )}
        </section>
        <section aria-labelledby="plates-h">
          <h2 id="plates-h" className="mb-3 text-xl font-semibold">
            Plates
          </h2>
          {plates.length ? (
            <ul className="grid gap-6 sm:grid-cols-2 lg:grid-cols-3" aria-label={`Plates of ${eclipse.id}`}>
              {plates.map((p) => (
                <PlateCard key={p.slug} plate={p} />
              ))}
            </ul>
          ) : (
            <EmptyState title="No plates yet" message="Plates appear here when curators publish members' results of this eclipse." />
          )}
          <p className="mt-4 text-sm">
            <a href={`/iiif/eclipses/${eclipse.id}/collection.json`}>IIIF collection of these plates</a>
          </p>
        </section>
      </div>
    </>
  );
}
