import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/app/_server/actor";
import { foundOr404 } from "@/app/_server/found";
import { SetActivityNotice } from "@/components/bracket-sets/set-activity-notice";
import { BracketChart } from "@/components/bracket-sets/bracket-chart";
import { FrameTriage } from "@/components/bracket-sets/frame-triage";
import { PageTitle } from "@/components/page-title";
import { MakePlateButton } from "@/components/plates-desk/make-plate-button";
import { ReductionList } from "@/components/reductions/reduction-list";
import { ReductionStartForm } from "@/components/reductions/reduction-start-form";
import { DecisionForm } from "@/components/review/decision-form";
import { LinkedComparison, type ComparisonChoice } from "@/components/review/linked-comparison";
import { NoteForm } from "@/components/review/note-form";
import { stateTone } from "@/components/review/state-tone";
import { CuratorNotesList, DecisionHistory } from "@/components/review/review-history";
import { Badge } from "@/components/ui/badge";
import { getDb } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { findBracketSet } from "@/lib/bracket-sets";
import { reductionFilesBase } from "@/lib/reductions/files/manifest";
import { listReductions } from "@/lib/reductions/reductions";
import { listCuratorNotes, listDecisionHistory } from "@/lib/review/history";
import { availableActions, STATE_LABELS, type CuratorAction } from "@/lib/review/state-machine";
import { formatDate, formatDateTime } from "@/lib/format/dates";

export const metadata: Metadata = { title: "Review a bracket set" };

export default async function ReviewSetPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await requirePagePermission("review:use", `/review/sets/${id}`);
  const db = getDb();
  const set = await foundOr404(findBracketSet(db, actor, id));
  const [reductions, decisions, notes, settings] = await Promise.all([
    listReductions(db, actor, set.id),
    listDecisionHistory(db, actor, set.id),
    listCuratorNotes(db, actor, set.id),
    findSocietySettings(db),
  ]);
  const isOwn = set.isOwn;
  const actions = isOwn ? [] : (availableActions(set.state, "curator") as CuratorAction[]);
  const done = reductions.filter((r) => r.state === "done");
  const running = reductions.filter((r) => r.state === "queued" || r.state === "running").length;
  const usable = set.frames.filter((f) => f.kind === "light" && f.included && f.ingestState === "ingested");
  const groups = [...new Set(usable.map((f) => f.groupNumber))].sort((a, b) => a - b);
  const choices: ComparisonChoice[] = done.flatMap((r, i) => {
    const name = `Reduction ${done.length - i} (${r.params.filter ?? "?"}${r.params.filterStrength !== undefined ? ` ${r.params.filterStrength}` : ""}, ${r.finishedAt ? formatDateTime(r.finishedAt) : "not finished"})`;
    return [
      { value: `${r.id}:natural`, label: `${name}: natural`, tileSource: `${reductionFilesBase(r.id)}/natural-iiif/info.json`, alt: `Natural rendition of ${set.name}, ${name}` },
      { value: `${r.id}:structure`, label: `${name}: structure`, tileSource: `${reductionFilesBase(r.id)}/structure-iiif/info.json`, alt: `Structure rendition of ${set.name}, ${name}` },
    ];
  });

  return (
    <>
      <PageTitle title={set.name} lead={`Eclipse of ${formatDate(set.eclipseId)} · by ${set.ownerName} · ${set.frames.length} frame${set.frames.length === 1 ? "" : "s"}`}>
        <div className="flex items-center gap-3">
          <Badge tone={stateTone(set.state)}>{STATE_LABELS[set.state]}</Badge>
          <Link href="/review">Back to the queue</Link>
        </div>
      </PageTitle>
      <SetActivityNotice setId={set.id} initial={{ checking: 0, running }} />

      <nav aria-label="On this page" className="mb-8">
        <ul className="flex flex-wrap gap-4 text-sm">
          <li><a href="#decide-h">Decision</a></li>
          {set.state === "approved" ? <li><a href="#plate-h">Plate</a></li> : null}
          <li><a href="#compare-h">Compare</a></li>
          <li><a href="#reductions-h">Reductions</a></li>
          <li><a href="#frames-h">Bracket and frames</a></li>
          <li><a href="#history-h">History and notes</a></li>
        </ul>
      </nav>

      <div className="flex flex-col gap-12">
        <section aria-labelledby="decide-h" className="flex flex-col gap-3">
          <h2 id="decide-h" className="text-xl font-semibold">Decision</h2>
          {isOwn ? (
            <p className="text-ink-muted">This is your own bracket set: another curator has to decide on it.</p>
          ) : actions.length === 0 ? (
            <p className="text-ink-muted">
              No decision can be taken while the set is {STATE_LABELS[set.state]}
              {set.state === "gathering" ? ": the photographer has not sent it for review." : "."}
            </p>
          ) : (
            <DecisionForm
              setId={set.id}
              actions={actions}
              changeReasons={settings.changeReasons.map((r) => ({ value: r.code, label: r.label }))}
              rejectionReasons={settings.rejectionReasons.map((r) => ({ value: r.code, label: r.label }))}
            />
          )}
        </section>

        {set.state === "approved" ? (
          <section aria-labelledby="plate-h" className="flex flex-col gap-3">
            <h2 id="plate-h" className="text-xl font-semibold">Plate</h2>
            <p className="max-w-prose text-sm text-ink-muted">The set is approved: make a draft plate from one of its finished reductions, then write its texts and credits and publish it.</p>
            <MakePlateButton
              setId={set.id}
              reductions={done.map((r, i) => ({ id: r.id, state: r.state, label: `Reduction ${done.length - i}: ${r.params.registration ?? "?"} registration, ${(r.params.filter ?? "?").toUpperCase()} ${r.params.filterStrength ?? 0.3}, finished ${r.finishedAt ? formatDateTime(r.finishedAt) : "not yet"}` }))}
            />
          </section>
        ) : null}

        <section aria-labelledby="compare-h" className="flex flex-col gap-3">
          <h2 id="compare-h" className="text-xl font-semibold">Compare renditions</h2>
          <LinkedComparison choices={choices} />
        </section>

        <section aria-labelledby="reductions-h" className="flex flex-col gap-4">
          <h2 id="reductions-h" className="text-xl font-semibold">Reductions</h2>
          {reductions.length === 0 ? <p className="text-ink-muted">No reductions yet.</p> : <ReductionList reductions={reductions} caption="Reductions of this set, with their parameters and measurements" />}
          {usable.length >= 2 ? (
            <details className="rounded-card border border-line p-4">
              <summary className="cursor-pointer font-semibold">Re-reduce with other parameters</summary>
              <p className="my-3 text-sm text-ink-muted">The new reduction joins the same queue as the photographer&apos;s; none replaces another.</p>
              <ReductionStartForm setId={set.id} groups={groups} submitLabel="Start a re-reduction" stayHere />
            </details>
          ) : (
            <p className="text-sm text-ink-muted">A re-reduction needs at least two checked, included light frames.</p>
          )}
        </section>

        <section aria-labelledby="frames-h" className="flex flex-col gap-4">
          <h2 id="frames-h" className="text-xl font-semibold">The bracket over time</h2>
          <BracketChart frames={set.frames} />
          {set.frames.length ? <FrameTriage setId={set.id} frames={set.frames} canEdit={false} /> : <p className="text-ink-muted">No frames.</p>}
        </section>

        <section aria-labelledby="history-h" className="grid gap-8 lg:grid-cols-2">
          <div className="flex flex-col gap-3">
            <h2 id="history-h" className="text-xl font-semibold">Decision history</h2>
            <DecisionHistory decisions={decisions} />
          </div>
          <div className="flex flex-col gap-3">
            <h2 className="text-xl font-semibold">Private notes</h2>
            <p className="text-sm text-ink-muted">Kept apart from what the photographer reads.</p>
            <CuratorNotesList notes={notes} />
            {isOwn ? null : <NoteForm setId={set.id} />}
          </div>
        </section>
      </div>
    </>
  );
}
