"use client";
import { useRouter } from "next/navigation";
import { useEffect, useRef } from "react";
import { useApiMutation } from "@/components/data/use-api-mutation";
import { Button } from "@/components/ui/button";
import { Feedback } from "@/components/ui/feedback";
import { fetchJson } from "@/lib/http/client-fetch";

/** Hands the set to the curators; it can no longer be changed until they ask for changes. */
export function SubmitForReview({ setId, hasReduction }: { setId: string; hasReduction: boolean }) {
  const router = useRouter();
  const submit = useApiMutation(() => fetchJson(`/api/bracket-sets/${setId}/submit`, { body: {} }), {
    // The page shows the confirmation at its top (this form goes away with the set's state) and moves the focus there.
    onSuccess: () => router.replace(`/studio/sets/${setId}?submitted=1`, { scroll: true }),
  });
  // Still pending while the page changes to the submitted set.
  const pending = submit.isPending || submit.isSuccess;
  return (
    <div className="flex flex-col gap-2">
      <div>
        <Button variant="primary" onClick={() => submit.mutate()} pending={pending} pendingLabel="Submitting…" disabled={!hasReduction}>
          Submit for review
        </Button>
      </div>
      <p className="text-sm text-ink-muted">
        {hasReduction ? "Curators check the frames and the reductions, then publish or ask you for changes." : "Submitting needs at least one finished reduction."}
      </p>
      <Feedback live look="tinted" problem={submit.error} />
    </div>
  );
}

/** The confirmation after submitting, at the top of the page: it takes the focus so that keyboard and screen-reader users land on it. */
export function SubmittedNotice() {
  const ref = useRef<HTMLDivElement>(null);
  useEffect(() => {
    ref.current?.focus();
    ref.current?.scrollIntoView({ block: "center" });
  }, []);
  return (
    <div ref={ref} tabIndex={-1} role="status" aria-live="polite" className="mb-8 max-w-3xl rounded-card border border-ok/60 bg-ok/10 p-4 outline-none focus-visible:ring-2 focus-visible:ring-focus">
      <h2 className="text-lg font-semibold text-ok">Submitted for review</h2>
      <p className="mt-1">The curators have been told by e-mail. The set stays as it is until they publish it or ask you for changes; you will hear from them either way.</p>
    </div>
  );
}
