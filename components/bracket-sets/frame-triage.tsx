"use client";
// The frame table of a bracket set: every frame with its thumbnail, true capture
// time, exposure, ISO, f-number, kind, automatic findings and whether it takes
// part. Sorting and filtering are TanStack Table's state (frame-columns.tsx);
// every control is a native input or button, so the table works from the
// keyboard. Corrections are mutations to the route handlers, and the page
// re-reads its data.
import { flexRender, useTable, type Header } from "@tanstack/react-table";
import { useId, useMemo, useState } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Button } from "@/components/ui/button";
import { Feedback } from "@/components/ui/feedback";
import { SortableHeader } from "@/components/ui/sortable-header";
import type { FrameDto, RemovedFrameDto } from "@/lib/bracket-sets/dto";
import { findShortestExposures } from "@/lib/bracket-sets/triage";
import { fetchJson, plainFieldMessage, type ApiProblem } from "@/lib/http/client-fetch";
import { formatExposure } from "./exposure-text";
import { EDIT_COLUMNS, FRAME_KINDS, frameFeatures, isFlagged, READ_COLUMNS, type FrameTableMeta, type Show, type TriageRow } from "./frame-columns";
import type { RowProblem } from "./frame-cells";

const HEAD = "border-b border-line-strong px-3 py-2.5";
const FILTER = "rounded-control border border-line-strong bg-surface-raised px-2 py-1.5";
/** The server's limit for an exposure (an hour); said on the row before anything is sent. */
const MAX_EXPOSURE_S = 3600;

/** One call for a row or for the set: what it is (for the busy control), the call, and what to say when done. */
interface FrameAction {
  label: string;
  /** May answer a sentence that says more than `done`. */
  request: () => Promise<string | void>;
  done: string;
  row?: { id: string; field: RowProblem["field"] };
}

const ARIA_SORT = { asc: "ascending", desc: "descending" } as const;

function ColumnHeader({ header }: { header: Header<typeof frameFeatures, TriageRow, unknown> }) {
  const column = header.column;
  const label = typeof column.columnDef.header === "string" ? column.columnDef.header : null;
  if (column.getCanSort() && label) {
    const sorted = column.getIsSorted();
    return (
      <SortableHeader direction={sorted ? ARIA_SORT[sorted] : "none"} onSort={() => column.toggleSorting()}>
        {label}
      </SortableHeader>
    );
  }
  return (
    <th scope="col" className={HEAD}>
      {flexRender(column.columnDef.header, header.getContext())}
    </th>
  );
}

export function FrameTriage({ setId, frames, canEdit, eclipseDay = "" }: { setId: string; frames: FrameDto[]; canEdit: boolean; eclipseDay?: string }) {
  const baseId = useId();
  // A problem found on the page before anything is sent (an exposure out of range).
  const [local, setLocal] = useState<string | null>(null);
  const [problems, setProblems] = useState<Record<string, RowProblem>>({});
  const shortest = useMemo(() => findShortestExposures(frames), [frames]);
  const rows = useMemo<TriageRow[]>(() => frames.map((f) => ({ ...f, isFlagged: isFlagged(f, shortest) })), [frames, shortest]);
  const groups = useMemo(() => [...new Set(frames.map((f) => f.groupNumber ?? 1))].sort((a, b) => a - b), [frames]);

  /** A refusal is shown on its row, beside the field at fault, and in the status line with the file's name. */
  const describe = (problem: ApiProblem, a: FrameAction | undefined) => {
    // A field's own message, without the echo of what was sent: the row shows the value already.
    const fieldText = problem.fieldList[0] ? plainFieldMessage(problem.fieldList[0].message) : null;
    const name = frames.find((f) => f.id === a?.row?.id)?.fileName;
    return { line: fieldText && name ? `${name}: ${fieldText}.` : problem.message, row: fieldText ?? problem.message };
  };
  const action = useApiMutation((a: FrameAction) => a.request(), {
    onError: (problem, a) => {
      if (a.row) setProblems((p) => ({ ...p, [a.row!.id]: { field: a.row!.field, text: describe(problem, a).row } }));
    },
  });
  const busy = action.isPending ? (action.variables?.label ?? null) : null;

  function run(a: FrameAction) {
    setLocal(null);
    if (a.row) setProblems((p) => Object.fromEntries(Object.entries(p).filter(([k]) => k !== a.row!.id)));
    action.mutate(a);
  }
  function refuseOnRow(f: FrameDto, field: RowProblem["field"], text: string, line?: string) {
    setProblems((p) => ({ ...p, [f.id]: { field, text } }));
    if (line) {
      action.reset();
      setLocal(line);
    }
  }

  const patchFrame = (f: FrameDto, body: Record<string, unknown>, done: string, field: RowProblem["field"] = "row") =>
    run({ label: `frame-${f.id}`, request: async () => void (await fetchJson(`/api/bracket-sets/${setId}/frames/${f.id}`, { method: "PATCH", body })), done, row: { id: f.id, field } });

  const meta: FrameTableMeta = {
    setId,
    eclipseDay,
    canEdit,
    shortest,
    busy,
    problems,
    patchFrame,
    saveExposure(f, value, typed) {
      if (value === null || value > MAX_EXPOSURE_S) {
        const text =
          value !== null ? `must be at most ${MAX_EXPOSURE_S} s` : typed.trim() === "" ? "give the exposure, such as 1/250 or 0.004" : `"${typed}" is not a time; write it as 1/250, 0.004 or 2`;
        refuseOnRow(f, "exposure", text, `${f.fileName}: ${text}.`);
        return;
      }
      patchFrame(f, { exposureS: value }, `${f.fileName}: exposure set to ${formatExposure(value)}.`, "exposure");
    },
    saveTime(f, text) {
      if (text !== null && text.trim() === "") {
        refuseOnRow(f, "time", "give the time the camera's clock showed, such as 10:04:31.25");
        return;
      }
      patchFrame(f, { captureAt: text }, text === null ? `${f.fileName}: the time you gave is forgotten; the file's own time counts again.` : `${f.fileName}: capture time saved.`, "time");
    },
    removeFrame: (f) =>
      run({
        label: `remove-${f.id}`,
        request: async () => {
          const removed = await fetchJson<RemovedFrameDto>(`/api/bracket-sets/${setId}/frames/${f.id}`, { method: "DELETE" });
          if (!removed.isOriginalDeleted) return `${f.fileName} is removed; its original stays stored for the reductions already made with it.`;
        },
        done: `${f.fileName} is removed from the set.`,
        row: { id: f.id, field: "row" },
      }),
    groupAction: (body, done) => run({ label: "groups", request: async () => void (await fetchJson(`/api/bracket-sets/${setId}/groups`, { body })), done }),
  };

  const table = useTable({
    features: frameFeatures,
    columns: canEdit ? EDIT_COLUMNS : READ_COLUMNS,
    data: rows,
    getRowId: (r) => r.id,
    initialState: { sorting: [{ id: "time", desc: false }] },
    // A header toggles between ascending and descending; a new column starts ascending; one column at a time.
    enableSortingRemoval: false,
    enableMultiSort: false,
    sortDescFirst: false,
    meta,
  });
  const filter = (id: "included" | "kind" | "name") => table.getColumn(id)!;
  const visible = table.getRowModel().rows;

  const counts = {
    all: frames.length,
    included: frames.filter((f) => f.included && f.ingestState !== "refused").length,
    flagged: rows.filter((f) => f.isFlagged).length,
    refused: frames.filter((f) => f.ingestState === "refused").length,
  };

  return (
    <section aria-labelledby={`${baseId}-h`} className="flex flex-col gap-4">
      <h2 id={`${baseId}-h`} className="text-xl font-semibold">
        Frames
      </h2>
      <p className="text-sm text-ink-muted">
        {counts.all} frames: {counts.included} included, {counts.flagged} flagged, {counts.refused} refused. Times are true UTC (camera clock minus its offset). A time you type is what the camera&apos;s clock showed, in UTC; the offset applies to it too.
      </p>
      <div className="flex flex-wrap items-end gap-4" role="group" aria-label="Filter frames">
        <label className="flex flex-col gap-1 text-sm">
          Show
          <select value={(filter("included").getFilterValue() as Show | undefined) ?? "all"} onChange={(e) => filter("included").setFilterValue(e.target.value === "all" ? undefined : e.target.value)} className={FILTER}>
            <option value="all">All frames</option>
            <option value="included">Included</option>
            <option value="excluded">Excluded</option>
            <option value="flagged">Flagged</option>
            <option value="refused">Refused</option>
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm">
          Kind
          <select value={(filter("kind").getFilterValue() as string | undefined) ?? "any"} onChange={(e) => filter("kind").setFilterValue(e.target.value === "any" ? undefined : e.target.value)} className={FILTER}>
            <option value="any">Any kind</option>
            {FRAME_KINDS.map((k) => (
              <option key={k} value={k}>
                {k}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm">
          File name contains
          <input type="search" value={(filter("name").getFilterValue() as string | undefined) ?? ""} onChange={(e) => filter("name").setFilterValue(e.target.value)} className={FILTER} />
        </label>
        {canEdit && frames.length > 1 ? (
          <Button size="sm" onClick={() => meta.groupAction({ action: "auto", gapS: 20 }, "Frames grouped wherever 20 s or more pass between two frames.")} pending={busy === "groups"}>
            Group by pauses of 20 s
          </Button>
        ) : null}
      </div>
      <Feedback
        live
        look="tinted"
        className="min-h-6 text-sm font-medium"
        problem={local ?? (action.error ? describe(action.error, action.variables).line : null)}
        success={action.isSuccess && action.variables ? (action.data ?? action.variables.done) : null}
      />
      {groups.length > 1 ? (
        <ul className="flex flex-wrap gap-2 text-sm" aria-label="Groups">
          {groups.map((g) => (
            <li key={g} className="flex items-center gap-2 rounded-card border border-line px-3 py-1.5">
              Group {g}: {frames.filter((f) => (f.groupNumber ?? 1) === g).length} frames
              {canEdit && g > 1 ? (
                <Button size="sm" variant="quiet" onClick={() => meta.groupAction({ action: "merge", groupNumber: g }, `Group ${g} joined group ${g - 1}.`)}>
                  Join group {g - 1}
                </Button>
              ) : null}
            </li>
          ))}
        </ul>
      ) : null}
      <div className="relative w-full rounded-card border border-line md:overflow-x-auto max-md:border-0" tabIndex={0} role="region" aria-labelledby={`${baseId}-cap`}>
        <table className="w-full border-collapse text-left text-sm max-md:block">
          <caption id={`${baseId}-cap`} className="sr-only">
            Frames of this bracket set, {visible.length} shown
          </caption>
          <thead className="max-md:sr-only">
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id}>
                {group.headers.map((header) => (
                  <ColumnHeader key={header.id} header={header} />
                ))}
              </tr>
            ))}
          </thead>
          <tbody className="max-md:flex max-md:flex-col max-md:gap-3">
            {visible.map((row) => (
              <tr
                key={row.id}
                className="border-b border-line align-top last:border-b-0 max-md:grid max-md:grid-cols-2 max-md:gap-x-3 max-md:rounded-card max-md:border max-md:p-3 max-md:last:border-b"
              >
                {row.getAllCells().map((cell) => {
                  const { className, label, isRowHeader } = cell.column.columnDef.meta!;
                  return isRowHeader ? (
                    <th key={cell.id} scope="row" className={className} data-label={label}>
                      <table.FlexRender cell={cell} />
                    </th>
                  ) : (
                    <td key={cell.id} className={className} data-label={label}>
                      <table.FlexRender cell={cell} />
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}
