"use client";
import { useRouter } from "next/navigation";
import { useEffect, useRef, useState } from "react";
import { Badge } from "@/components/ui/badge";
import { ProgressBar } from "@/components/ui/progress-bar";
import { describeStage, describeStageFrames, STATE_TONES } from "./labels";

export interface ReductionProgressState {
  state: "queued" | "running" | "done" | "failed";
  stage: string | null;
  /** Fraction 0..1 of the current stage. */
  progress: number;
  /** Frames done of frames to do, when the stage works frame by frame. */
  stageFrames?: { done: number; total: number } | null;
  error: string | null;
}

const POLL_MS = 1000;
/** After this many failed polls in a row the page says it lost contact (it keeps trying, more slowly). */
const QUIET_FAILURES = 3;

const isActive = (s: ReductionProgressState["state"]) => s === "queued" || s === "running";

/**
 * State and progress of one reduction, read from GET /api/reductions/{id}
 * every second while it is queued or running (a composite's likewise, from
 * `pollUrl`, with `noun` "composite"). Stage changes and the end are
 * announced politely; when the run is done the page is refreshed so the
 * server renders its results.
 */
export function ReductionProgress({ reductionId, initial, pollUrl, noun = "reduction" }: { reductionId: string; initial: ReductionProgressState; pollUrl?: string; noun?: "reduction" | "composite" }) {
  const router = useRouter();
  const [current, setCurrent] = useState<ReductionProgressState>(initial);
  const [failures, setFailures] = useState(0);
  // Only a change to done or failed (seen by polling) refreshes, so the results, the reason and the list of reductions are read again.
  const refreshed = useRef(!isActive(initial.state));
  // Leaving the queue refreshes once too: the list of reductions below shows this one's state.
  const leftQueue = useRef(initial.state !== "queued");

  useEffect(() => {
    if (!isActive(current.state)) return;
    let stopped = false;
    const timer = setTimeout(async () => {
      try {
        const res = await fetch(pollUrl ?? `/api/reductions/${encodeURIComponent(reductionId)}`, { cache: "no-store" });
        if (stopped) return;
        if (res.status === 404 || res.status === 401) {
          setCurrent((c) => ({ ...c, state: "failed", error: res.status === 404 ? `This ${noun} is no longer visible to you.` : `Your session ended: sign in again to follow the ${noun}.` }));
          return;
        }
        if (!res.ok) throw new Error(String(res.status));
        const body = (await res.json()) as ReductionProgressState;
        setFailures(0);
        setCurrent({ state: body.state, stage: body.stage, progress: body.progress, stageFrames: body.stageFrames ?? null, error: body.error });
      } catch {
        if (!stopped) setFailures((n) => n + 1);
      }
    }, failures >= QUIET_FAILURES ? POLL_MS * 5 : POLL_MS);
    return () => {
      stopped = true;
      clearTimeout(timer);
    };
  }, [current, failures, reductionId, pollUrl, noun]);

  useEffect(() => {
    if (!isActive(current.state) && !refreshed.current) {
      refreshed.current = true;
      leftQueue.current = true;
      router.refresh();
    } else if (current.state === "running" && !leftQueue.current) {
      leftQueue.current = true;
      router.refresh();
    }
  }, [current.state, router]);

  const stage = describeStage(current.stage);
  const frameCount = current.state === "running" ? describeStageFrames(current.stage, current.stageFrames ?? null) : null;
  const percent = Math.round(Math.min(1, Math.max(0, current.progress)) * 100);
  // What the live region says: the stage and the end, not every percent.
  const announcement =
    current.state === "done" ? `The ${noun} is finished.` : current.state === "failed" ? `The ${noun} failed. ${current.error ?? ""}` : current.state === "queued" ? "Waiting for a worker." : `${stage}.`;

  return (
    <div className="flex flex-col gap-3 rounded-card border border-line bg-surface-raised p-5">
      <div className="flex flex-wrap items-center gap-3">
        <Badge tone={STATE_TONES[current.state]}>{current.state}</Badge>
        {current.state === "done" ? <span className="text-ink-muted">Finished: the results are below.</span> : null}
      </div>
      {isActive(current.state) ? (
        <ProgressBar label={current.state === "queued" ? "Queued" : stage} value={current.state === "queued" ? undefined : percent} max={100} valueText={current.state === "queued" ? "waiting" : frameCount ?? `${percent}% of this stage`} />
      ) : null}
      {current.state === "failed" ? (
        <p role="alert" className="rounded-control border border-danger/50 bg-danger/10 px-3 py-2 text-danger">
          {current.error ?? `The ${noun} failed without a reason on record.`}
        </p>
      ) : null}
      {failures >= QUIET_FAILURES && isActive(current.state) ? (
        <p className="text-sm text-warn">Lost contact with the server; still trying every few seconds.</p>
      ) : null}
      <p className="sr-only" aria-live="polite" role="status">
        {announcement}
      </p>
    </div>
  );
}
