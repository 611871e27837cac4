"use client";
import { Button } from "@/components/ui/button";
import { callApi } from "./api-client";
import { useApiAction } from "./use-api-action";

/** Hands the set to the curators; it can no longer be changed until they ask for changes. */
export function SubmitForReview({ setId, hasReduction }: { setId: string; hasReduction: boolean }) {
  const { pending, message, run } = useApiAction();
  const submit = () => run(() => callApi(`/api/bracket-sets/${setId}/submit`, { method: "POST", body: {} }), () => "Submitted. The curators have been told by e-mail.");
  return (
    <div className="flex flex-col gap-2">
      <div>
        <Button variant="primary" onClick={() => void submit()} pending={pending} pendingLabel="Submitting…" disabled={!hasReduction}>
          Submit for review
        </Button>
      </div>
      <p className="text-sm text-ink-muted">
        {hasReduction ? "Curators check the frames and the reductions, then publish or ask you for changes." : "Submitting needs at least one finished reduction."}
      </p>
      <p role="status" aria-live="polite" className="text-sm font-medium">
        {message ? <span className={message.tone === "ok" ? "text-ok" : "text-danger"}>{message.text}</span> : null}
      </p>
    </div>
  );
}
