import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { foundOr404 } from "@/app/_server/found";
import { PageTitle } from "@/components/page-title";
import { PageSection } from "@/components/ui/page-section";
import { LocationCheck } from "@/components/plates-desk/location-check";
import { PlateReports } from "@/components/plates-desk/plate-reports";
import { PlateStateActions } from "@/components/plates-desk/plate-state-actions";
import { PlateTextForm } from "@/components/plates-desk/plate-text-form";
import { PlateVersions } from "@/components/plates-desk/plate-versions";
import { Badge } from "@/components/ui/badge";
import { getDb } from "@/db/client";
import { listEditionsOfPlate } from "@/lib/editions/editions";
import { findDeskPlate } from "@/lib/plates/desk-view";
import { STATE_LABELS } from "@/lib/review/state-machine";
import { PlateViewer } from "@/components/viewer/plate-viewer";
import { formatDate, formatDateTime } from "@/lib/format/dates";
import { describeAudit } from "@/lib/audit/labels";

export const metadata: Metadata = { title: "Plate editor" };
export const dynamic = "force-dynamic";


const RENDITION_LABELS = { natural: "Natural", structure: "Structure" } as const;
const STATE_TONE = { draft: "neutral", published: "ok", withdrawn: "danger" } as const;

export default async function PlateEditorPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePagePermission("review:use", `/review/plates/${id}`);
  const plate = await foundOr404(findDeskPlate(getDb(), actor, id));
  const publications = await listEditionsOfPlate(getDb(), actor, plate.id);
  const finalWithdrawal = plate.withdrawn?.kind === "permanent";
  const openReports = plate.reports.filter((r) => r.state === "open").length;
  return (
    <>
      <p className="mb-2 text-sm">
        <Link href="/review/plates">All plates</Link>
      </p>
      <PageTitle
        title={plate.title}
        lead={
          <>
            {plate.composite ? (
              <>
                From the composite <Link href={`/studio/composites/${plate.composite.id}`}>“{plate.composite.title}”</Link> of{" "}
                {plate.composite.sets.map((s, i) => (
                  <span key={s.id}>
                    {i ? (i === plate.composite!.sets.length - 1 ? " and " : ", ") : ""}“{s.name}” by {s.photographer} ({STATE_LABELS[s.state]})
                  </span>
                ))}
                . Version {plate.currentVersion}.
              </>
            ) : (
              <>
                From the bracket set “{plate.set.name}” by {plate.set.photographer} (set {STATE_LABELS[plate.set.state]}). Version {plate.currentVersion}.
              </>
            )}
          </>
        }
      >
        <Badge tone={STATE_TONE[plate.state]}>{plate.withdrawn ? `withdrawn ${plate.withdrawn.kind === "temporary" ? "for the time being" : "for good"}` : plate.state}</Badge>
      </PageTitle>
      {plate.state !== "draft" ? (
        <p className="-mt-4 mb-6 text-sm">
          Public page:{" "}
          <Link href={`/plates/${plate.slug}`} className="underline">/plates/{plate.slug}</Link>
        </p>
      ) : null}
      {plate.withdrawn ? (
        <p role="note" className="mb-6 rounded-control border border-danger p-3 text-sm">
          Withdrawn on {formatDate(plate.withdrawn.at)}: {plate.withdrawn.reason}
        </p>
      ) : null}

      <PageSection id="texts-h" title="What the public reads">
        <div className="grid gap-8 xl:grid-cols-[minmax(0,7fr)_minmax(0,5fr)]">
          <div className="min-w-0 xl:sticky xl:top-4 xl:self-start">
            <h3 className="mb-2 text-base font-semibold">The image, as the public viewer shows it</h3>
            {plate.image.renditions.length ? (
              <PlateViewer title={plate.title} altText={plate.altText || `Image of the plate “${plate.title}” (no alt text yet)`} renditions={plate.image.renditions.map((r) => ({ ...r, label: RENDITION_LABELS[r.key] }))} geometry={plate.image.geometry} mapLayer={plate.image.mapLayer ?? undefined} />
            ) : (
              <p className="text-sm text-ink-muted">This version has no rendition to show.</p>
            )}
          </div>
          <div className="min-w-0">
        <PlateTextForm
          plateId={plate.id}
          values={{
            title: plate.title,
            caption: plate.caption,
            description: plate.description,
            altText: plate.altText,
            acquiredBy: plate.acquiredBy,
            processedBy: plate.processedBy,
            licence: plate.licence,
            slug: plate.slug,
          }}
          suggestions={plate.suggestions}
          slugLocked={plate.publishedAt !== null}
          readOnly={finalWithdrawal}
        />
          </div>
        </div>
      </PageSection>

      <PageSection id="location-h" title={plate.locations.length > 1 ? "What the public sees of the sites" : "What the public sees of the site"}>
        {plate.locations.length === 0 ? <LocationCheck location={null} /> : null}
        <div className="flex flex-col gap-4">
          {plate.locations.map((location, i) => (
            <LocationCheck key={i} location={location} />
          ))}
        </div>
      </PageSection>

      <PageSection id="state-h" title="Publishing and withdrawal">
        <PlateStateActions plateId={plate.id} title={plate.title} state={plate.state} withdrawnKind={plate.withdrawn?.kind ?? null} licence={plate.licence} photographer={plate.set.photographer} setState={plate.set.state} isComposite={plate.composite !== null} />
      </PageSection>

      <PageSection id="versions-h" title="Versions">
        <PlateVersions plateId={plate.id} currentVersion={plate.currentVersion} versions={plate.versions} finishedReductions={plate.finishedReductions} sourceKind={plate.sourceKind} readOnly={finalWithdrawal} />
      </PageSection>

      <PageSection id="publications-h" title="Publication history">
        {publications.length === 0 ? (
          <p className="text-sm">Not in any newsletter or journal edition.</p>
        ) : (
          <ul className="flex flex-col gap-1 text-sm">
            {publications.map((e) => (
              <li key={e.id}>
                “{e.title}”{e.issueLabel ? `, ${e.issueLabel}` : ""} ({e.kind}, {e.state}), version {e.version}, plate {e.position}:{" "}
                {e.embargoDate ? <strong>embargo until {formatDate(e.embargoDate)}</strong> : "no embargo"}
              </li>
            ))}
          </ul>
        )}
      </PageSection>

      <PageSection id="reports-h" title={`Reports from the public (${openReports} open)`}>
        <PlateReports plateId={plate.id} reports={plate.reports} />
      </PageSection>

      <PageSection id="history-h" title="History">
        <ol className="flex flex-col gap-1 text-sm">
          {plate.history.map((h, i) => (
            <li key={i}>
              {formatDateTime(h.at)}: {describeAudit(h.action)} by {h.actorName ?? "a visitor or the system"}
            </li>
          ))}
        </ol>
      </PageSection>
    </>
  );
}
