import type { Metadata } from "next";
import Link from "next/link";
import { currentActor } from "@/app/_server/actor";
import { Feedback } from "@/components/ui/feedback";
import { PageTitle } from "@/components/page-title";
import { Countdown } from "@/components/planner/countdown";
import { FrameDrawing } from "@/components/planner/frame-drawing";
import { LadderTable } from "@/components/planner/ladder-table";
import { NightModeToggle } from "@/components/planner/night-mode";
import { PartialPhaseAdvice } from "@/components/planner/partial-phase-advice";
import { PlannerForm } from "@/components/planner/planner-form";
import { SavePlanForm } from "@/components/planner/save-plan-form";
import { TimelineTable } from "@/components/planner/timeline-table";
import { SolarSafetyNote } from "@/components/safety/solar-safety-note";
import { buttonClasses } from "@/components/ui/button";
import { getDb } from "@/db/client";
import { can } from "@/lib/auth/permissions";
import { listEclipses } from "@/lib/eclipses/eclipses";
import { listKits } from "@/lib/kits/kits";
import { preparePlannerPage } from "@/lib/planner/page-plan";
import { listPlans } from "@/lib/planner/saved-plans";
import { listSites } from "@/lib/sites/sites";
import { savePlanAction } from "./actions";

export const metadata: Metadata = { title: "Field planner" };

export default async function PlannerPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const raw = await searchParams;
  const db = getDb();
  const actor = await currentActor();
  const isMember = actor ? can(actor.roles, "studio:use") : false;
  const [catalogue, sites, kits, saved] = await Promise.all([
    listEclipses(db),
    isMember ? listSites(db, actor) : null,
    isMember ? listKits(db, actor) : null,
    isMember ? listPlans(db, actor) : null,
  ]);

  const known = [...catalogue.featured, ...catalogue.upcoming, ...catalogue.past].map((e) => e.id);
  const { query, fieldProblems, problem, resolved, plan, share, pathLines, reach, insideHref } = await preparePlannerPage(db, actor, raw, known);
  const eclipseChoices = [...catalogue.featured, ...catalogue.upcoming.filter((e) => !e.featured)];
  // A past eclipse reached from its own page stays chosen in the list.
  if (resolved && !eclipseChoices.some((e) => e.id === resolved.eclipse.id)) eclipseChoices.push(resolved.eclipse);
  const localKind = plan?.circumstances.kind ?? null;
  const c2 = plan?.timeline.find((e) => e.key === "C2");
  const site = resolved?.input.site;

  return (
    <>
      <PageTitle title="Field planner" lead="Contact times, an exposure ladder and the framing, for one eclipse, one place and one kit.">
        <NightModeToggle />
      </PageTitle>
      <SolarSafetyNote className="mb-8" />
      {fieldProblems.length ? (
        <div className="mb-6" data-testid="address-problems">
          <Feedback look="box" problem={`Some values in the address could not be used, so the plan below leaves them out: ${fieldProblems.map((p) => p.message).join(" ")}`} />
        </div>
      ) : null}
      <PlannerForm
        query={query}
        eclipses={eclipseChoices}
        sites={sites}
        kits={kits}
        eclipseId={resolved?.eclipse.id ?? eclipseChoices[0]?.id ?? ""}
        path={pathLines}
        problems={fieldProblems}
      />
      {problem ? (
        <div className="mt-8">
          <Feedback look="box" problem={problem} />
          {reach && insideHref ? (
            <p className="mt-3" data-testid="totality-reach">
              The nearest place that sees {resolved?.eclipse.kind === "annular" ? "annularity" : "totality"} is about {reach.distanceKm} km to the {reach.direction}.{" "}
              <Link href={insideHref} className="underline">
                Plan for a place just inside the path
              </Link>
            </p>
          ) : null}
        </div>
      ) : null}
      {plan && resolved && site ? (
        <div className="mt-10 flex flex-col gap-10">
          <section aria-labelledby="summary">
            <h2 id="summary" className="text-2xl font-semibold">
              {resolved.eclipse.id}: {plan.circumstances.kind} eclipse at {site.name}
            </h2>
            <p className="mt-2 text-ink-muted">
              {site.latDeg.toFixed(4)}°, {site.lonDeg.toFixed(4)}°, {site.elevationM.toFixed(0)} m
              {resolved.siteSource === "greatest-eclipse" ? " (the point of greatest eclipse; choose your own place above)" : ""}.
              {plan.circumstances.centralDurationS !== null
                ? ` ${plan.circumstances.kind === "total" ? "Totality" : "Annularity"} lasts ${Math.floor(plan.circumstances.centralDurationS / 60)} min ${Math.round(plan.circumstances.centralDurationS % 60)} s.`
                : ` Partial only: ${(plan.circumstances.magnitude * 100).toFixed(1)} % of the Sun's diameter covered.`}{" "}
              Sun at {plan.timeline.find((e) => e.key === "MAX")!.sunAltDeg.toFixed(1)}° altitude at maximum.
            </p>
            {c2 ? (
              <div className="mt-4">
                <p className="text-sm text-ink-muted">Until second contact</p>
                <Countdown targetUtcMs={c2.utcMs} label="Time until second contact" />
              </div>
            ) : null}
            <div className="mt-4 flex flex-wrap gap-3 print:hidden">
              <a className={buttonClasses({ size: "sm" })} href={`/api/planner/calendar?${share}`} download>
                Timeline as calendar (.ics)
              </a>
              <a className={buttonClasses({ size: "sm" })} href={`/api/planner/ladder?${share}`} download>
                Exposure ladder (.csv)
              </a>
              <Link className={buttonClasses({ size: "sm", variant: "quiet" })} href={`/planner?${share}`}>
                Link to this plan
              </Link>
            </div>
          </section>
          {localKind !== "total" ? (
            <PartialPhaseAdvice localKind={localKind === "annular" ? "annular" : "partial"} eclipseKind={resolved.eclipse.kind} reach={reach} planHref={insideHref} />
          ) : null}
          <TimelineTable events={plan.timeline} timeZone={resolved.timeZone} />
          <LadderTable steps={plan.ladder} isos={resolved.input.isos} fNumber={resolved.input.kit.fNumber * (resolved.input.kit.teleconverter ?? 1)} />
          <section aria-labelledby="framing" className="grid gap-6 md:grid-cols-2">
            <div>
              <h2 id="framing" className="mb-3 text-xl font-semibold">
                Framing at maximum
              </h2>
              <FrameDrawing plan={plan} />
            </div>
            <div className="flex flex-col gap-3">
              <h2 className="text-xl font-semibold">Clock and orientation</h2>
              <p>
                Set every camera clock to UTC the day before and photograph a trusted clock (a phone showing network time, a GPS
                receiver) with each camera: the frame&apos;s time and the clock&apos;s time give the camera&apos;s offset, which
                the reduction applies when it aligns the frames on the Sun.
              </p>
              <p>
                Solar P angle at maximum: <span className="font-mono">{plan.pDeg.toFixed(2)}°</span>. The Sun&apos;s radius is{" "}
                <span className="font-mono">{plan.sunSemiDiameterArcsec.toFixed(1)}″</span>, the Moon&apos;s{" "}
                <span className="font-mono">{plan.moonSemiDiameterArcsec.toFixed(1)}″</span>.
              </p>
              {plan.northInImageDeg === null ? (
                <p className="text-ink-muted">Give an equatorial, alt-azimuth or tripod mount to predict where north will be in the image.</p>
              ) : null}
            </div>
          </section>
          {isMember ? (
            <section aria-labelledby="save" className="print:hidden">
              <h2 id="save" className="mb-3 text-xl font-semibold">
                Keep this plan
              </h2>
              <SavePlanForm
                action={savePlanAction}
                defaultName={`${resolved.eclipse.id} at ${site.name}`}
                hidden={{
                  eclipse: resolved.eclipse.id,
                  site: query.site ?? "",
                  kit: query.kit ?? "",
                  lat: String(site.latDeg),
                  lon: String(site.lonDeg),
                  elev: String(site.elevationM),
                  isos: resolved.input.isos.join(","),
                }}
              />
            </section>
          ) : null}
        </div>
      ) : null}
      {saved && saved.length ? (
        <section aria-labelledby="saved-plans" className="mt-10 print:hidden">
          <h2 id="saved-plans" className="mb-3 text-xl font-semibold">
            Your saved plans
          </h2>
          <ul className="list-disc pl-5">
            {saved.map((p) => (
              <li key={p.id}>
                <Link href={p.href}>{p.name}</Link>
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </>
  );
}
