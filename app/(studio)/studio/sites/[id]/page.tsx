import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { foundOr404 } from "@/app/_server/found";
import { Feedback } from "@/components/ui/feedback";
import { ConfirmDelete } from "@/components/forms/confirm-delete";
import { PageTitle } from "@/components/page-title";
import { getDb } from "@/db/client";
import { SiteForm } from "@/components/sites/site-form";
import { toPublicSite } from "@/lib/sites/precision";
import { findSite } from "@/lib/sites/sites";
import { deleteSiteAction, updateSiteAction } from "../actions";

export const metadata: Metadata = { title: "Site" };

export default async function SitePage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ saved?: string }> }) {
  const { id } = await params;
  const { saved } = await searchParams;
  const actor = await requirePagePermission("studio:use", `/studio/sites/${id}`);
  const site = await foundOr404(findSite(getDb(), actor, id));
  const shown = toPublicSite(site, null);
  const pub = shown.position;
  return (
    <>
      <PageTitle title={site.name} lead={site.kind === "fixed" ? "A fixed site" : "A moving site with a track"}>
        <Link href="/studio/sites">All sites</Link>
      </PageTitle>
      <Feedback look="box" success={saved ? "Site saved." : null} />
      <dl className="grid max-w-2xl grid-cols-[max-content_1fr] gap-x-6 gap-y-2">
        <dt className="text-ink-muted">{site.kind === "fixed" ? "Position" : "Start of track"}</dt>
        <dd className="font-mono">
          {site.latDeg.toFixed(5)}°, {site.lonDeg.toFixed(5)}°, {site.elevationM} m
        </dd>
        {site.kind === "moving" ? (
          <>
            <dt className="text-ink-muted">Track</dt>
            <dd>
              {site.trackFileName}: {site.trackPoints} points, <span className="font-mono">{site.trackStart}</span> to{" "}
              <span className="font-mono">{site.trackEnd}</span>
            </dd>
          </>
        ) : null}
        <dt className="text-ink-muted">Public pages show</dt>
        <dd>
          {pub ? (
            <>
              {shown.label ? `“${shown.label}”, ` : "no label, "}the country and <span className="font-mono">{`${pub.latDeg}°, ${pub.lonDeg}°`}</span> ({pub.precision})
            </>
          ) : (
            "nothing of the site: no position, label or country (hidden)"
          )}
        </dd>
      </dl>
      <p className="mt-6">
        <Link href={`/planner?site=${site.id}`}>Plan the eclipse from this site</Link>
      </p>
      <section aria-labelledby="edit-site" className="mt-10 max-w-2xl border-t border-line pt-6">
        <h2 id="edit-site" className="mb-3 text-xl font-semibold">
          Change this site
        </h2>
        <p className="mb-4 text-sm text-ink-muted">A new precision applies to public pages and files at once, plates already published included.</p>
        <SiteForm action={updateSiteAction} site={site} />
      </section>
      <section aria-labelledby="delete-site" className="mt-10 border-t border-line pt-6">
        <h2 id="delete-site" className="mb-3 text-xl font-semibold">
          Delete
        </h2>
        <ConfirmDelete id={site.id} name={site.name} thing="site" consequence="Saved plans keep their coordinates." action={deleteSiteAction} />
      </section>
    </>
  );
}
