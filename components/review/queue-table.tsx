"use client";
// The review queue's table with its one bulk action. Taking sets in hand is
// the only bulk action offered: it changes no set's state and mails nobody,
// so choosing the wrong rows costs nothing. Decisions stay one set at a time,
// on the set's own page, after a curator has looked at it.
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { callApi } from "@/components/bracket-sets/api-client";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { SortableHeader, type SortDirection } from "@/components/ui/sortable-header";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import type { QueueRowDto } from "@/lib/review/queue";
import { STATE_LABELS } from "@/lib/review/state-machine";
import { stateTone } from "./state-tone";
import { formatDate, formatDateTime } from "@/lib/format/dates";

export interface QueueColumn {
  key: string;
  label: string;
  /** Where sorting by this column leads; absent for columns that do not sort. */
  href?: string;
  direction: SortDirection;
}

export function QueueTable({ rows, columns, caption, csvHref }: { rows: QueueRowDto[]; columns: QueueColumn[]; caption: string; csvHref: string }) {
  const router = useRouter();
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [pending, setPending] = useState(false);
  const [status, setStatus] = useState<{ tone: "ok" | "danger"; text: string } | null>(null);
  const selectable = rows.filter((r) => !r.isOwn);
  const allChosen = selectable.length > 0 && selectable.every((r) => chosen.has(r.id));

  function toggle(id: string) {
    setChosen((prev) => {
      const next = new Set(prev);
      if (next.has(id)) next.delete(id);
      else next.add(id);
      return next;
    });
  }

  async function assign(assignTo: boolean) {
    setPending(true);
    setStatus(null);
    try {
      const { changed } = await callApi<{ changed: number }>("/api/review/assignments", { body: { setIds: [...chosen], assign: assignTo } });
      setStatus({ tone: "ok", text: assignTo ? `${changed} set${changed === 1 ? "" : "s"} now in your hands.` : `${changed} set${changed === 1 ? "" : "s"} handed back.` });
      setChosen(new Set());
      router.refresh();
    } catch (err) {
      setStatus({ tone: "danger", text: (err as Error).message });
    } finally {
      setPending(false);
    }
  }

  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-center gap-3" role="group" aria-label="With the chosen sets">
        <Button size="sm" variant="secondary" disabled={chosen.size === 0} pending={pending} pendingLabel="Saving…" onClick={() => void assign(true)}>
          Take in hand ({chosen.size})
        </Button>
        <Button size="sm" variant="quiet" disabled={chosen.size === 0 || pending} onClick={() => void assign(false)}>
          Hand back
        </Button>
        <a href={csvHref} className="text-sm" download>
          Download this list as CSV
        </a>
        <p role="status" aria-live="polite" className="text-sm font-medium">
          {status ? <span className={status.tone === "ok" ? "text-ok" : "text-danger"}>{status.text}</span> : null}
        </p>
      </div>
      <Table caption={caption}>
        <TableHead>
          <TableRow>
            <TableHeader>
              <input
                type="checkbox"
                className="size-5 accent-accent"
                aria-label="Choose every set on this page"
                checked={allChosen}
                disabled={selectable.length === 0}
                onChange={() => setChosen(allChosen ? new Set() : new Set(selectable.map((r) => r.id)))}
              />
            </TableHeader>
            {columns.map((c) =>
              c.href ? (
                <SortableHeader key={c.key} href={c.href} direction={c.direction}>
                  {c.label}
                </SortableHeader>
              ) : (
                <TableHeader key={c.key}>{c.label}</TableHeader>
              ),
            )}
          </TableRow>
        </TableHead>
        <TableBody>
          {rows.map((r) => (
            <TableRow key={r.id}>
              <TableCell>
                <input
                  type="checkbox"
                  className="size-5 accent-accent"
                  aria-label={r.isOwn ? `${r.name} is your own set` : `Choose ${r.name}`}
                  checked={chosen.has(r.id)}
                  disabled={r.isOwn}
                  onChange={() => toggle(r.id)}
                />
              </TableCell>
              <TableCell className="font-mono text-sm whitespace-nowrap">{formatDateTime(r.submittedAt)}</TableCell>
              <TableCell>
                <Link href={`/review/sets/${r.id}`}>{r.name}</Link>
                <span className="block text-xs text-ink-muted">{r.siteName}</span>
              </TableCell>
              <TableCell>
                {r.photographerName}
                {r.isOwn ? <span className="block text-xs text-ink-muted">your own: another curator decides</span> : null}
              </TableCell>
              <TableCell className="text-sm whitespace-nowrap">{formatDate(r.eclipseId)}</TableCell>
              <TableCell>
                <Badge tone={stateTone(r.state)}>{STATE_LABELS[r.state]}</Badge>
              </TableCell>
              <TableCell className="text-right font-mono text-sm">{r.frameCount}</TableCell>
              <TableCell className="text-right font-mono text-sm">{r.finishedReductions}</TableCell>
              <TableCell className="text-sm">{r.assignedToName ? (r.isAssignedToMe ? "you" : r.assignedToName) : <span className="text-ink-muted">nobody</span>}</TableCell>
            </TableRow>
          ))}
        </TableBody>
      </Table>
    </div>
  );
}
