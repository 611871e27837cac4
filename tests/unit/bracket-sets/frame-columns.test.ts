import { constructTable, tableFeatures, type ColumnFiltersState } from "@tanstack/table-core";
import { storeReactivityBindings } from "@tanstack/table-core/store-reactivity-bindings";
import { describe, expect, it } from "vitest";
import { EDIT_COLUMNS, frameFeatures, isFlagged, READ_COLUMNS, type TriageRow } from "@/components/bracket-sets/frame-columns";
import type { FrameDto } from "@/lib/bracket-sets/dto";
import { findShortestExposures } from "@/lib/bracket-sets/triage";

function frame(over: Partial<FrameDto> & Pick<FrameDto, "id" | "fileName">): FrameDto {
  return {
    sizeBytes: 1,
    sha256: null,
    format: "fits",
    width: 256,
    height: 224,
    bitDepth: 16,
    exposureS: 0.001,
    exposureSource: "file",
    needsExposure: false,
    fNumber: 8,
    iso: 100,
    captureAt: null,
    correctedCaptureAt: null,
    fileCaptureAt: null,
    captureTimeSource: null,
    needsTime: false,
    make: null,
    model: null,
    kind: "light",
    included: true,
    groupNumber: 1,
    ingestState: "ingested",
    refusalReason: null,
    hasThumbnail: false,
    flags: {},
    ...over,
  };
}

const FRAMES: FrameDto[] = [
  frame({ id: "a", fileName: "IMG_10.fits", exposureS: 0.25, correctedCaptureAt: "2027-08-02T10:04:40.000Z" }),
  frame({ id: "b", fileName: "IMG_9.fits", exposureS: null, needsExposure: true, correctedCaptureAt: "2027-08-02T10:04:38.000Z" }),
  frame({ id: "c", fileName: "IMG_11.fits", exposureS: 0.004, correctedCaptureAt: null, needsTime: true }),
  frame({ id: "d", fileName: "dark_1.fits", kind: "dark", included: false, exposureS: 0.25, correctedCaptureAt: "2027-08-02T10:05:00.000Z" }),
  frame({ id: "e", fileName: "notes.fits", ingestState: "refused", refusalReason: "not an image", exposureS: null, correctedCaptureAt: null }),
];

/** The table as the page builds it, in plain table-core. */
function buildTable(columnFilters: ColumnFiltersState = []) {
  const shortest = findShortestExposures(FRAMES);
  const rows: TriageRow[] = FRAMES.map((f) => ({ ...f, isFlagged: isFlagged(f, shortest) }));
  return constructTable({
    features: tableFeatures({ ...frameFeatures, coreReactivityFeature: storeReactivityBindings() }),
    columns: READ_COLUMNS,
    data: rows,
    getRowId: (r) => r.id,
    initialState: { sorting: [{ id: "time", desc: false }], columnFilters },
    enableSortingRemoval: false,
    enableMultiSort: false,
    sortDescFirst: false,
  });
}

const ids = (table: ReturnType<typeof buildTable>) => table.getRowModel().rows.map((r) => r.id);

describe("the frame table's columns", () => {
  it("sorts by true time first (frames without a time together, by name) and turns round on a second press", () => {
    const table = buildTable();
    // The browser's collation puts the stand-in for "no time" before the digits of a time.
    expect(ids(table)).toEqual(["c", "e", "b", "a", "d"]);
    table.getColumn("time")!.toggleSorting();
    expect(table.getColumn("time")!.getIsSorted()).toBe("desc");
    expect(ids(table)).toEqual(["d", "a", "b", "e", "c"]);
    table.getColumn("time")!.toggleSorting();
    expect(table.getColumn("time")!.getIsSorted()).toBe("asc");
  });

  it("starts a new column ascending, one column at a time, with camera numbering for names and missing exposures last", () => {
    const table = buildTable();
    table.getColumn("name")!.toggleSorting();
    expect(table.store.state.sorting).toEqual([{ id: "name", desc: false }]);
    expect(ids(table)).toEqual(["d", "b", "a", "c", "e"]);
    table.getColumn("exposure")!.toggleSorting();
    expect(table.store.state.sorting).toEqual([{ id: "exposure", desc: false }]);
    expect(ids(table)).toEqual(["c", "a", "d", "b", "e"]);
  });

  it("sorts only the columns that have an order, and offers removal only to the owner", () => {
    const table = buildTable();
    expect(["name", "time", "exposure", "clipped", "sharpness", "group"].every((id) => table.getColumn(id)!.getCanSort())).toBe(true);
    expect(["thumbnail", "isoF", "kind", "histogram", "included"].some((id) => table.getColumn(id)!.getCanSort())).toBe(false);
    expect(EDIT_COLUMNS.map((c) => c.id)).toEqual([...READ_COLUMNS.map((c) => c.id), "remove"]);
  });

  it("filters by what to show, by kind and by a part of the file name", () => {
    expect(ids(buildTable([{ id: "included", value: "included" }]))).toEqual(["c", "b", "a"]);
    expect(ids(buildTable([{ id: "included", value: "excluded" }]))).toEqual(["d"]);
    expect(ids(buildTable([{ id: "included", value: "refused" }]))).toEqual(["e"]);
    expect(ids(buildTable([{ id: "included", value: "flagged" }]))).toEqual(["c", "b"]);
    expect(ids(buildTable([{ id: "kind", value: "dark" }]))).toEqual(["d"]);
    expect(ids(buildTable([{ id: "name", value: " img_1" }]))).toEqual(["c", "a"]);
  });
});
