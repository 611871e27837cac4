"use client";
import { useRouter } from "next/navigation";
import { useEffect, useRef } from "react";
import { useRunProgress, type RunKind, type RunProgress } from "@/components/data/progress-queries";
import { Badge } from "@/components/ui/badge";
import { Feedback } from "@/components/ui/feedback";
import { ProgressBar } from "@/components/ui/progress-bar";
import { describeStage, describeStageFrames, STATE_TONES } from "./labels";

const isActive = (s: RunProgress["state"]) => s === "queued" || s === "running";

/**
 * State and progress of one reduction (or, with `noun` "composite", of a
 * composite), followed by a query that polls while it is queued or running.
 * Stage changes and the end are announced politely; when the run is done the
 * page is refreshed so the server renders its results.
 */
export function ReductionProgress({ reductionId, initial, noun = "reduction" }: { reductionId: string; initial: RunProgress; noun?: RunKind }) {
  const router = useRouter();
  const { progress: current, hasLostContact } = useRunProgress(noun, reductionId, initial);
  // Only a change to done or failed (seen by polling) refreshes, so the results, the reason and the list of reductions are read again.
  const refreshed = useRef(!isActive(initial.state));
  // Leaving the queue refreshes once too: the list of reductions below shows this one's state.
  const leftQueue = useRef(initial.state !== "queued");

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
      {current.state === "failed" ? <Feedback look="box" problem={current.error ?? `The ${noun} failed without a reason on record.`} /> : null}
      {hasLostContact ? <p className="text-sm text-warn">Lost contact with the server; still trying every few seconds.</p> : null}
      <p className="sr-only" aria-live="polite" role="status">
        {announcement}
      </p>
    </div>
  );
}
