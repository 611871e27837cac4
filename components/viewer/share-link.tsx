"use client";
import { useEffect, useRef, useState } from "react";
import { buttonClasses } from "@/components/ui/button";

const CONFIRMATION_MS = 4000;

/**
 * Copies the link to the current view. `getLink` is asked at the moment of the
 * press, so the link is the view as it is then, not as it was at the last
 * address-bar update. Without the clipboard API (an insecure origin, an old
 * browser, a refusal) the link is shown in a field with its text selected.
 */
export function ShareLink({ getLink, disabled }: { getLink: () => string; disabled: boolean }) {
  const [message, setMessage] = useState("");
  const [fallbackLink, setFallbackLink] = useState<string | null>(null);
  const fieldRef = useRef<HTMLInputElement>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);

  useEffect(() => () => clearTimeout(timer.current), []);

  useEffect(() => {
    if (fallbackLink !== null) {
      fieldRef.current?.focus();
      fieldRef.current?.select();
    }
  }, [fallbackLink]);

  function say(text: string) {
    setMessage(text);
    clearTimeout(timer.current);
    timer.current = setTimeout(() => setMessage(""), CONFIRMATION_MS);
  }

  async function copy() {
    const link = getLink();
    try {
      if (!navigator.clipboard?.writeText) throw new Error("no clipboard");
      await navigator.clipboard.writeText(link);
      setFallbackLink(null);
      say("Link to this view copied.");
    } catch {
      setFallbackLink(link);
      say("The link is selected below: copy it with Ctrl+C, or ⌘C on a Mac.");
    }
  }

  return (
    <div className="flex min-w-0 flex-col gap-2">
      <div className="flex flex-wrap items-center gap-3">
        <button type="button" className={buttonClasses({ variant: "secondary", size: "md" })} onClick={copy} disabled={disabled}>
          <svg aria-hidden="true" viewBox="0 0 24 24" className="size-5" fill="none" stroke="currentColor" strokeWidth={2} strokeLinecap="round" strokeLinejoin="round">
            <path d="M10 14a4 4 0 0 0 5.7 0l3-3a4 4 0 0 0-5.7-5.7l-1 1" />
            <path d="M14 10a4 4 0 0 0-5.7 0l-3 3a4 4 0 0 0 5.7 5.7l1-1" />
          </svg>
          Copy link to this view
        </button>
        <p role="status" aria-live="polite" className="text-sm text-ok">
          {message}
        </p>
      </div>
      {fallbackLink !== null ? (
        <label className="flex flex-col gap-1 text-sm text-ink">
          Link to this view
          <input
            ref={fieldRef}
            readOnly
            value={fallbackLink}
            onFocus={(e) => e.currentTarget.select()}
            className="w-full rounded-control border border-line-strong bg-surface-sunken px-3 py-2 font-mono text-sm text-ink"
          />
        </label>
      ) : null}
    </div>
  );
}
