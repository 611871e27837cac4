"use client";
// The frame table's columns for TanStack Table: what each column shows, how it
// sorts (the comparisons the table always had: a missing number goes last) and which
// filters it carries (kind, file name, and "show" on the Included column). The
// table holds the sorting and filter state; frame-triage.tsx draws the markup
// and does the calls. Cells reach the page's handlers through the table's meta.
import {
  columnFilteringFeature,
  createColumnHelper,
  createFilteredRowModel,
  createSortedRowModel,
  metaHelper,
  rowSortingFeature,
  tableFeatures,
  type CellContext,
  type FilterFn,
  type SortFn,
} from "@tanstack/react-table";
import type { ReactNode } from "react";
import type { FrameDto } from "@/lib/bracket-sets/dto";
import { judgeClipping } from "@/lib/bracket-sets/triage";
import { Button } from "@/components/ui/button";
import { ExposureCell, FileName, Findings, RemoveCell, TimeCell, type RowProblem } from "./frame-cells";
import { FrameHistogram } from "./frame-histogram";

export type TriageRow = FrameDto & { isFlagged: boolean };
export type Show = "all" | "included" | "excluded" | "flagged" | "refused";

export const FRAME_KINDS = ["light", "dark", "flat", "bias"] as const;

/** What the cells need from the page: who may edit, which row is busy, each row's problem, and the calls. */
export interface FrameTableMeta {
  setId: string;
  eclipseDay: string;
  canEdit: boolean;
  shortest: ReadonlyMap<number, number>;
  busy: string | null;
  problems: Readonly<Record<string, RowProblem>>;
  saveTime: (f: FrameDto, text: string | null) => void;
  saveExposure: (f: FrameDto, value: number | null, typed: string) => void;
  patchFrame: (f: FrameDto, body: Record<string, unknown>, done: string) => void;
  groupAction: (body: Record<string, unknown>, done: string) => void;
  removeFrame: (f: FrameDto) => void;
}

/** How a cell sits in its row; on a phone each row becomes a card and each cell shows `label` above its value. */
export interface FrameColumnMeta {
  className: string;
  label: string;
  /** The file name names its row (th scope="row"). */
  isRowHeader?: boolean;
}

export const frameFeatures = tableFeatures({
  columnFilteringFeature,
  filteredRowModel: createFilteredRowModel(),
  rowSortingFeature,
  sortedRowModel: createSortedRowModel(),
  tableMeta: metaHelper<FrameTableMeta>(),
  columnMeta: metaHelper<FrameColumnMeta>(),
});

type Features = typeof frameFeatures;

export function isFlagged(f: FrameDto, shortest: ReadonlyMap<number, number>): boolean {
  return (
    f.needsExposure ||
    f.needsTime ||
    judgeClipping(f, shortest) === "fault" ||
    f.flags.isBlurred === true ||
    (f.flags.limb !== undefined && f.flags.limb.quality !== "good")
  );
}

/** Cells of the frame table; on a phone each row becomes a card and each cell shows its header above its value. */
const CELL = "px-3 py-2 max-md:px-0 max-md:py-1 max-md:before:block max-md:before:text-xs max-md:before:font-sans max-md:before:font-medium max-md:before:text-ink-muted max-md:before:content-[attr(data-label)]";

// Ascending comparisons; the table turns them round for descending. A missing number goes last.
const num = (v: number | null | undefined) => (v === null || v === undefined ? Number.POSITIVE_INFINITY : v);
const byTime = (a: FrameDto, b: FrameDto) => (a.correctedCaptureAt ?? "~").localeCompare(b.correctedCaptureAt ?? "~") || a.fileName.localeCompare(b.fileName);
const sortBy =
  (compare: (a: TriageRow, b: TriageRow) => number): SortFn<Features, TriageRow> =>
  (rowA, rowB) =>
    compare(rowA.original, rowB.original);

const showFilter: FilterFn<Features, TriageRow> = (row, _columnId, show: Show) => {
  const f = row.original;
  switch (show) {
    case "included":
      return f.included && f.ingestState !== "refused";
    case "excluded":
      return !f.included;
    case "flagged":
      return f.isFlagged;
    case "refused":
      return f.ingestState === "refused";
    default:
      return true;
  }
};
const nameFilter: FilterFn<Features, TriageRow> = (row, _columnId, query: string) => row.original.fileName.toLowerCase().includes(query.trim().toLowerCase());
const kindFilter: FilterFn<Features, TriageRow> = (row, _columnId, kind: string) => row.original.kind === kind;

const col = createColumnHelper<Features, TriageRow>();

/** A cell drawn from its frame and what the page gives the table. */
const frameCell =
  <TValue,>(render: (f: TriageRow, m: FrameTableMeta) => ReactNode) =>
  ({ row, table }: CellContext<Features, TriageRow, TValue>) =>
    render(row.original, table.options.meta!);

/** The row's problem when it concerns this field. */
const problemOf = (m: FrameTableMeta, f: FrameDto, field: RowProblem["field"]) => (m.problems[f.id]?.field === field ? m.problems[f.id].text : undefined);

const FRAME_COLUMNS = col.columns([
  col.display({
    id: "thumbnail",
    header: "Thumbnail",
    meta: { className: `${CELL} max-md:col-span-2`, label: "" },
    cell: frameCell((f, m) =>
      f.hasThumbnail ? (
        // eslint-disable-next-line @next/next/no-img-element -- a private, already small thumbnail
        <img src={`/api/bracket-sets/${m.setId}/frames/${f.id}/thumbnail`} alt={`Thumbnail of ${f.fileName}`} width={80} height={54} className="h-14 w-20 rounded bg-black object-contain" loading="lazy" />
      ) : (
        <span className="text-ink-muted">{f.ingestState === "received" ? "checking…" : "no thumbnail"}</span>
      ),
    ),
  }),
  col.accessor("fileName", {
    id: "name",
    header: "File",
    sortFn: sortBy((a, b) => a.fileName.localeCompare(b.fileName, undefined, { numeric: true })),
    filterFn: nameFilter,
    meta: { className: `${CELL} max-md:col-span-2 font-mono font-normal break-words md:min-w-44`, label: "File", isRowHeader: true },
    cell: frameCell((f, m) => (
      <>
        <a href={`/api/bracket-sets/${m.setId}/frames/${f.id}/original`} aria-label={`Download the original of ${f.fileName}`}>
          <FileName name={f.fileName} />
        </a>
        {f.ingestState === "refused" ? <p className="mt-1 font-sans text-danger">Refused: {f.refusalReason}</p> : null}
        {problemOf(m, f, "row") ? <p className="mt-1 font-sans text-xs font-medium text-danger">{problemOf(m, f, "row")}</p> : null}
      </>
    )),
  }),
  col.accessor("correctedCaptureAt", {
    id: "time",
    header: "Time (UTC)",
    sortFn: sortBy(byTime),
    meta: { className: `${CELL} max-md:col-span-2`, label: "Camera clock time (UTC)" },
    cell: frameCell((f, m) => <TimeCell f={f} day={m.eclipseDay} canEdit={m.canEdit} pending={m.busy === `frame-${f.id}`} problem={problemOf(m, f, "time")} onSave={m.saveTime} />),
  }),
  col.accessor("exposureS", {
    id: "exposure",
    header: "Exposure",
    sortFn: sortBy((a, b) => num(a.exposureS) - num(b.exposureS)),
    meta: { className: `${CELL} max-md:col-span-2`, label: "Exposure" },
    cell: frameCell((f, m) => <ExposureCell f={f} canEdit={m.canEdit} pending={m.busy === `frame-${f.id}`} problem={problemOf(m, f, "exposure")} onSave={m.saveExposure} />),
  }),
  col.display({
    id: "isoF",
    header: "ISO · f/",
    meta: { className: `${CELL} font-mono`, label: "ISO · f/" },
    cell: frameCell((f) => `${f.iso ?? "—"} · ${f.fNumber ?? "—"}`),
  }),
  col.accessor("kind", {
    id: "kind",
    header: "Kind",
    enableSorting: false,
    filterFn: kindFilter,
    meta: { className: CELL, label: "Kind" },
    cell: frameCell((f, m) =>
      m.canEdit && f.ingestState !== "refused" ? (
        <select
          aria-label={`Kind of ${f.fileName}`}
          value={f.kind}
          onChange={(e) => m.patchFrame(f, { kind: e.target.value }, `${f.fileName} is now a ${e.target.value} frame.`)}
          className="rounded-control border border-line-strong bg-surface-raised px-2 py-1"
        >
          {FRAME_KINDS.map((k) => (
            <option key={k} value={k}>
              {k}
            </option>
          ))}
        </select>
      ) : (
        f.kind
      ),
    ),
  }),
  col.accessor((f) => f.flags.clippedFraction, {
    id: "clipped",
    header: "Clipped",
    sortFn: sortBy((a, b) => num(a.flags.clippedFraction) - num(b.flags.clippedFraction)),
    meta: { className: `${CELL} font-mono`, label: "Clipped" },
    cell: frameCell((f) => (f.flags.clippedFraction === undefined ? "—" : `${(100 * f.flags.clippedFraction).toFixed(1)} %`)),
  }),
  col.accessor((f) => f.flags.sharpness, {
    id: "sharpness",
    header: "Findings",
    sortFn: sortBy((a, b) => num(a.flags.sharpness) - num(b.flags.sharpness)),
    meta: { className: `${CELL} max-md:col-span-2`, label: "Findings" },
    cell: frameCell((f, m) => <Findings f={f} shortest={m.shortest} />),
  }),
  col.display({
    id: "histogram",
    header: "Histogram",
    meta: { className: CELL, label: "Histogram" },
    cell: frameCell((f) => <FrameHistogram bins={f.flags.histogram} label={f.fileName} />),
  }),
  col.accessor((f) => f.groupNumber ?? 1, {
    id: "group",
    header: "Group",
    sortFn: sortBy((a, b) => (a.groupNumber ?? 1) - (b.groupNumber ?? 1) || byTime(a, b)),
    meta: { className: CELL, label: "Group" },
    cell: frameCell((f, m) => (
      <>
        <span className="font-mono">{f.groupNumber ?? 1}</span>
        {m.canEdit && f.correctedCaptureAt ? (
          <Button size="sm" variant="quiet" aria-label={`Split here: start a new group at ${f.fileName}`} onClick={() => m.groupAction({ action: "split", frameId: f.id }, `A new group starts at ${f.fileName}.`)}>
            Split here
          </Button>
        ) : null}
      </>
    )),
  }),
  col.accessor("included", {
    id: "included",
    header: "Included",
    enableSorting: false,
    filterFn: showFilter,
    meta: { className: CELL, label: "Included" },
    cell: frameCell((f, m) => (
      <input
        type="checkbox"
        aria-label={`Include ${f.fileName} in reductions`}
        checked={f.included && f.ingestState !== "refused"}
        disabled={!m.canEdit || f.ingestState === "refused"}
        onChange={(e) => m.patchFrame(f, { included: e.target.checked }, `${f.fileName} is ${e.target.checked ? "included" : "excluded"}.`)}
        className="h-5 w-5"
      />
    )),
  }),
]);

const REMOVE_COLUMN = col.display({
  id: "remove",
  header: () => <span className="sr-only">Remove</span>,
  meta: { className: CELL, label: "" },
  cell: frameCell((f, m) => <RemoveCell f={f} pending={m.busy === `remove-${f.id}`} onRemove={m.removeFrame} />),
});

/** The columns for a reader, and for the owner of an open set (who may also remove frames). */
export const READ_COLUMNS = FRAME_COLUMNS;
export const EDIT_COLUMNS = [...FRAME_COLUMNS, REMOVE_COLUMN];
