import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { foundOr404 } from "@/app/_server/found";
import { PageTitle } from "@/components/page-title";
import { PageSection } from "@/components/ui/page-section";
import { CoverageMap } from "@/components/reductions/coverage-map";
import { FrameCorrections } from "@/components/reductions/frame-corrections";
import { FrameLimbs } from "@/components/reductions/frame-limbs";
import { RadialProfilePlot } from "@/components/reductions/radial-profile-plot";
import { ReductionDownloads, ReductionMeasurements, ReductionParameters, Renditions, StageLog, type ShownParams } from "@/components/reductions/reduction-details";
import { ReductionList } from "@/components/reductions/reduction-list";
import { ReductionProgress } from "@/components/reductions/reduction-progress";
import { ReductionStartForm } from "@/components/reductions/reduction-start-form";
import { ScaleWarning } from "@/components/bracket-sets/scale-warning";
import { SetActivityNotice } from "@/components/bracket-sets/set-activity-notice";
import { getDb } from "@/db/client";
import { findBracketSet } from "@/lib/bracket-sets";
import { checkSetGeometry } from "@/lib/bracket-sets/set-checks";
import { buildOutputUrl } from "@/lib/reductions/files/manifest";
import { findReductionOutputsView } from "@/lib/reductions/outputs";
import { findReduction, listReductions } from "@/lib/reductions/reductions";
import { assessRunChoices } from "@/lib/reductions/run-options";
import type { ReductionParamsInput } from "@/lib/reductions/schemas";
import { formatDateTime } from "@/lib/format/dates";

export const metadata: Metadata = { title: "Reduction" };

/** The service's answer, or the 404 page when it says "not found" (as it does for what the actor may not see). */

export default async function ReductionPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePagePermission("studio:use", `/studio/reductions/${id}`);
  const db = getDb();
  const reduction = await foundOr404(findReduction(db, actor, id));
  const view = await foundOr404(findReductionOutputsView(db, actor, id));
  const siblings = await listReductions(db, actor, view.setId);
  const report = view.report;
  const measurements = reduction.measurements ?? (report ? (report.overall as Record<string, unknown>) : {});
  const created = formatDateTime(reduction.createdAt);
  const profile = report?.overall.radialProfile ?? null;
  const coverage = report?.overall.coverage ?? null;
  const set = await findBracketSet(db, actor, view.setId);
  // The kit's plate scale against the one this reduction's frames show (their sound limb fits).
  const fitted = (report?.frames ?? []).filter((f) => f.limb?.verdict === "sound" && f.limb.radiusPx);
  const times = fitted.map((f) => (f.captureTimeUtc ? Date.parse(f.captureTimeUtc) : NaN)).filter(Number.isFinite);
  const checks = await checkSetGeometry(db, actor, view.setId, fitted.map((f) => f.limb!.radiusPx as number), times);
  const usable = set.frames.filter((f) => f.kind === "light" && f.included && f.ingestState === "ingested");
  const choices = assessRunChoices(usable.map((f) => ({ fileName: f.fileName, hasTime: f.captureAt !== null })), true);
  const othersRunning = siblings.filter((r) => r.id !== reduction.id && (r.state === "queued" || r.state === "running")).length;

  return (
    <>
      <PageTitle title={`Reduction of ${view.setName}`} lead={`Started ${created}${reduction.finishedAt ? `, finished ${formatDateTime(reduction.finishedAt)}` : ""}.`}>
        <Link href={`/studio/sets/${view.setId}`}>Back to the bracket set</Link>
      </PageTitle>

      <SetActivityNotice
        setId={view.setId}
        initial={{ checking: 0, running: othersRunning }}
        excludeReductionId={reduction.id}
        othersMessage="Another reduction of this set is in progress; the list below follows it."
        intervalMs={4000}
      />

      <ScaleWarning text={checks.scaleWarning} />

      <ReductionProgress reductionId={reduction.id} initial={{ state: reduction.state, stage: reduction.stage, progress: reduction.progress, stageFrames: reduction.stageFrames, error: reduction.error }} />

      <PageSection id="parameters" title="Parameters">
        <ReductionParameters params={reduction.params as ShownParams} />
      </PageSection>

      {reduction.state === "done" ? (
        <>
          <PageSection id="renditions" title="Renditions">
            <Renditions reductionId={reduction.id} setName={view.setName} structurePreview={report?.outputs.previewStructure ?? "structure.png"} />
            {report?.outputs.renditionSize && report.outputs.renditionSize.scale !== 1 ? (
              <p className="mt-3 text-sm text-ink-muted">
                Renditions and tiles are {report.outputs.renditionSize.width} × {report.outputs.renditionSize.height} px; the master FITS keeps the full size.
              </p>
            ) : null}
          </PageSection>

          {view.reportProblem ? (
            <p role="alert" className="mt-8 rounded-control border border-warn/50 bg-warn/10 px-3 py-2 text-warn">
              {view.reportProblem} The renditions and downloads are still available; frame fits, profile and coverage cannot be shown.
            </p>
          ) : null}

          {report ? (
            <PageSection id="corrections" title="Corrections and frames left out">
              <FrameCorrections report={report} />
            </PageSection>
          ) : null}

          <PageSection id="measurements" title="Measurements">
            <ReductionMeasurements measurements={measurements} pipelineVersion={reduction.pipelineVersion ?? report?.pipelineVersion ?? null} />
          </PageSection>

          <PageSection id="profile" title="Radial brightness profile">
            {profile ? <RadialProfilePlot profile={profile} /> : <p className="text-ink-muted">This reduction&apos;s report has no radial profile (it was made by an earlier pipeline).</p>}
          </PageSection>

          <PageSection id="coverage" title="Coverage">
            {coverage && report?.outputs.coverage ? (
              <CoverageMap coverage={coverage} src={buildOutputUrl(reduction.id, report.outputs.coverage)} />
            ) : (
              <p className="text-ink-muted">This reduction&apos;s report has no coverage map (it was made by an earlier pipeline).</p>
            )}
          </PageSection>

          <PageSection id="frames" title="Frames and their fitted limbs">
            {report ? <FrameLimbs setId={view.setId} frames={report.frames} frameIds={view.frameIdsByName} referenceFrame={report.overall.referenceFrame} /> : <p className="text-ink-muted">No report to read the frames from.</p>}
          </PageSection>

          <PageSection id="stage-log" title="Stage log">
            {report && Object.keys(report.timingsMs).length ? <StageLog timingsMs={report.timingsMs} /> : <p className="text-ink-muted">No timings were recorded.</p>}
          </PageSection>

          <PageSection id="downloads" title="Downloads">
            <ReductionDownloads reductionId={reduction.id} />
          </PageSection>
        </>
      ) : null}

      <PageSection id="again" title="Reduce again">
        <details>
          <summary className="cursor-pointer font-medium">Start another reduction of this set with other parameters</summary>
          <p className="my-3 text-ink-muted">This reduction stays as it is; the new one gets its own page and files.</p>
          <ReductionStartForm setId={view.setId} groups={[]} initial={reduction.params as Partial<ReductionParamsInput>} submitLabel="Start another reduction" choices={choices} />
        </details>
      </PageSection>

      <PageSection id="all" title="All reductions of this set">
        <ReductionList reductions={siblings} caption={`Reductions of ${view.setName}, newest first`} currentId={reduction.id} />
      </PageSection>
    </>
  );
}
