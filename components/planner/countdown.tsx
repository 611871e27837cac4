"use client";
import { useEffect, useState } from "react";

function format(ms: number): string {
  const s = Math.max(0, Math.floor(ms / 1000));
  const d = Math.floor(s / 86400);
  const h = Math.floor((s % 86400) / 3600);
  const m = Math.floor((s % 3600) / 60);
  const sec = s % 60;
  const hms = `${String(h).padStart(2, "0")}:${String(m).padStart(2, "0")}:${String(sec).padStart(2, "0")}`;
  return d > 0 ? `${d} d ${hms}` : hms;
}

/** Time left to an instant, ticking each second; the live text is not announced every tick. */
export function Countdown({ targetUtcMs, label }: { targetUtcMs: number; label: string }) {
  const [now, setNow] = useState<number | null>(null);
  useEffect(() => {
    // The clock is read only after hydration: the server's time would not match the browser's.
    // eslint-disable-next-line react-hooks/set-state-in-effect
    setNow(Date.now());
    const t = setInterval(() => setNow(Date.now()), 1000);
    return () => clearInterval(t);
  }, []);
  if (now === null) return null;
  const left = targetUtcMs - now;
  return (
    <p className="font-mono text-2xl tabular-nums" aria-live="off">
      <span className="sr-only">{label}: </span>
      {left > 0 ? `T − ${format(left)}` : "passed"}
    </p>
  );
}
