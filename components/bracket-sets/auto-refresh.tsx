"use client";
import { useRouter } from "next/navigation";
import { useEffect } from "react";

/**
 * Re-reads the page's server data every few seconds while something is still
 * being worked on (frames being checked, a reduction running), and says so
 * politely to screen readers.
 */
export function AutoRefresh({ active, message, intervalMs = 2000 }: { active: boolean; message: string; intervalMs?: number }) {
  const router = useRouter();
  useEffect(() => {
    if (!active) return;
    const timer = setInterval(() => router.refresh(), intervalMs);
    return () => clearInterval(timer);
  }, [active, intervalMs, router]);
  return (
    <p role="status" aria-live="polite" className={active ? "text-sm text-ink-muted" : "sr-only"}>
      {active ? message : ""}
    </p>
  );
}
