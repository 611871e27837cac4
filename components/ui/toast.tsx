"use client";

import { useCallback, useEffect, useMemo, useRef, useState, type ReactNode } from "react";
import { cx } from "@/components/ui/cx";
import { ToastContext, type ToastApi, type ToastOptions, type ToastTone } from "@/components/ui/use-toast";

type Toast = { id: string; message: string; tone: ToastTone };

// Long enough to read a sentence twice (WCAG 2.2.1 asks for time to read).
const DEFAULT_DURATION_MS = 8000;

const TONES: Record<ToastTone, string> = {
  neutral: "border-line-strong",
  ok: "border-ok",
  warn: "border-warn",
  danger: "border-danger",
};

const TONE_WORDS: Record<ToastTone, string | null> = {
  neutral: null,
  ok: "Done:",
  warn: "Warning:",
  danger: "Error:",
};

/**
 * Holds the toasts and renders the live region. The region exists from the first
 * render, empty, because screen readers only announce changes to a region they
 * already know about.
 */
export function ToastProvider({ children }: { children: ReactNode }) {
  const [toasts, setToasts] = useState<Toast[]>([]);
  const timers = useRef(new Map<string, ReturnType<typeof setTimeout>>());
  const counter = useRef(0);

  const dismiss = useCallback((id: string) => {
    const timer = timers.current.get(id);
    if (timer) clearTimeout(timer);
    timers.current.delete(id);
    setToasts((current) => current.filter((toast) => toast.id !== id));
  }, []);

  const notify = useCallback(
    (message: string, options: ToastOptions = {}) => {
      const tone = options.tone ?? "neutral";
      counter.current += 1;
      const id = `toast-${counter.current}`;
      // One notice at a time: a new one replaces the last instead of stacking up
      // (five role changes in a row leave one notice, the latest, not five).
      timers.current.forEach((timer) => clearTimeout(timer));
      timers.current.clear();
      setToasts([{ id, message, tone }]);
      const durationMs =
        options.durationMs === undefined ? (tone === "danger" ? null : DEFAULT_DURATION_MS) : options.durationMs;
      if (durationMs !== null) timers.current.set(id, setTimeout(() => dismiss(id), durationMs));
      return id;
    },
    [dismiss],
  );

  useEffect(() => {
    const pending = timers.current;
    return () => pending.forEach((timer) => clearTimeout(timer));
  }, []);

  const api = useMemo<ToastApi>(() => ({ notify, dismiss }), [notify, dismiss]);

  return (
    <ToastContext.Provider value={api}>
      {children}
      <div
        role="status"
        aria-live="polite"
        aria-atomic="false"
        className="pointer-events-none fixed inset-x-0 bottom-0 z-50 flex flex-col items-center gap-2 p-4 sm:items-end"
      >
        {toasts.map((toast) => (
          <div
            key={toast.id}
            className={cx(
              "pointer-events-auto flex w-full max-w-sm items-start gap-3 rounded-card border-l-4 bg-surface-raised px-4 py-3 text-sm text-ink shadow-raised",
              TONES[toast.tone],
            )}
          >
            <p className="flex-1">
              {TONE_WORDS[toast.tone] ? <strong className="font-semibold">{TONE_WORDS[toast.tone]} </strong> : null}
              {toast.message}
            </p>
            <button
              type="button"
              onClick={() => dismiss(toast.id)}
              className="-m-1 inline-flex size-7 shrink-0 items-center justify-center rounded-control text-ink-muted hover:bg-surface-hover hover:text-ink"
            >
              <span aria-hidden="true">✕</span>
              <span className="sr-only">Dismiss</span>
            </button>
          </div>
        ))}
      </div>
    </ToastContext.Provider>
  );
}
