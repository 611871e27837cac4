import Link from "next/link";
import { getDb } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { currentActor } from "@/app/_server/actor";
import { buttonClasses } from "@/components/ui/button";
import { PlateCard } from "@/components/gallery/plate-card";
import { listPublishedPlates } from "@/lib/plates/public";

export default async function LandingPage() {
  const db = getDb();
  const [settings, actor, featured, latest] = await Promise.all([
    findSocietySettings(db),
    currentActor(),
    listPublishedPlates(db, { featuredOnly: true, limit: 6 }),
    listPublishedPlates(db, { limit: 1 }),
  ]);
  // The latest eclipse with published results, and its plates.
  const latestEclipse = latest.plates[0]?.eclipseId;
  const ofLatest = latestEclipse ? await listPublishedPlates(db, { eclipseId: latestEclipse, limit: 6 }) : null;
  const shown = featured.plates.length ? featured.plates : (ofLatest?.plates ?? []);
  return (
    <div className="flex flex-col gap-12">
      <section aria-labelledby="intro" className="max-w-3xl">
        <p className="font-mono text-sm uppercase tracking-widest text-accent">Eclipse section</p>
        <h1 id="intro" className="mt-2 text-4xl font-semibold tracking-tight sm:text-5xl">
          The corona, as our members caught it
        </h1>
        <p className="mt-4 text-lg text-ink-muted">
          {settings.name} members travel to totality on land, at sea and in the air. Their bracketed exposures become
          composites of the corona here: aligned on the Sun, merged across exposures, and filtered to bring out the
          streamers far from the limb.
        </p>
        <div className="mt-6 flex flex-wrap gap-3">
          {actor ? (
            <Link href="/studio" className={buttonClasses({ variant: "primary" })}>
              Open your studio
            </Link>
          ) : (
            <>
              <Link href="/sign-in" className={buttonClasses({ variant: "primary" })}>
                Sign in
              </Link>
              <Link href="/sign-up" className={buttonClasses({ variant: "secondary" })}>
                Join the eclipse section
              </Link>
            </>
          )}
        </div>
      </section>
      {shown.length ? (
        <section aria-labelledby="featured-h" className="flex flex-col gap-4">
          <div className="flex flex-wrap items-end justify-between gap-4">
            <h2 id="featured-h" className="text-2xl font-semibold">
              {featured.plates.length ? "Featured plates" : `Latest results: the eclipse of ${latestEclipse}`}
            </h2>
            <Link href="/gallery">All plates in the gallery</Link>
          </div>
          <ul className="grid gap-6 sm:grid-cols-2 lg:grid-cols-3" aria-label="Featured plates">
            {shown.map((p) => (
              <PlateCard key={p.slug} plate={p} />
            ))}
          </ul>
          {latestEclipse ? (
            <p className="text-sm">
              <Link href={`/eclipses/${latestEclipse}`}>The eclipse of {latestEclipse}: circumstances, sites and every plate</Link>
            </p>
          ) : null}
        </section>
      ) : null}
      <section aria-labelledby="next-eclipse" className="rounded-card border border-line bg-surface-raised p-6">
        <h2 id="next-eclipse" className="text-xl font-semibold">
          Next expedition: the total solar eclipse of 2027 August 2
        </h2>
        <p className="mt-2 text-ink-muted">
          Parties are planned for Luxor, Cadiz and a ship in the Gulf of Gabes. Totality near Luxor lasts about six and a
          half minutes.
        </p>
        <p className="mt-4 rounded-control border border-warn/50 bg-warn/10 p-3 text-sm text-warn">
          Never look at or photograph the partly eclipsed Sun without a certified solar filter (ISO 12312-2 for viewers; a
          full-aperture filter made for your optics). Filters come off only during totality and go back on before third
          contact ends. Follow local guidance and the advice of experienced observers.
        </p>
      </section>
    </div>
  );
}
