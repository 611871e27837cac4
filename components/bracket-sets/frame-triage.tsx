"use client";
// The frame table of a bracket set: every frame with its thumbnail, true capture
// time, exposure, ISO, f-number, kind, automatic findings and whether it takes
// part. Sortable and filterable; every control is a native input or button, so
// the table works from the keyboard. Corrections go to the route handlers and
// the page re-reads its data.
import { useRouter } from "next/navigation";
import { useId, useMemo, useState, type FormEvent } from "react";
import type { FrameDto } from "@/lib/bracket-sets/dto";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { SortableHeader, type SortDirection } from "@/components/ui/sortable-header";
import { callApi } from "./api-client";
import { formatExposure, parseExposure } from "./exposure-text";
import { FrameHistogram } from "./frame-histogram";

type TriageFrame = FrameDto & { groupNumber?: number };
type SortKey = "time" | "name" | "exposure" | "clipped" | "sharpness" | "group";
type Show = "all" | "included" | "excluded" | "flagged" | "refused";

const KINDS = ["light", "dark", "flat", "bias"] as const;
/** Above this clipped fraction a frame is flagged: common practice keeps clipping to a few per cent. */
const CLIPPED_FLAG = 0.05;

function timeOf(f: TriageFrame): string {
  return f.correctedCaptureAt ? `${f.correctedCaptureAt.slice(11, 23)}` : "—";
}

function isFlagged(f: TriageFrame): boolean {
  return (
    f.needsExposure ||
    (f.flags.clippedFraction ?? 0) > CLIPPED_FLAG ||
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

export function FrameTriage({ setId, frames, canEdit }: { setId: string; frames: TriageFrame[]; canEdit: boolean }) {
  const router = useRouter();
  const baseId = useId();
  const [sort, setSort] = useState<{ key: SortKey; dir: Exclude<SortDirection, "none"> }>({ key: "time", dir: "ascending" });
  const [show, setShow] = useState<Show>("all");
  const [kind, setKind] = useState<string>("any");
  const [query, setQuery] = useState("");
  const [busy, setBusy] = useState<string | null>(null);
  const [message, setMessage] = useState<{ tone: "ok" | "danger"; text: string } | null>(null);

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
          return isFlagged(f);
        case "refused":
          return f.ingestState === "refused";
        default:
          return true;
      }
    });
    const sign = sort.dir === "ascending" ? 1 : -1;
    return list.sort((a, b) => sign * compare(a, b, sort.key));
  }, [frames, kind, query, show, sort]);

  const header = (key: SortKey, label: string) => (
    <SortableHeader
      direction={sort.key === key ? sort.dir : "none"}
      onSort={() => setSort((s) => ({ key, dir: s.key === key && s.dir === "ascending" ? "descending" : "ascending" }))}
    >
      {label}
    </SortableHeader>
  );

  async function run(label: string, work: () => Promise<unknown>, done: string) {
    setBusy(label);
    setMessage(null);
    try {
      await work();
      setMessage({ tone: "ok", text: done });
      router.refresh();
    } catch (err) {
      setMessage({ tone: "danger", text: (err as Error).message });
    } finally {
      setBusy(null);
    }
  }

  const patchFrame = (f: TriageFrame, body: Record<string, unknown>, done: string) =>
    run(`frame-${f.id}`, () => callApi(`/api/bracket-sets/${setId}/frames/${f.id}`, { method: "PATCH", body }), done);

  function onExposure(e: FormEvent<HTMLFormElement>, f: TriageFrame) {
    e.preventDefault();
    const text = String(new FormData(e.currentTarget).get("exposure") ?? "");
    const value = parseExposure(text);
    if (value === null) {
      setMessage({ tone: "danger", text: `${f.fileName}: exposure "${text}" is not a time; write it as 1/250, 0.004 or 2.` });
      return;
    }
    void patchFrame(f, { exposureS: value }, `${f.fileName}: exposure set to ${formatExposure(value)}.`);
  }

  const groupAction = (body: Record<string, unknown>, done: string) =>
    run("groups", () => callApi(`/api/bracket-sets/${setId}/groups`, { body }), done);

  const counts = {
    all: frames.length,
    included: frames.filter((f) => f.included && f.ingestState !== "refused").length,
    flagged: frames.filter(isFlagged).length,
    refused: frames.filter((f) => f.ingestState === "refused").length,
  };

  return (
    <section aria-labelledby={`${baseId}-h`} className="flex flex-col gap-4">
      <h2 id={`${baseId}-h`} className="text-xl font-semibold">
        Frames
      </h2>
      <p className="text-sm text-ink-muted">
        {counts.all} frames: {counts.included} included, {counts.flagged} flagged, {counts.refused} refused. Times are true UTC (camera clock minus its offset).
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
      <div className="w-full overflow-x-auto rounded-card border border-line" tabIndex={0} role="region" aria-labelledby={`${baseId}-cap`}>
        <table className="w-full border-collapse text-left text-sm">
          <caption id={`${baseId}-cap`} className="sr-only">
            Frames of this bracket set, {visible.length} shown
          </caption>
          <thead>
            <tr>
              <th scope="col" className="border-b border-line-strong px-3 py-2.5">
                Thumbnail
              </th>
              {header("name", "File")}
              {header("time", "Time (UTC)")}
              {header("exposure", "Exposure")}
              <th scope="col" className="border-b border-line-strong px-3 py-2.5">
                ISO · f/
              </th>
              <th scope="col" className="border-b border-line-strong px-3 py-2.5">
                Kind
              </th>
              {header("clipped", "Clipped")}
              {header("sharpness", "Findings")}
              <th scope="col" className="border-b border-line-strong px-3 py-2.5">
                Histogram
              </th>
              {header("group", "Group")}
              <th scope="col" className="border-b border-line-strong px-3 py-2.5">
                Included
              </th>
            </tr>
          </thead>
          <tbody>
            {visible.map((f) => (
              <tr key={f.id} className="border-b border-line align-top last:border-b-0">
                <td className="px-3 py-2">
                  {f.hasThumbnail ? (
                    // eslint-disable-next-line @next/next/no-img-element -- a private, already small thumbnail
                    <img src={`/api/bracket-sets/${setId}/frames/${f.id}/thumbnail`} alt={`Thumbnail of ${f.fileName}`} width={80} height={54} className="h-14 w-20 rounded object-contain bg-black" loading="lazy" />
                  ) : (
                    <span className="text-ink-muted">{f.ingestState === "received" ? "checking…" : "none"}</span>
                  )}
                </td>
                <th scope="row" className="px-3 py-2 font-mono font-normal break-all">
                  <a href={`/api/bracket-sets/${setId}/frames/${f.id}/original`} aria-label={`Download the original of ${f.fileName}`}>
                    {f.fileName}
                  </a>
                  {f.ingestState === "refused" ? (
                    <div className="mt-1 font-sans">
                      <p className="text-danger">Refused: {f.refusalReason}</p>
                      {canEdit ? (
                        <Button
                          size="sm"
                          variant="quiet"
                          className="mt-1"
                          pending={busy === `remove-${f.id}`}
                          aria-label={`Remove the refused frame ${f.fileName}`}
                          onClick={() => void run(`remove-${f.id}`, () => callApi(`/api/bracket-sets/${setId}/frames/${f.id}`, { method: "DELETE" }), `${f.fileName} was removed; you can send the file again.`)}
                        >
                          Remove
                        </Button>
                      ) : null}
                    </div>
                  ) : null}
                </th>
                <td className="px-3 py-2 font-mono" title={f.captureAt ? `Camera clock: ${f.captureAt}` : undefined}>
                  {timeOf(f)}
                </td>
                <td className="px-3 py-2">
                  {canEdit && f.ingestState === "ingested" ? (
                    <form onSubmit={(e) => onExposure(e, f)} className="flex items-center gap-1">
                      <label className="sr-only" htmlFor={`${baseId}-exp-${f.id}`}>
                        Exposure of {f.fileName}
                      </label>
                      <input
                        id={`${baseId}-exp-${f.id}`}
                        name="exposure"
                        defaultValue={f.exposureS === null ? "" : formatExposure(f.exposureS).replace(/ s$/, "")}
                        placeholder="1/250"
                        aria-invalid={f.needsExposure || undefined}
                        className={`w-20 rounded-control border bg-surface-raised px-2 py-1 font-mono ${f.needsExposure ? "border-danger" : "border-line-strong"}`}
                      />
                      <Button size="sm" type="submit" variant="quiet" aria-label={`Save the exposure of ${f.fileName}`} pending={busy === `frame-${f.id}`}>
                        Save
                      </Button>
                    </form>
                  ) : (
                    <span className="font-mono">{formatExposure(f.exposureS)}</span>
                  )}
                  {f.exposureSource === "photographer" ? <span className="block text-xs text-ink-muted">set by you</span> : null}
                  {f.needsExposure ? (
                    <span className="block text-xs font-medium text-danger">
                      {f.flags.implausibleExposureS !== undefined ? `the file says ${f.flags.implausibleExposureS} s, which cannot be right: give the exposure` : "the file gives none"}
                    </span>
                  ) : null}
                </td>
                <td className="px-3 py-2 font-mono">
                  {f.iso ?? "—"} · {f.fNumber ?? "—"}
                </td>
                <td className="px-3 py-2">
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
                <td className="px-3 py-2 font-mono">
                  {f.flags.clippedFraction === undefined ? "—" : `${(100 * f.flags.clippedFraction).toFixed(1)} %`}
                </td>
                <td className="px-3 py-2">
                  <Findings f={f} />
                </td>
                <td className="px-3 py-2">
                  <FrameHistogram bins={f.flags.histogram} label={f.fileName} />
                </td>
                <td className="px-3 py-2">
                  <span className="font-mono">{f.groupNumber ?? 1}</span>
                  {canEdit && f.correctedCaptureAt ? (
                    <Button
                      size="sm"
                      variant="quiet"
                      aria-label={`Start a new group at ${f.fileName}`}
                      onClick={() => void groupAction({ action: "split", frameId: f.id }, `A new group starts at ${f.fileName}.`)}
                    >
                      Split here
                    </Button>
                  ) : null}
                </td>
                <td className="px-3 py-2">
                  <input
                    type="checkbox"
                    aria-label={`Include ${f.fileName} in reductions`}
                    checked={f.included && f.ingestState !== "refused"}
                    disabled={!canEdit || f.ingestState === "refused"}
                    onChange={(e) =>
                      void patchFrame(f, { included: e.target.checked }, `${f.fileName} is ${e.target.checked ? "included" : "excluded"}.`)
                    }
                    className="h-5 w-5"
                  />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}

function Findings({ f }: { f: TriageFrame }) {
  const items: { tone: "ok" | "warn" | "danger" | "neutral"; text: string }[] = [];
  if (f.ingestState === "received") items.push({ tone: "neutral", text: "being checked" });
  if ((f.flags.clippedFraction ?? 0) > CLIPPED_FLAG) items.push({ tone: "warn", text: "much clipping" });
  if (f.flags.isBlurred) items.push({ tone: "warn", text: "soft" });
  const limb = f.flags.limb;
  if (limb) {
    items.push({
      tone: limb.quality === "good" ? "ok" : limb.quality === "doubtful" ? "warn" : "danger",
      text: limb.quality === "failed" ? "no limb found" : `limb ${limb.quality} (${limb.rmsPx.toFixed(1)} px)`,
    });
  }
  if (f.flags.sharpness !== undefined) items.push({ tone: "neutral", text: `sharpness ${f.flags.sharpness.toPrecision(3)}` });
  if (f.flags.duplicateOfFrameId) items.push({ tone: "danger", text: "duplicate" });
  if (items.length === 0) return <span className="text-ink-muted">—</span>;
  return (
    <ul className="flex flex-col gap-1">
      {items.map((i) => (
        <li key={i.text}>
          <Badge tone={i.tone}>{i.text}</Badge>
        </li>
      ))}
    </ul>
  );
}
