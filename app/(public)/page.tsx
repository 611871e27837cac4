import Link from "next/link";
import { getDb } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { currentActor } from "@/app/_server/actor";
import { buttonClasses } from "@/components/ui/button";

export default async function LandingPage() {
  const [settings, actor] = await Promise.all([findSocietySettings(getDb()), currentActor()]);
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
