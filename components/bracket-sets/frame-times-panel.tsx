"use client";
// Capture times and exposures for many frames at once: a CSV matched by file
// name, or a first time and an interval in shot order. Typing them one by one
// happens in the frame table. The server checks everything and changes nothing
// when a row is bad; its message names the line and the column.
import { useId, useState, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import type { FrameTimesResultDto } from "@/lib/bracket-sets/dto";
import { ApiProblem, fetchJson } from "@/lib/http/client-fetch";
import { FILE_INPUT_CLASSES } from "./upload-limits";

const FIELD = "rounded-control border border-line-strong bg-surface-raised px-3 py-2";

/** Names of the form's fields as the page shows them, for the server's field-by-field refusals. */
const FIELD_LABELS: Record<string, string> = {
  firstAt: "First frame's time",
  intervalS: "Interval",
  scope: "Which frames",
  text: "The CSV",
  fileName: "The CSV's name",
};

function describeResult(r: FrameTimesResultDto): string {
  const parts = [r.timesSet ? `${r.timesSet} capture time${r.timesSet === 1 ? "" : "s"}` : "", r.exposuresSet ? `${r.exposuresSet} exposure${r.exposuresSet === 1 ? "" : "s"}` : ""].filter(Boolean);
  return parts.length ? `Saved ${parts.join(" and ")}.` : "Nothing needed changing.";
}

export function FrameTimesPanel({ setId, eclipseDay, untimedCount, lightCount }: { setId: string; eclipseDay: string; untimedCount: number; lightCount: number }) {
  const id = useId();
  const sendTimes = (body: Record<string, unknown>) => fetchJson<FrameTimesResultDto>(`/api/bracket-sets/${setId}/frame-times`, { body });
  const csv = useApiMutation(async (file: File | null) => {
    if (!file || file.size === 0) throw ApiProblem.local("Choose the CSV file first.");
    return sendTimes({ method: "csv", fileName: file.name, text: await file.text() });
  });
  const interval = useApiMutation((body: Record<string, string>) => sendTimes({ method: "interval", ...body }));
  const [fileName, setFileName] = useState<string | null>(null);

  function sendCsv(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    csv.mutate((new FormData(e.currentTarget).get("csv") as File | null) ?? null);
  }

  function sendInterval(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    interval.mutate({ firstAt: String(data.get("firstAt") ?? ""), intervalS: String(data.get("intervalS") ?? ""), scope: String(data.get("scope") ?? "missing") });
  }

  return (
    <section aria-labelledby={`${id}-h`} className="flex flex-col gap-4">
      <h2 id={`${id}-h`} className="text-xl font-semibold">
        Capture times and exposures
      </h2>
      <p className="max-w-3xl text-sm text-ink-muted">
        {untimedCount
          ? `${untimedCount} of ${lightCount} light frames have no capture time. Aligning on the Sun's centre needs every frame's time. `
          : "Every light frame has a capture time. "}
        Give times as the camera&apos;s clock showed them: the set&apos;s clock offset is applied to them exactly as to the times in the files. A time you give wins over the file&apos;s, which is kept.
      </p>
      <div className="grid grid-cols-1 gap-6 lg:grid-cols-2">
        <form onSubmit={sendCsv} className="flex flex-col gap-3 rounded-card border border-line p-4" aria-describedby={`${id}-csv-hint`}>
          <h3 className="font-semibold">From a CSV, by file name</h3>
          <p id={`${id}-csv-hint`} className="text-sm text-ink-muted">
            A header row with <code>file</code> and <code>capture_time</code>, <code>exposure_s</code> or both; other columns are ignored. Times in ISO 8601 with their zone
            (2027-08-02T10:04:31.25Z or …+02:00), or a time of day in UTC (10:04:31.25) on {eclipseDay}. Exposures as 0.004 or 1/250. An empty cell leaves that value as it is.
          </p>
          <label htmlFor={`${id}-csv`} className="text-sm font-medium">
            CSV file
          </label>
          <input id={`${id}-csv`} name="csv" type="file" accept=".csv,.tsv,.txt,text/csv,text/plain" className={FILE_INPUT_CLASSES} onChange={(e) => setFileName(e.target.files?.[0]?.name ?? null)} />
          <div>
            <ScriptSubmitButton pending={csv.isPending} pendingLabel="Reading…" disabled={!fileName}>
              Use this CSV
            </ScriptSubmitButton>
          </div>
          <Feedback look="tinted" labels={FIELD_LABELS} problem={csv.error} success={csv.data && csv.variables ? `${csv.variables.name}: ${describeResult(csv.data)}` : null} />
        </form>
        <form onSubmit={sendInterval} className="flex flex-col gap-3 rounded-card border border-line p-4">
          <h3 className="font-semibold">From the first time and an interval</h3>
          <p className="text-sm text-ink-muted">Frames are taken in the order of their file names as the camera numbered them (IMG_9 before IMG_10), each one the interval after the one before, start to start.</p>
          <div className="flex flex-wrap gap-4">
            <label className="flex flex-col gap-1 text-sm font-medium">
              First frame&apos;s time (camera clock)
              <input name="firstAt" required autoComplete="off" aria-describedby={`${id}-first-hint`} className={`${FIELD} font-mono`} size={16} />
              <span id={`${id}-first-hint`} className="font-normal text-ink-muted">
                10:04:31.25 (UTC) or with its zone
              </span>
            </label>
            <label className="flex flex-col gap-1 text-sm font-medium">
              Interval (s)
              <input name="intervalS" required inputMode="decimal" autoComplete="off" className={`${FIELD} font-mono`} size={8} />
            </label>
          </div>
          <fieldset className="flex flex-col gap-1 text-sm">
            <legend className="mb-1 font-medium">Which frames</legend>
            <label className="flex items-center gap-2">
              <input type="radio" name="scope" value="missing" defaultChecked className="h-4 w-4" /> Light frames without a time
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" name="scope" value="all" className="h-4 w-4" /> Every light frame (replaces their times)
            </label>
          </fieldset>
          <div>
            <ScriptSubmitButton pending={interval.isPending} pendingLabel="Saving…">
              Give these times
            </ScriptSubmitButton>
          </div>
          <Feedback
            look="tinted"
            labels={FIELD_LABELS}
            problem={interval.error}
            success={interval.data ? `${describeResult(interval.data)} In shot order: ${interval.data.fileNames.slice(0, 3).join(", ")}${interval.data.fileNames.length > 3 ? ", …" : ""}.` : null}
          />
        </form>
      </div>
      <p className="text-sm text-ink-muted">One frame at a time: type its time in the frame table.</p>
    </section>
  );
}
