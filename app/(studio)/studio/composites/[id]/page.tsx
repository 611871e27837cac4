import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { foundOr404 } from "@/app/_server/found";
import { CompositeResult } from "@/components/composites/composite-result";
import { PageTitle } from "@/components/page-title";
import { PageSection } from "@/components/ui/page-section";
import { ReductionProgress } from "@/components/reductions/reduction-progress";
import { getDb } from "@/db/client";
import { findComposite } from "@/lib/composites/composites";
import { formatDateTime } from "@/lib/format/dates";

export const metadata: Metadata = { title: "Composite" };

export default async function CompositePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePagePermission("studio:use", `/studio/composites/${id}`);
  const composite = await foundOr404(findComposite(getDb(), actor, id));
  const photographers = [...new Set(composite.inputs.map((i) => i.photographer))];
  return (
    <>
      <PageTitle title={composite.title} lead={`Composite of ${composite.inputs.length} reductions of the eclipse of ${composite.eclipseId}, started ${formatDateTime(composite.createdAt)}${composite.finishedAt ? `, finished ${formatDateTime(composite.finishedAt)}` : ""}.`}>
        <Link href="/studio/composites">Back to the composites</Link>
      </PageTitle>
      <ReductionProgress
        reductionId={composite.id}
        pollUrl={`/api/composites/${encodeURIComponent(composite.id)}`}
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
    </>
  );
}
