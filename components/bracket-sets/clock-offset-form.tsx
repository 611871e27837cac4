"use client";
// The camera clock offset: typed in seconds, or worked out from a frame that
// photographed a trusted clock (a GPS receiver's display, a radio-controlled
// watch) together with the true time that clock showed.
import { useId, useState, type FormEvent } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { Feedback } from "@/components/ui/feedback";
import type { FrameDto } from "@/lib/bracket-sets/dto";
import { ApiProblem, fetchJson } from "@/lib/http/client-fetch";
import { parseStrictNumber } from "@/lib/strict-number";

type Mode = "typed" | "frame";

/** What the form sends: the offset typed, or the frame of a clock and the true time it showed; refused here when unreadable. */
function readOffset(mode: Mode, form: FormData): Record<string, unknown> {
  const refuse = (field: string, text: string) => ApiProblem.local(text, { [field]: text });
  if (mode === "typed") {
    const text = String(form.get("clockOffsetS") ?? "").trim();
    const value = parseStrictNumber(text);
    if (Number.isNaN(value)) throw refuse("clockOffsetS", `Clock offset: "${text}" is not a number of seconds.`);
    return { clockOffsetS: value };
  }
  const frameId = String(form.get("clockFrameId") ?? "");
  const shown = String(form.get("clockShownAt") ?? "").trim();
  if (!frameId) throw refuse("clockFrameId", "Choose the frame that shows the clock.");
  // The time typed is UTC; a value without a zone is read as UTC, not local time.
  const iso = /[zZ]|[+-]\d\d:?\d\d$/.test(shown) ? shown : `${shown}Z`;
  if (!shown || Number.isNaN(Date.parse(iso))) throw refuse("clockShownAt", `Time the clock showed: "${shown}" is not a date and time such as 2027-08-02T10:59:30.`);
  return { clockFrameId: frameId, clockShownAt: new Date(iso).toISOString() };
}

export function ClockOffsetForm({ setId, clockOffsetS, frames }: { setId: string; clockOffsetS: number; frames: FrameDto[] }) {
  const id = useId();
  const [mode, setMode] = useState<Mode>("typed");
  const save = useApiMutation(async (form: FormData) => fetchJson<{ clockOffsetS: number }>(`/api/bracket-sets/${setId}`, { method: "PATCH", body: readOffset(mode, form) }));
  const isInvalid = (field: string) => save.error?.fields[field] !== undefined || undefined;
  const timed = frames.filter((f) => f.captureAt && f.ingestState === "ingested");

  function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    save.mutate(new FormData(e.currentTarget));
  }

  return (
    <form onSubmit={onSubmit} className="flex max-w-2xl flex-col gap-4" aria-labelledby={`${id}-h`}>
      <h3 id={`${id}-h`} className="text-lg font-semibold">
        Camera clock
      </h3>
      <p className="text-sm text-ink-muted">
        Now {clockOffsetS} s: the camera clock ran {Math.abs(clockOffsetS)} s {clockOffsetS >= 0 ? "ahead of" : "behind"} true UTC. Every frame time is corrected by it, and the
        reduction uses the corrected times to place the Sun.
      </p>
      <fieldset className="flex flex-wrap gap-4">
        <legend className="sr-only">How to set the offset</legend>
        <label className="flex items-center gap-2">
          <input type="radio" name="mode" checked={mode === "typed"} onChange={() => setMode("typed")} /> Type the offset
        </label>
        <label className="flex items-center gap-2">
          <input type="radio" name="mode" checked={mode === "frame"} onChange={() => setMode("frame")} disabled={timed.length === 0} /> From a frame of a trusted clock
        </label>
      </fieldset>
      {mode === "typed" ? (
        <div className="flex flex-col gap-1.5">
          <label htmlFor={`${id}-s`} className="text-sm font-medium">
            Offset (s), positive when the camera was ahead
          </label>
          <input
            id={`${id}-s`}
            name="clockOffsetS"
            type="number"
            step="any"
            defaultValue={clockOffsetS}
            aria-invalid={isInvalid("clockOffsetS")}
            className="w-40 rounded-control border border-line-strong bg-surface-raised px-3 py-2 font-mono"
          />
        </div>
      ) : (
        <div className="grid grid-cols-1 gap-4 sm:grid-cols-2">
          <div className="flex flex-col gap-1.5">
            <label htmlFor={`${id}-f`} className="text-sm font-medium">
              Frame that shows the clock
            </label>
            <select id={`${id}-f`} name="clockFrameId" aria-invalid={isInvalid("clockFrameId")} className="rounded-control border border-line-strong bg-surface-raised px-3 py-2">
              <option value="">Choose a frame</option>
              {timed.map((f) => (
                <option key={f.id} value={f.id}>
                  {f.fileName} (camera {f.captureAt?.slice(11, 19)})
                </option>
              ))}
            </select>
          </div>
          <div className="flex flex-col gap-1.5">
            <label htmlFor={`${id}-t`} className="text-sm font-medium">
              True time the clock showed (UTC)
            </label>
            <input
              id={`${id}-t`}
              name="clockShownAt"
              type="datetime-local"
              step={1}
              defaultValue="2027-08-02T10:00:00"
              aria-invalid={isInvalid("clockShownAt")}
              className="rounded-control border border-line-strong bg-surface-raised px-3 py-2 font-mono"
            />
          </div>
        </div>
      )}
      <Feedback live look="tinted" problem={save.error} success={save.data ? `Camera clock offset is now ${save.data.clockOffsetS} s; frame times below are corrected.` : null} />
      <div>
        <ScriptSubmitButton pending={save.isPending} pendingLabel="Saving…">
          Save clock offset
        </ScriptSubmitButton>
      </div>
    </form>
  );
}
