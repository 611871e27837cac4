"use client";
// The editable and descriptive cells of one frame's row in the frame table: the
// file name (wrapped at its separators), the capture time and the exposure (each
// with its own message under it), the findings, and removal with a second step.
import { Fragment, useState, type FormEvent } from "react";
import type { FrameDto } from "@/lib/bracket-sets/dto";
import { judgeClipping } from "@/lib/bracket-sets/triage";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { ScriptSubmitButton } from "@/components/ui/submit-button";
import { formatExposureValue, parseExposure } from "./exposure-text";

export type RowProblem = { field: "time" | "exposure" | "row"; text: string };

const INPUT = "rounded-control border bg-surface-raised px-2 py-1 font-mono placeholder:font-sans placeholder:italic placeholder:text-ink-muted/70";

/** The name with break opportunities after _ - . and spaces, so it wraps between its parts, not inside a number. */
export function FileName({ name }: { name: string }) {
  const parts = name.split(/(?<=[_\-. ])/);
  return (
    <>
      {parts.map((p, i) => (
        <Fragment key={i}>
          {p}
          {i < parts.length - 1 ? <wbr /> : null}
        </Fragment>
      ))}
    </>
  );
}

const TIME_SOURCE: Record<NonNullable<FrameDto["captureTimeSource"]>, string> = {
  file: "from the file",
  csv: "from your CSV",
  interval: "in shot order, from your first time and interval",
  table: "typed by you",
};

/** The camera-clock time as it goes into the box: the time of day when it falls on the eclipse's date, else the whole ISO time. */
function cameraTimeText(iso: string | null, day: string): string {
  if (!iso) return "";
  return iso.startsWith(day) ? iso.slice(11, 23) : iso.replace(/\.000Z$/, "Z");
}

function Problem({ id, text }: { id: string; text: string | undefined }) {
  return text ? (
    <p id={id} className="mt-1 max-w-64 text-xs font-medium text-danger">
      {text}
    </p>
  ) : null;
}

export function TimeCell({
  f,
  day,
  canEdit,
  pending,
  problem,
  onSave,
}: {
  f: FrameDto;
  day: string;
  canEdit: boolean;
  pending: boolean;
  problem?: string;
  onSave: (f: FrameDto, text: string | null) => void;
}) {
  const trueTime = f.correctedCaptureAt ? `${f.correctedCaptureAt.slice(11, 23)} UTC` : null;
  const errorId = `time-problem-${f.id}`;
  const source = f.captureTimeSource ? TIME_SOURCE[f.captureTimeSource] : null;
  if (!canEdit || f.ingestState !== "ingested") {
    return (
      <>
        <span className="font-mono">{trueTime ?? "—"}</span>
        {source ? <span className="block text-xs text-ink-muted">{source}</span> : null}
      </>
    );
  }
  const submit = (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    onSave(f, String(new FormData(e.currentTarget).get("time") ?? ""));
  };
  const value = cameraTimeText(f.captureAt, day);
  return (
    <form onSubmit={submit} className="flex flex-col gap-1">
      <div className="flex flex-wrap items-center gap-1">
        <label className="sr-only" htmlFor={`time-${f.id}`}>
          Camera clock time of {f.fileName}
        </label>
        <input
          id={`time-${f.id}`}
          name="time"
          defaultValue={value}
          key={value}
          placeholder="hh:mm:ss"
          inputMode="text"
          autoComplete="off"
          aria-invalid={problem || f.needsTime ? true : undefined}
          aria-describedby={problem ? errorId : undefined}
          style={{ width: `${Math.max(11, value.length + 2)}ch` }}
          className={`${INPUT} ${problem || f.needsTime ? "border-danger" : "border-line-strong"}`}
        />
        <ScriptSubmitButton size="sm" variant="quiet" aria-label={`Save the capture time of ${f.fileName}`} pending={pending}>
          Save
        </ScriptSubmitButton>
        {f.captureTimeSource && f.captureTimeSource !== "file" ? (
          <Button size="sm" type="button" variant="quiet" aria-label={`Forget the capture time you gave ${f.fileName}`} onClick={() => onSave(f, null)}>
            Forget
          </Button>
        ) : null}
      </div>
      {trueTime || source ? (
        <span className="text-xs text-ink-muted">
          {trueTime ? `true time ${trueTime}` : ""}
          {trueTime && source ? ", " : ""}
          {source ?? ""}
        </span>
      ) : null}
      {f.needsTime ? <span className="text-xs font-medium text-danger">no capture time</span> : null}
      <Problem id={errorId} text={problem} />
    </form>
  );
}

export function ExposureCell({
  f,
  canEdit,
  pending,
  problem,
  onSave,
}: {
  f: FrameDto;
  canEdit: boolean;
  pending: boolean;
  problem?: string;
  onSave: (f: FrameDto, seconds: number | null, typed: string) => void;
}) {
  const value = f.exposureS === null ? "" : formatExposureValue(f.exposureS);
  const [typed, setTyped] = useState(value);
  const errorId = `exposure-problem-${f.id}`;
  if (!canEdit || f.ingestState !== "ingested") {
    return <span className="font-mono">{f.exposureS === null ? "—" : `${value} s`}</span>;
  }
  const submit = (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const text = String(new FormData(e.currentTarget).get("exposure") ?? "");
    onSave(f, parseExposure(text), text);
  };
  return (
    <form onSubmit={submit} className="flex flex-col gap-1">
      <div className="flex flex-wrap items-center gap-1">
        <label className="sr-only" htmlFor={`exposure-${f.id}`}>
          Exposure of {f.fileName}
        </label>
        <input
          id={`exposure-${f.id}`}
          name="exposure"
          defaultValue={value}
          key={value}
          onChange={(e) => setTyped(e.target.value)}
          placeholder="e.g. 1/250"
          inputMode="decimal"
          autoComplete="off"
          aria-invalid={problem || f.needsExposure ? true : undefined}
          aria-describedby={problem ? errorId : undefined}
          // The box fits what it holds (the placeholder included), with room for the caret.
          style={{ width: `${Math.max(9, (typed || value).length + 3)}ch` }}
          className={`${INPUT} ${problem || f.needsExposure ? "border-danger" : "border-line-strong"}`}
        />
        <span aria-hidden="true" className="text-ink-muted">
          s
        </span>
        <ScriptSubmitButton size="sm" variant="quiet" aria-label={`Save the exposure of ${f.fileName}`} pending={pending}>
          Save
        </ScriptSubmitButton>
      </div>
      {f.exposureSource === "photographer" ? <span className="text-xs text-ink-muted">set by you</span> : null}
      {f.needsExposure ? (
        <span className="text-xs font-medium text-danger">
          {f.flags.implausibleExposureS !== undefined ? `the file says ${f.flags.implausibleExposureS} s, which cannot be right: give the exposure` : "the file gives none"}
        </span>
      ) : null}
      <Problem id={errorId} text={problem} />
    </form>
  );
}

export function RemoveCell({ f, pending, onRemove }: { f: FrameDto; pending: boolean; onRemove: (f: FrameDto) => void }) {
  const [isAsking, setIsAsking] = useState(false);
  if (!isAsking) {
    return (
      <Button size="sm" variant="quiet" aria-label={`Remove ${f.fileName}`} onClick={() => setIsAsking(true)}>
        Remove
      </Button>
    );
  }
  return (
    <div role="group" aria-label={`Remove ${f.fileName}?`} className="flex flex-col items-start gap-1">
      <span className="text-xs">Remove from the set?</span>
      <div className="flex gap-1">
        <Button size="sm" variant="danger" aria-label={`Yes, remove ${f.fileName}`} pending={pending} onClick={() => onRemove(f)} autoFocus>
          Remove
        </Button>
        <Button size="sm" variant="quiet" aria-label={`Keep ${f.fileName}`} onClick={() => setIsAsking(false)}>
          Keep
        </Button>
      </div>
    </div>
  );
}

export function Findings({ f, shortest }: { f: FrameDto; shortest: ReadonlyMap<number, number> }) {
  const items: { tone: "ok" | "warn" | "danger" | "neutral"; text: string }[] = [];
  if (f.ingestState === "received") items.push({ tone: "neutral", text: "being checked" });
  const clipping = judgeClipping(f, shortest);
  if (clipping === "fault") items.push({ tone: "warn", text: "much clipping" });
  if (clipping === "expected") items.push({ tone: "neutral", text: "inner corona clipped, as a long exposure should" });
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
          <Badge tone={i.tone} className="whitespace-normal">
            {i.text}
          </Badge>
        </li>
      ))}
    </ul>
  );
}
