"use client";
// The review queue's table with its one bulk action. Taking sets in hand is
// the only bulk action offered: it changes no set's state and mails nobody,
// so choosing the wrong rows costs nothing. Decisions stay one set at a time,
// on the set's own page, after a curator has looked at it.
//
// TanStack Table holds the chosen rows and the sort the server applied (the
// queue is sorted, filtered and paged on the server, through the address, so
// sorting works without JavaScript): each sortable header is a link with
// aria-sort on its th.
import { createColumnHelper, metaHelper, rowSelectionFeature, rowSortingFeature, tableFeatures, useTable, type SortingState } from "@tanstack/react-table";
import Link from "next/link";
import { useMemo } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Feedback } from "@/components/ui/feedback";
import { SortableHeader, type SortDirection } from "@/components/ui/sortable-header";
import { Table, TableBody, TableCell, TableHead, TableHeader, TableRow } from "@/components/ui/table";
import { formatDate, formatDateTime } from "@/lib/format/dates";
import { fetchJson } from "@/lib/http/client-fetch";
import type { QueueRowDto } from "@/lib/review/queue";
import { STATE_LABELS } from "@/lib/review/state-machine";
import { stateTone } from "./state-tone";

export type QueueColumnKey = "submitted" | "name" | "photographer" | "eclipse" | "state" | "frames" | "reductions" | "assigned";

export interface QueueColumn {
  key: QueueColumnKey;
  label: string;
  /** Where sorting by this column leads; absent for columns that do not sort. */
  href?: string;
  direction: SortDirection;
}

const features = tableFeatures({
  rowSortingFeature,
  rowSelectionFeature,
  columnMeta: metaHelper<{ className?: string }>(),
});

const col = createColumnHelper<typeof features, QueueRowDto>();
const COLUMNS = col.columns([
  col.display({
    id: "select",
    header: ({ table }) => (
      <input
        type="checkbox"
        className="size-5 accent-accent"
        aria-label="Choose every set on this page"
        checked={table.getIsAllRowsSelected()}
        disabled={!table.getCoreRowModel().rows.some((r) => r.getCanSelect())}
        onChange={() => table.toggleAllRowsSelected(!table.getIsAllRowsSelected())}
      />
    ),
    cell: ({ row }) => (
      <input
        type="checkbox"
        className="size-5 accent-accent"
        aria-label={row.original.isOwn ? `${row.original.name} is your own set` : `Choose ${row.original.name}`}
        checked={row.getIsSelected()}
        disabled={!row.getCanSelect()}
        onChange={row.getToggleSelectedHandler()}
      />
    ),
  }),
  col.accessor("submittedAt", { id: "submitted", meta: { className: "font-mono text-sm whitespace-nowrap" }, cell: ({ row }) => formatDateTime(row.original.submittedAt) }),
  col.accessor("name", {
    id: "name",
    cell: ({ row }) => (
      <>
        <Link href={`/review/sets/${row.original.id}`}>{row.original.name}</Link>
        <span className="block text-xs text-ink-muted">{row.original.siteName}</span>
      </>
    ),
  }),
  col.accessor("photographerName", {
    id: "photographer",
    cell: ({ row }) => (
      <>
        {row.original.photographerName}
        {row.original.isOwn ? <span className="block text-xs text-ink-muted">your own: another curator decides</span> : null}
      </>
    ),
  }),
  col.accessor("eclipseId", { id: "eclipse", meta: { className: "text-sm whitespace-nowrap" }, cell: ({ row }) => formatDate(row.original.eclipseId) }),
  col.accessor("state", { id: "state", cell: ({ row }) => <Badge tone={stateTone(row.original.state)}>{STATE_LABELS[row.original.state]}</Badge> }),
  col.accessor("frameCount", { id: "frames", meta: { className: "text-right font-mono text-sm" } }),
  col.accessor("finishedReductions", { id: "reductions", meta: { className: "text-right font-mono text-sm" } }),
  col.display({
    id: "assigned",
    meta: { className: "text-sm" },
    cell: ({ row }) => (row.original.assignedToName ? (row.original.isAssignedToMe ? "you" : row.original.assignedToName) : <span className="text-ink-muted">nobody</span>),
  }),
]);

export function QueueTable({ rows, columns, caption, csvHref }: { rows: QueueRowDto[]; columns: QueueColumn[]; caption: string; csvHref: string }) {
  const byKey = useMemo(() => new Map(columns.map((c) => [c.key, c])), [columns]);
  const sorting = useMemo<SortingState>(() => columns.filter((c) => c.direction !== "none").map((c) => ({ id: c.key, desc: c.direction === "descending" })), [columns]);
  const table = useTable({
    features,
    columns: COLUMNS,
    data: rows,
    getRowId: (r) => r.id,
    // The server sorted the rows; the table only knows how.
    manualSorting: true,
    state: { sorting },
    // A curator does not take their own sets in hand: another curator decides them.
    enableRowSelection: (row) => !row.original.isOwn,
  });
  const chosen = Object.keys(table.state.rowSelection).filter((id) => table.state.rowSelection[id]);
  const assign = useApiMutation((assignTo: boolean) => fetchJson<{ changed: number }>("/api/review/assignments", { body: { setIds: chosen, assign: assignTo } }), {
    onSuccess: () => table.resetRowSelection(true),
  });
  const changed = assign.data?.changed ?? 0;
  const sets = `${changed} set${changed === 1 ? "" : "s"}`;

  return (
    <div className="flex flex-col gap-3">
      <div className="flex flex-wrap items-center gap-3" role="group" aria-label="With the chosen sets">
        <Button size="sm" variant="secondary" disabled={chosen.length === 0} pending={assign.isPending} pendingLabel="Saving…" onClick={() => assign.mutate(true)}>
          Take in hand ({chosen.length})
        </Button>
        <Button size="sm" variant="quiet" disabled={chosen.length === 0 || assign.isPending} onClick={() => assign.mutate(false)}>
          Hand back
        </Button>
        <a href={csvHref} className="text-sm" download>
          Download this list as CSV
        </a>
        <Feedback live look="tinted" className="text-sm font-medium" problem={assign.error} success={assign.data ? (assign.variables ? `${sets} now in your hands.` : `${sets} handed back.`) : null} />
      </div>
      <Table caption={caption}>
        <TableHead>
          {table.getHeaderGroups().map((group) => (
            <TableRow key={group.id}>
              {group.headers.map((header) => {
                const shown = byKey.get(header.column.id as QueueColumnKey);
                if (shown?.href) {
                  const sorted = header.column.getIsSorted();
                  return (
                    <SortableHeader key={header.id} href={shown.href} direction={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : "none"}>
                      {shown.label}
                    </SortableHeader>
                  );
                }
                return <TableHeader key={header.id}>{shown ? shown.label : <table.FlexRender header={header} />}</TableHeader>;
              })}
            </TableRow>
          ))}
        </TableHead>
        <TableBody>
          {table.getRowModel().rows.map((row) => (
            <TableRow key={row.id}>
              {row.getAllCells().map((cell) => (
                <TableCell key={cell.id} className={cell.column.columnDef.meta?.className}>
                  <table.FlexRender cell={cell} />
                </TableCell>
              ))}
            </TableRow>
          ))}
        </TableBody>
      </Table>
    </div>
  );
}
