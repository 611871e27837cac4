"use client";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { callApi } from "./api-client";

/** Hands the set to the curators; it can no longer be changed until they ask for changes. */
export function SubmitForReview({ setId, hasReduction }: { setId: string; hasReduction: boolean }) {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [message, setMessage] = useState<{ tone: "ok" | "danger"; text: string } | null>(null);
  async function submit() {
    setPending(true);
    setMessage(null);
    try {
      await callApi(`/api/bracket-sets/${setId}/submit`, { method: "POST", body: {} });
      setMessage({ tone: "ok", text: "Submitted. The curators have been told by e-mail." });
      router.refresh();
    } catch (err) {
      setMessage({ tone: "danger", text: (err as Error).message });
    } finally {
      setPending(false);
    }
  }
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
