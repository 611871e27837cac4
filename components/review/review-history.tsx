import { Badge } from "@/components/ui/badge";
import type { CuratorNoteDto, DecisionHistoryDto } from "@/lib/review/history";
import { ACTION_LABELS, STATE_LABELS } from "@/lib/review/state-machine";
import { formatDateTime } from "@/lib/format/dates";

const when = (iso: string) => formatDateTime(iso);

/** Every move of the set, newest first, with what the photographer was told. */
export function DecisionHistory({ decisions }: { decisions: DecisionHistoryDto[] }) {
  if (decisions.length === 0) return <p className="text-ink-muted">No decisions yet.</p>;
  return (
    <ol className="flex flex-col gap-4">
      {decisions.map((d) => (
        <li key={d.id} className="rounded-card border border-line p-4">
          <p>
            <span className="font-semibold">{ACTION_LABELS[d.action][0].toUpperCase() + ACTION_LABELS[d.action].slice(1)}</span> by {d.byName ?? "a former member"},{" "}
            <time dateTime={d.decidedAt} className="font-mono text-sm">
              {when(d.decidedAt)}
            </time>
          </p>
          <p className="text-sm text-ink-muted">
            {STATE_LABELS[d.fromState]} → {STATE_LABELS[d.toState]}
            {d.pipelineVersion ? ` · pipeline ${d.pipelineVersion}` : ""}
          </p>
          {d.reasonLabel ? (
            <p className="mt-1">
              <Badge tone="warn">{d.reasonLabel}</Badge>
            </p>
          ) : null}
          {d.messageToPhotographer ? (
            <blockquote className="mt-2 border-l-4 border-line-strong pl-3 whitespace-pre-line">
              <span className="sr-only">Message to the photographer: </span>
              {d.messageToPhotographer}
            </blockquote>
          ) : null}
        </li>
      ))}
    </ol>
  );
}

/** The curators' private notes, newest first. */
export function CuratorNotesList({ notes }: { notes: CuratorNoteDto[] }) {
  if (notes.length === 0) return <p className="text-ink-muted">No notes yet.</p>;
  return (
    <ul className="flex flex-col gap-3">
      {notes.map((n) => (
        <li key={n.id} className="rounded-card border border-dashed border-line-strong p-3">
          <p className="whitespace-pre-line">{n.body}</p>
          <p className="mt-1 text-sm text-ink-muted">
            {n.authorName ?? "a former curator"},{" "}
            <time dateTime={n.createdAt} className="font-mono">
              {when(n.createdAt)}
            </time>
            {n.decisionId ? " · with a decision" : ""}
          </p>
        </li>
      ))}
    </ul>
  );
}
