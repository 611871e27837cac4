"use client";
// The frame table of a bracket set: every frame with its thumbnail, true capture
// time, exposure, ISO, f-number, kind, automatic findings and whether it takes
// part. Sortable and filterable; every control is a native input or button, so
// the table works from the keyboard. Corrections go to the route handlers and
// the page re-reads its data.
import { useRouter } from "next/navigation";
import { useId, useMemo, useState } from "react";
import type { FrameDto, RemovedFrameDto } from "@/lib/bracket-sets/dto";
import { findShortestExposures, judgeClipping } from "@/lib/bracket-sets/triage";
import { Button } from "@/components/ui/button";
import { SortableHeader, type SortDirection } from "@/components/ui/sortable-header";
import { ApiError, callApi } from "./api-client";
import { formatExposure } from "./exposure-text";
import { ExposureCell, FileName, Findings, RemoveCell, TimeCell, type RowProblem } from "./frame-cells";
import { FrameHistogram } from "./frame-histogram";

type TriageFrame = FrameDto;
type SortKey = "time" | "name" | "exposure" | "clipped" | "sharpness" | "group";
type Show = "all" | "included" | "excluded" | "flagged" | "refused";

const KINDS = ["light", "dark", "flat", "bias"] as const;
/** Cells of the frame table; on a phone each row becomes a card and each cell shows its header above its value. */
const CELL = "px-3 py-2 max-md:px-0 max-md:py-1 max-md:before:block max-md:before:text-xs max-md:before:font-sans max-md:before:font-medium max-md:before:text-ink-muted max-md:before:content-[attr(data-label)]";
const HEAD = "border-b border-line-strong px-3 py-2.5";
/** The server's limit for an exposure (an hour); said on the row before anything is sent. */
const MAX_EXPOSURE_S = 3600;

function isFlagged(f: TriageFrame, shortest: ReadonlyMap<number, number>): boolean {
  return (
    f.needsExposure ||
    f.needsTime ||
    judgeClipping(f, shortest) === "fault" ||
    f.flags.isBlurred === true ||
    (f.flags.limb !== undefined && f.flags.limb.quality !== "good")
  );
}

function compare(a: TriageFrame, b: TriageFrame, key: SortKey): number {
  const num = (v: number | null | undefined) => (v === null || v === undefined ? Number.POSITIVE_INFINITY : v);
  switch (key) {
    case "time":
      return (a.correctedCaptureAt ?? "~").localeCompare(b.correctedCaptureAt ?? "~") || a.fileName.localeCompare(b.fileName);
    case "name":
      return a.fileName.localeCompare(b.fileName, undefined, { numeric: true });
    case "exposure":
      return num(a.exposureS) - num(b.exposureS);
    case "clipped":
      return num(a.flags.clippedFraction) - num(b.flags.clippedFraction);
    case "sharpness":
      return num(a.flags.sharpness) - num(b.flags.sharpness);
    case "group":
      return (a.groupNumber ?? 1) - (b.groupNumber ?? 1) || compare(a, b, "time");
  }
}

export function FrameTriage({ setId, frames, canEdit, eclipseDay = "" }: { setId: string; frames: TriageFrame[]; canEdit: boolean; eclipseDay?: string }) {
  const router = useRouter();
  const baseId = useId();
  const [sort, setSort] = useState<{ key: SortKey; dir: Exclude<SortDirection, "none"> }>({ key: "time", dir: "ascending" });
  const [show, setShow] = useState<Show>("all");
  const [kind, setKind] = useState<string>("any");
  const [query, setQuery] = useState("");
  const [busy, setBusy] = useState<string | null>(null);
  const [message, setMessage] = useState<{ tone: "ok" | "danger"; text: string } | null>(null);
  const [problems, setProblems] = useState<Record<string, RowProblem>>({});
  const shortest = useMemo(() => findShortestExposures(frames), [frames]);

  const groups = useMemo(() => [...new Set(frames.map((f) => f.groupNumber ?? 1))].sort((a, b) => a - b), [frames]);
  const visible = useMemo(() => {
    const q = query.trim().toLowerCase();
    const list = frames.filter((f) => {
      if (kind !== "any" && f.kind !== kind) return false;
      if (q && !f.fileName.toLowerCase().includes(q)) return false;
      switch (show) {
        case "included":
          return f.included && f.ingestState !== "refused";
        case "excluded":
          return !f.included;
        case "flagged":
          return isFlagged(f, shortest);
        case "refused":
          return f.ingestState === "refused";
        default:
          return true;
      }
    });
    const sign = sort.dir === "ascending" ? 1 : -1;
    return list.sort((a, b) => sign * compare(a, b, sort.key));
  }, [frames, kind, query, show, sort, shortest]);

  const header = (key: SortKey, label: string) => (
    <SortableHeader
      direction={sort.key === key ? sort.dir : "none"}
      onSort={() => setSort((s) => ({ key, dir: s.key === key && s.dir === "ascending" ? "descending" : "ascending" }))}
    >
      {label}
    </SortableHeader>
  );

  /** One call for a row: a refusal is shown on that row, beside the field at fault, as well as in the status line. */
  async function run(label: string, work: () => Promise<unknown>, done: string, row?: { id: string; field: RowProblem["field"] }) {
    setBusy(label);
    setMessage(null);
    if (row) setProblems((p) => Object.fromEntries(Object.entries(p).filter(([k]) => k !== row.id)));
    try {
      await work();
      setMessage((m) => m ?? { tone: "ok", text: done });
      router.refresh();
    } catch (err) {
      // A field's own message, without the echo of what was sent: the row shows the value already.
      const fieldText = err instanceof ApiError && err.fields[0] ? err.fields[0].message.replace(/\s*\(received [^)]*\)$/, "") : null;
      const name = frames.find((f) => f.id === row?.id)?.fileName;
      const text = fieldText && name ? `${name}: ${fieldText}.` : (err as Error).message;
      setMessage({ tone: "danger", text });
      if (row) setProblems((p) => ({ ...p, [row.id]: { field: row.field, text: fieldText ?? text } }));
    } finally {
      setBusy(null);
    }
  }

  const patchFrame = (f: TriageFrame, body: Record<string, unknown>, done: string, field: RowProblem["field"] = "row") =>
    run(`frame-${f.id}`, () => callApi(`/api/bracket-sets/${setId}/frames/${f.id}`, { method: "PATCH", body }), done, { id: f.id, field });

  function saveExposure(f: TriageFrame, value: number | null, typed: string) {
    if (value === null || value > MAX_EXPOSURE_S) {
      const text =
        value !== null ? `must be at most ${MAX_EXPOSURE_S} s` : typed.trim() === "" ? "give the exposure, such as 1/250 or 0.004" : `"${typed}" is not a time; write it as 1/250, 0.004 or 2`;
      setProblems((p) => ({ ...p, [f.id]: { field: "exposure", text } }));
      setMessage({ tone: "danger", text: `${f.fileName}: ${text}.` });
      return;
    }
    void patchFrame(f, { exposureS: value }, `${f.fileName}: exposure set to ${formatExposure(value)}.`, "exposure");
  }

  function saveTime(f: TriageFrame, text: string | null) {
    if (text !== null && text.trim() === "") {
      setProblems((p) => ({ ...p, [f.id]: { field: "time", text: "give the time the camera's clock showed, such as 10:04:31.25" } }));
      return;
    }
    void patchFrame(f, { captureAt: text }, text === null ? `${f.fileName}: the time you gave is forgotten; the file's own time counts again.` : `${f.fileName}: capture time saved.`, "time");
  }

  const removeFrame = (f: TriageFrame) =>
    run(
      `remove-${f.id}`,
      async () => {
        const removed = await callApi<RemovedFrameDto>(`/api/bracket-sets/${setId}/frames/${f.id}`, { method: "DELETE" });
        if (!removed.isOriginalDeleted) setMessage({ tone: "ok", text: `${f.fileName} is removed; its original stays stored for the reductions already made with it.` });
      },
      `${f.fileName} is removed from the set.`,
      { id: f.id, field: "row" },
    );

  const groupAction = (body: Record<string, unknown>, done: string) =>
    run("groups", () => callApi(`/api/bracket-sets/${setId}/groups`, { body }), done);

  const counts = {
    all: frames.length,
    included: frames.filter((f) => f.included && f.ingestState !== "refused").length,
    flagged: frames.filter((f) => isFlagged(f, shortest)).length,
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
          <select value={show} onChange={(e) => setShow(e.target.value as Show)} className="rounded-control border border-line-strong bg-surface-raised px-2 py-1.5">
            <option value="all">All frames</option>
            <option value="included">Included</option>
            <option value="excluded">Excluded</option>
            <option value="flagged">Flagged</option>
            <option value="refused">Refused</option>
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm">
          Kind
          <select value={kind} onChange={(e) => setKind(e.target.value)} className="rounded-control border border-line-strong bg-surface-raised px-2 py-1.5">
            <option value="any">Any kind</option>
            {KINDS.map((k) => (
              <option key={k} value={k}>
                {k}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm">
          File name contains
          <input
            type="search"
            value={query}
            onChange={(e) => setQuery(e.target.value)}
            className="rounded-control border border-line-strong bg-surface-raised px-2 py-1.5"
          />
        </label>
        {canEdit && frames.length > 1 ? (
          <Button size="sm" onClick={() => void groupAction({ action: "auto", gapS: 20 }, "Frames grouped wherever 20 s or more pass between two frames.")} pending={busy === "groups"}>
            Group by pauses of 20 s
          </Button>
        ) : null}
      </div>
      <div role="status" aria-live="polite" className="min-h-6 text-sm font-medium">
        {message ? <span className={message.tone === "ok" ? "text-ok" : "text-danger"}>{message.text}</span> : null}
      </div>
      {groups.length > 1 ? (
        <ul className="flex flex-wrap gap-2 text-sm" aria-label="Groups">
          {groups.map((g) => (
            <li key={g} className="flex items-center gap-2 rounded-card border border-line px-3 py-1.5">
              Group {g}: {frames.filter((f) => (f.groupNumber ?? 1) === g).length} frames
              {canEdit && g > 1 ? (
                <Button size="sm" variant="quiet" onClick={() => void groupAction({ action: "merge", groupNumber: g }, `Group ${g} joined group ${g - 1}.`)}>
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
            <tr>
              <th scope="col" className={HEAD}>
                Thumbnail
              </th>
              {header("name", "File")}
              {header("time", "Time (UTC)")}
              {header("exposure", "Exposure")}
              <th scope="col" className={HEAD}>
                ISO · f/
              </th>
              <th scope="col" className={HEAD}>
                Kind
              </th>
              {header("clipped", "Clipped")}
              {header("sharpness", "Findings")}
              <th scope="col" className={HEAD}>
                Histogram
              </th>
              {header("group", "Group")}
              <th scope="col" className={HEAD}>
                Included
              </th>
              {canEdit ? (
                <th scope="col" className={HEAD}>
                  <span className="sr-only">Remove</span>
                </th>
              ) : null}
            </tr>
          </thead>
          <tbody className="max-md:flex max-md:flex-col max-md:gap-3">
            {visible.map((f) => {
              const problem = problems[f.id];
              return (
                <tr
                  key={f.id}
                  className="border-b border-line align-top last:border-b-0 max-md:grid max-md:grid-cols-2 max-md:gap-x-3 max-md:rounded-card max-md:border max-md:p-3 max-md:last:border-b"
                >
                  <td className={`${CELL} max-md:col-span-2`} data-label="">
                    {f.hasThumbnail ? (
                      // eslint-disable-next-line @next/next/no-img-element -- a private, already small thumbnail
                      <img src={`/api/bracket-sets/${setId}/frames/${f.id}/thumbnail`} alt={`Thumbnail of ${f.fileName}`} width={80} height={54} className="h-14 w-20 rounded bg-black object-contain" loading="lazy" />
                    ) : (
                      <span className="text-ink-muted">{f.ingestState === "received" ? "checking…" : "no thumbnail"}</span>
                    )}
                  </td>
                  <th scope="row" className={`${CELL} max-md:col-span-2 font-mono font-normal break-words md:min-w-44`} data-label="File">
                    <a href={`/api/bracket-sets/${setId}/frames/${f.id}/original`} aria-label={`Download the original of ${f.fileName}`}>
                      <FileName name={f.fileName} />
                    </a>
                    {f.ingestState === "refused" ? <p className="mt-1 font-sans text-danger">Refused: {f.refusalReason}</p> : null}
                    {problem?.field === "row" ? <p className="mt-1 font-sans text-xs font-medium text-danger">{problem.text}</p> : null}
                  </th>
                  <td className={`${CELL} max-md:col-span-2`} data-label="Camera clock time (UTC)">
                    <TimeCell f={f} day={eclipseDay} canEdit={canEdit} pending={busy === `frame-${f.id}`} problem={problem?.field === "time" ? problem.text : undefined} onSave={saveTime} />
                  </td>
                  <td className={`${CELL} max-md:col-span-2`} data-label="Exposure">
                    <ExposureCell f={f} canEdit={canEdit} pending={busy === `frame-${f.id}`} problem={problem?.field === "exposure" ? problem.text : undefined} onSave={saveExposure} />
                  </td>
                  <td className={`${CELL} font-mono`} data-label="ISO · f/">
                    {f.iso ?? "—"} · {f.fNumber ?? "—"}
                  </td>
                  <td className={CELL} data-label="Kind">
                    {canEdit && f.ingestState !== "refused" ? (
                      <select
                        aria-label={`Kind of ${f.fileName}`}
                        value={f.kind}
                        onChange={(e) => void patchFrame(f, { kind: e.target.value }, `${f.fileName} is now a ${e.target.value} frame.`)}
                        className="rounded-control border border-line-strong bg-surface-raised px-2 py-1"
                      >
                        {KINDS.map((k) => (
                          <option key={k} value={k}>
                            {k}
                          </option>
                        ))}
                      </select>
                    ) : (
                      f.kind
                    )}
                  </td>
                  <td className={`${CELL} font-mono`} data-label="Clipped">
                    {f.flags.clippedFraction === undefined ? "—" : `${(100 * f.flags.clippedFraction).toFixed(1)} %`}
                  </td>
                  <td className={`${CELL} max-md:col-span-2`} data-label="Findings">
                    <Findings f={f} shortest={shortest} />
                  </td>
                  <td className={CELL} data-label="Histogram">
                    <FrameHistogram bins={f.flags.histogram} label={f.fileName} />
                  </td>
                  <td className={CELL} data-label="Group">
                    <span className="font-mono">{f.groupNumber ?? 1}</span>
                    {canEdit && f.correctedCaptureAt ? (
                      <Button
                        size="sm"
                        variant="quiet"
                        aria-label={`Split here: start a new group at ${f.fileName}`}
                        onClick={() => void groupAction({ action: "split", frameId: f.id }, `A new group starts at ${f.fileName}.`)}
                      >
                        Split here
                      </Button>
                    ) : null}
                  </td>
                  <td className={CELL} data-label="Included">
                    <input
                      type="checkbox"
                      aria-label={`Include ${f.fileName} in reductions`}
                      checked={f.included && f.ingestState !== "refused"}
                      disabled={!canEdit || f.ingestState === "refused"}
                      onChange={(e) => void patchFrame(f, { included: e.target.checked }, `${f.fileName} is ${e.target.checked ? "included" : "excluded"}.`)}
                      className="h-5 w-5"
                    />
                  </td>
                  {canEdit ? (
                    <td className={CELL} data-label="">
                      <RemoveCell f={f} pending={busy === `remove-${f.id}`} onRemove={(x) => void removeFrame(x)} />
                    </td>
                  ) : null}
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </section>
  );
}

