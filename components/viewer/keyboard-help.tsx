"use client";
import { useId, useState } from "react";
import { buttonClasses } from "@/components/ui/button";

/** The keys the image answers to once it has focus (our zoom steps, the library's panning and turning; mirroring is switched off). */
export const VIEWER_KEYS: { keys: string[]; action: string }[] = [
  { keys: ["Arrow keys", "W A S D"], action: "Move the image" },
  { keys: ["+", "Shift + ↑"], action: "Zoom in 1.5 times, as one wheel notch does" },
  { keys: ["−", "Shift + ↓"], action: "Zoom out 1.5 times" },
  { keys: ["0"], action: "Fit the whole image" },
  { keys: ["R"], action: "Turn a quarter right" },
  { keys: ["Shift + R"], action: "Turn a quarter left" },
  { keys: ["Tab"], action: "Leave the image for the controls" },
];

/** A disclosure: a real button that shows and hides the list of keys. */
export function KeyboardHelp({ hintId }: { hintId: string }) {
  const [open, setOpen] = useState(false);
  const panelId = useId();
  return (
    <div className="flex min-w-0 flex-col gap-2">
      <p id={hintId} className="sr-only">
        Select the image, then use the arrow keys to move it and plus or minus to zoom.
      </p>
      <button
        type="button"
        className={buttonClasses({ variant: "quiet", size: "md", className: "self-start" })}
        aria-expanded={open}
        aria-controls={panelId}
        onClick={() => setOpen((v) => !v)}
      >
        <svg aria-hidden="true" viewBox="0 0 24 24" className="size-5" fill="none" stroke="currentColor" strokeWidth={2} strokeLinecap="round">
          <rect x="2.5" y="6" width="19" height="12" rx="2" />
          <path d="M6 10h.01M10 10h.01M14 10h.01M18 10h.01M7 14h10" />
        </svg>
        Keyboard
        <svg aria-hidden="true" viewBox="0 0 24 24" className={`size-4 transition-transform ${open ? "rotate-180" : ""}`} fill="none" stroke="currentColor" strokeWidth={2}>
          <path d="m6 9 6 6 6-6" />
        </svg>
      </button>
      <div id={panelId} hidden={!open} className="rounded-card border border-line bg-surface-raised p-4">
        <p className="mb-3 text-sm text-ink-muted">Click or tab into the image first; then these keys work:</p>
        <dl className="grid grid-cols-[auto_1fr] gap-x-6 gap-y-2 text-sm">
          {VIEWER_KEYS.map((k) => (
            <div key={k.action} className="contents">
              <dt className="flex flex-wrap gap-1">
                {k.keys.map((key, i) => (
                  <span key={key}>
                    {i > 0 ? <span className="mr-1 text-ink-muted">or</span> : null}
                    <kbd className="rounded border border-line-strong bg-surface-sunken px-1.5 py-0.5 font-mono text-xs">{key}</kbd>
                  </span>
                ))}
              </dt>
              <dd className="text-ink">{k.action}</dd>
            </div>
          ))}
        </dl>
        <p className="mt-3 text-sm text-ink-muted">
          With a mouse: drag to move, hold Ctrl (⌘ on a Mac) and turn the wheel to zoom, double-click to zoom in. On a touch screen: one
          finger scrolls the page; two fingers move and zoom the image.
        </p>
      </div>
    </div>
  );
}
