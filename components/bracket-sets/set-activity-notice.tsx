"use client";
import { useRouter } from "next/navigation";
import { useEffect, useRef } from "react";
import { useSetActivity } from "@/components/data/progress-queries";

const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

/**
 * Follows a bracket set while something is being worked on (frames being
 * checked on arrival, reductions running): a query polls the set until the
 * work ends, the page's server data are read again whenever it moves, and the
 * notice says so politely to screen readers.
 */
export function SetActivityNotice({
  setId,
  initial,
  watchFrames = false,
  excludeReductionId = null,
  othersMessage,
  intervalMs = 2000,
}: {
  setId: string;
  /** What the server saw when it rendered the page. */
  initial: { checking: number; running: number };
  /** Follow the frames' checks too (the set's own page); otherwise only its reductions. */
  watchFrames?: boolean;
  /** The reduction the page follows itself. */
  excludeReductionId?: string | null;
  /** Said while other reductions run, instead of counting them. */
  othersMessage?: string;
  intervalMs?: number;
}) {
  const router = useRouter();
  const activity = useSetActivity({ setId, initial, watchFrames, excludeReductionId, intervalMs });
  const seen = useRef<string | null>(null);
  useEffect(() => {
    if (activity.fingerprint === null || activity.fingerprint === seen.current) return;
    seen.current = activity.fingerprint;
    router.refresh();
  }, [activity.fingerprint, router]);

  const { checking, running } = activity;
  const message =
    othersMessage && running
      ? othersMessage
      : [checking ? `Checking ${plural(checking, "frame", "frames")}…` : "", running ? `${plural(running, "reduction", "reductions")} in progress…` : ""].filter(Boolean).join(" ");
  const active = checking > 0 || running > 0;
  return (
    <p role="status" aria-live="polite" className={active ? "text-sm text-ink-muted" : "sr-only"}>
      {active ? message : ""}
    </p>
  );
}
