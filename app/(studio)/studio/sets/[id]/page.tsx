import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { foundOr404 } from "@/app/_server/found";
import { ScaleWarning } from "@/components/bracket-sets/scale-warning";
import { SetActivityNotice } from "@/components/bracket-sets/set-activity-notice";
import { BracketChart } from "@/components/bracket-sets/bracket-chart";
import { BracketReach } from "@/components/bracket-sets/bracket-reach";
import { FrameTimesPanel } from "@/components/bracket-sets/frame-times-panel";
import { ClockOffsetForm } from "@/components/bracket-sets/clock-offset-form";
import { FrameTriage } from "@/components/bracket-sets/frame-triage";
import { FrameUploader } from "@/components/bracket-sets/frame-uploader";
import { KitChooser } from "@/components/bracket-sets/kit-chooser";
import { SubmitForReview, SubmittedNotice } from "@/components/bracket-sets/submit-for-review";
import { PageTitle } from "@/components/page-title";
import { ReductionList } from "@/components/reductions/reduction-list";
import { ReductionStartForm } from "@/components/reductions/reduction-start-form";
import { Badge } from "@/components/ui/badge";
import { getDb } from "@/db/client";
import { findBracketSet } from "@/lib/bracket-sets";
import { checkSetGeometry } from "@/lib/bracket-sets/set-checks";
import { findEclipse } from "@/lib/eclipses/eclipses";
import { listKits } from "@/lib/kits/kits";
import { listReductions } from "@/lib/reductions/reductions";
import { assessRunChoices } from "@/lib/reductions/run-options";
import { findLatestMessageToPhotographer } from "@/lib/review/history";
import { listSites } from "@/lib/sites/sites";
import { MAX_FILES_PER_SET, MAX_FILE_SIZE_BYTES, PART_SIZE_BYTES } from "@/lib/storage/limits";
import { formatDateTime } from "@/lib/format/dates";

export const metadata: Metadata = { title: "Bracket set" };

const STATE_TEXT: Record<string, string> = {
  gathering: "gathering frames",
  "awaiting-review": "awaiting review",
  "changes-requested": "changes requested",
  approved: "approved",
  rejected: "rejected",
};

export default async function BracketSetPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { id } = await params;
  const justSubmitted = (await searchParams).submitted === "1";
  const actor = await requirePagePermission("studio:use", `/studio/sets/${id}`);
  const db = getDb();
  const set = await foundOr404(findBracketSet(db, actor, id));
  const [reductions, eclipse, sites, kits, curatorsMessage] = await Promise.all([
    listReductions(db, actor, set.id),
    findEclipse(db, set.eclipseId).catch(() => null),
    set.isOwn ? listSites(db, actor) : Promise.resolve([]),
    set.isOwn ? listKits(db, actor) : Promise.resolve([]),
    findLatestMessageToPhotographer(db, actor, set.id),
  ]);
  const site = sites.find((s) => s.id === set.siteId);
  const kit = kits.find((k) => k.id === set.kitId);
  const isOpen = set.state === "gathering" || set.state === "changes-requested";
  const canEdit = set.isOwn && isOpen;
  const checking = set.frames.filter((f) => f.ingestState === "received").length;
  const running = reductions.filter((r) => r.state === "queued" || r.state === "running").length;
  const hasDone = reductions.some((r) => r.state === "done");
  const usable = set.frames.filter((f) => f.kind === "light" && f.included && f.ingestState === "ingested");
  const groups = [...new Set(usable.map((f) => f.groupNumber))].sort((a, b) => a - b);
  const lights = set.frames.filter((f) => f.kind === "light" && f.ingestState === "ingested");
  const soundLimbs = lights.filter((f) => f.flags.limb?.quality === "good").map((f) => f.flags.limb!.radiusPx);
  const checks = await checkSetGeometry(db, actor, set.id, soundLimbs, lights.filter((f) => f.correctedCaptureAt).map((f) => Date.parse(f.correctedCaptureAt!)));
  // Which alignments the frames allow, with the reasons in words (the server refuses in the same words).
  const choices = assessRunChoices(usable.map((f) => ({ fileName: f.fileName, hasTime: f.captureAt !== null })), true);
  // Asked before the run: where north will come from, when nothing gives it.
  if (choices.sun.isOffered && checks.orientation.needsAnswer) choices.sun.note = `${checks.orientation.text} (See “Kit and orientation” above.)`;
  // The owner reduces their set; a curator may re-reduce anyone's.
  const canReduce = (set.isOwn || actor.roles.includes("curator")) && usable.length >= 2;

  return (
    <>
      <PageTitle
        title={set.name}
        lead={
          <>
            {eclipse ? `${eclipse.kind} eclipse of ${eclipse.id}` : set.eclipseId}
            {site ? ` · ${site.name}` : ""}
            {kit ? ` · ${kit.name}` : ""}
            {set.isOwn ? "" : ` · by ${set.ownerName}`}
          </>
        }
      >
        <div className="flex items-center gap-3">
          <Badge tone={set.state === "approved" ? "ok" : set.state === "rejected" ? "danger" : set.state === "changes-requested" ? "warn" : "neutral"}>
            {STATE_TEXT[set.state] ?? set.state}
          </Badge>
          <Link href="/studio">All bracket sets</Link>
        </div>
      </PageTitle>

      <SetActivityNotice setId={set.id} initial={{ checking, running }} watchFrames />

      {justSubmitted && set.state === "awaiting-review" && set.isOwn ? <SubmittedNotice /> : null}

      <ScaleWarning text={checks.scaleWarning} />

      {curatorsMessage ? (
        <section aria-labelledby="curators-message-h" className="mb-8 max-w-3xl rounded-card border border-warn/60 bg-warn/10 p-4">
          <h2 id="curators-message-h" className="text-lg font-semibold">
            The curators ask for changes
          </h2>
          {curatorsMessage.reasonLabel ? <p className="mt-1 font-medium">Reason: {curatorsMessage.reasonLabel}</p> : null}
          <p className="mt-2 whitespace-pre-line">{curatorsMessage.message}</p>
          <p className="mt-2 text-sm text-ink-muted">
            Sent <time dateTime={curatorsMessage.decidedAt}>{formatDateTime(curatorsMessage.decidedAt)}</time>.{" "}
            {set.isOwn ? "Correct the set below, then submit it for review again." : ""}
          </p>
        </section>
      ) : null}
      {actor.roles.includes("curator") && !set.isOwn && set.state !== "gathering" ? (
        <p className="mb-8">
          <Link href={`/review/sets/${set.id}`}>Open this set on the review desk</Link>
        </p>
      ) : null}

      {set.notes ? <p className="mb-8 max-w-3xl whitespace-pre-line text-ink-muted">{set.notes}</p> : null}

      <div className="flex flex-col gap-12">
        {canEdit ? (
          <FrameUploader
            setId={set.id}
            limits={{ maxFileSizeBytes: MAX_FILE_SIZE_BYTES, maxFilesPerSet: MAX_FILES_PER_SET, partSizeBytes: PART_SIZE_BYTES }}
            openUploads={set.openUploads}
            frames={set.frames}
          />
        ) : !isOpen ? (
          <p className="max-w-3xl text-ink-muted">This set is {STATE_TEXT[set.state] ?? set.state}: frames can be added or corrected again only if a curator asks for changes.</p>
        ) : null}

        <section aria-labelledby="bracket-chart-h" className="flex flex-col gap-3">
          <h2 id="bracket-chart-h" className="text-xl font-semibold">
            The bracket over time
          </h2>
          <BracketChart frames={set.frames} />
        </section>

        <section aria-labelledby="bracket-reach-h" className="flex flex-col gap-3">
          <h2 id="bracket-reach-h" className="text-xl font-semibold">
            Reach of the bracket
          </h2>
          <BracketReach frames={set.frames} moonToSun={checks.moonToSun} />
        </section>

        {set.frames.length ? (
          <FrameTriage setId={set.id} frames={set.frames} canEdit={canEdit} eclipseDay={set.eclipseId} />
        ) : (
          <p className="text-ink-muted">No frames yet. Add the frames of one camera&apos;s bracket above; they are checked and measured as they arrive.</p>
        )}

        {canEdit ? (
          <section aria-labelledby="kit-h" className="flex flex-col gap-3">
            <h2 id="kit-h" className="text-xl font-semibold">
              Kit and orientation
            </h2>
            <KitChooser setId={set.id} kitId={set.kitId} kits={kits.map((k) => ({ id: k.id, name: k.name }))} outlook={checks.orientation} northAngleDeg={set.northAngleDeg} />
          </section>
        ) : null}

        {canEdit && lights.length ? (
          <FrameTimesPanel setId={set.id} eclipseDay={set.eclipseId} untimedCount={lights.filter((f) => f.needsTime).length} lightCount={lights.length} />
        ) : null}

        {canEdit ? <ClockOffsetForm setId={set.id} clockOffsetS={set.clockOffsetS} frames={set.frames} /> : null}

        <section aria-labelledby="reductions-h" className="flex flex-col gap-4">
          <h2 id="reductions-h" className="text-xl font-semibold">
            Reductions
          </h2>
          {reductions.length === 0 ? <p className="text-ink-muted">No reductions yet. Each reduction is kept; a new one never replaces another.</p> : <ReductionList reductions={reductions} caption="Reductions of this set" />}
          {canReduce ? (
            <ReductionStartForm setId={set.id} groups={groups} choices={choices} />
          ) : (
            <p className="text-sm text-ink-muted">A reduction needs at least two checked, included light frames{usable.some((f) => f.exposureS === null) ? " with exposures" : ""}.</p>
          )}
        </section>

        {canEdit ? (
          <section aria-labelledby="submit-h" className="flex flex-col gap-3">
            <h2 id="submit-h" className="text-xl font-semibold">
              Review
            </h2>
            <SubmitForReview setId={set.id} hasReduction={hasDone} />
          </section>
        ) : null}
      </div>
    </>
  );
}
