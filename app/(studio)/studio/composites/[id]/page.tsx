import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { foundOr404 } from "@/app/_server/found";
import { CompositeResult } from "@/components/composites/composite-result";
import { PageTitle } from "@/components/page-title";
import { PageSection } from "@/components/ui/page-section";
import { ReductionProgress } from "@/components/reductions/reduction-progress";
import { MakePlateButton } from "@/components/plates-desk/make-plate-button";
import { getDb } from "@/db/client";
import { can } from "@/lib/auth/permissions";
import { findComposite } from "@/lib/composites/composites";
import { findPlateOfSource } from "@/lib/plates/publish";
import { formatDateTime } from "@/lib/format/dates";

export const metadata: Metadata = { title: "Composite" };

export default async function CompositePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePagePermission("studio:use", `/studio/composites/${id}`);
  const composite = await foundOr404(findComposite(getDb(), actor, id));
  const photographers = [...new Set(composite.inputs.map((i) => i.photographer))];
  const isCurator = can(actor.roles, "review:use");
  const plate = composite.state === "done" ? await findPlateOfSource(getDb(), composite.id) : null;
  return (
    <>
      <PageTitle title={composite.title} lead={`Composite of ${composite.inputs.length} reductions of the eclipse of ${composite.eclipseId}, started ${formatDateTime(composite.createdAt)}${composite.finishedAt ? `, finished ${formatDateTime(composite.finishedAt)}` : ""}.`}>
        <Link href="/studio/composites">Back to the composites</Link>
      </PageTitle>
      <ReductionProgress
        reductionId={composite.id}
        noun="composite"
        initial={{ state: composite.state, stage: composite.stage, progress: composite.progress, error: composite.error }}
      />
      <PageSection id="credits" title="Credits">
        <p>
          Data: {photographers.join(", ")}. Composed by {composite.composedBy ?? "a former member"}
          {composite.measurements ? ` with ${String((composite.measurements as { creator?: string }).creator ?? "Crownlight")}` : ""}.
        </p>
      </PageSection>
      {composite.state === "done" && composite.measurements ? <CompositeResult composite={composite} /> : null}
      {composite.state === "done" ? (
        <PageSection id="plate" title="Plate">
          {plate ? (
            <p>
              {plate.state === "draft" ? "A draft plate shows this composite" : "This composite is on a plate"}:{" "}
              {isCurator ? <Link href={`/review/plates/${plate.id}`}>open it on the plate desk</Link> : plate.state === "draft" ? "the curators are preparing it." : <Link href={`/plates/${plate.slug}`}>see its public page</Link>}
              {isCurator && plate.state !== "draft" ? (
                <>
                  {" "}
                  or <Link href={`/plates/${plate.slug}`}>see its public page</Link>
                </>
              ) : null}
              .
            </p>
          ) : isCurator ? (
            <>
              <p className="mb-3 max-w-prose text-sm">
                A plate credits every input&apos;s photographer for the data and {composite.composedBy ?? "whoever composed it"} for the processing. It can be published once every input&apos;s bracket set is approved.
              </p>
              <MakePlateButton compositeId={composite.id} />
            </>
          ) : (
            <p className="max-w-prose text-sm">A curator can make a plate of this composite for the public gallery once every input&apos;s bracket set has been approved.</p>
          )}
        </PageSection>
      ) : null}
    </>
  );
}
