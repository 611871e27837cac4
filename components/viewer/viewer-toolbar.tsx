"use client";
import type { ReactNode } from "react";
import { cx } from "@/components/ui/cx";

const ICON_BUTTON =
  "inline-flex size-11 items-center justify-center rounded-control border border-line-strong bg-surface-raised text-ink " +
  "hover:bg-surface-hover disabled:cursor-not-allowed disabled:opacity-60 aria-pressed:bg-accent aria-pressed:text-on-accent";

function IconButton({ label, onClick, disabled, pressed, children }: { label: string; onClick: () => void; disabled?: boolean; pressed?: boolean; children: ReactNode }) {
  return (
    <button type="button" className={ICON_BUTTON} onClick={onClick} disabled={disabled} aria-pressed={pressed} title={label}>
      <svg aria-hidden="true" viewBox="0 0 24 24" className="size-5" fill="none" stroke="currentColor" strokeWidth={2} strokeLinecap="round" strokeLinejoin="round">
        {children}
      </svg>
      <span className="sr-only">{label}</span>
    </button>
  );
}

export interface ViewerToolbarProps {
  disabled: boolean;
  fullPage: boolean;
  zoomReadout: string;
  onZoomIn: () => void;
  onZoomOut: () => void;
  onHome: () => void;
  onRotateLeft: () => void;
  onRotateRight: () => void;
  onFullPage: () => void;
}

/** Real buttons for what the mouse and keys do on the image, with names a screen reader reads. */
export function ViewerToolbar(p: ViewerToolbarProps) {
  return (
    <div role="group" aria-label="Image controls" className="flex flex-wrap items-center gap-2">
      <IconButton label="Zoom in" onClick={p.onZoomIn} disabled={p.disabled}>
        <circle cx="11" cy="11" r="7" />
        <path d="M11 8v6M8 11h6M16.5 16.5 21 21" />
      </IconButton>
      <IconButton label="Zoom out" onClick={p.onZoomOut} disabled={p.disabled}>
        <circle cx="11" cy="11" r="7" />
        <path d="M8 11h6M16.5 16.5 21 21" />
      </IconButton>
      <IconButton label="Show the whole image" onClick={p.onHome} disabled={p.disabled}>
        <path d="M4 9V4h5M20 9V4h-5M4 15v5h5M20 15v5h-5" />
      </IconButton>
      <IconButton label="Rotate left a quarter turn" onClick={p.onRotateLeft} disabled={p.disabled}>
        <path d="M4 4v5h5" />
        <path d="M4.5 9A8 8 0 1 1 6 17" />
      </IconButton>
      <IconButton label="Rotate right a quarter turn" onClick={p.onRotateRight} disabled={p.disabled}>
        <path d="M20 4v5h-5" />
        <path d="M19.5 9A8 8 0 1 0 18 17" />
      </IconButton>
      <IconButton label={p.fullPage ? "Leave full page" : "Full page"} onClick={p.onFullPage} pressed={p.fullPage}>
        {p.fullPage ? <path d="M9 4v5H4M15 4v5h5M9 20v-5H4M15 20v-5h5" /> : <path d="M4 9V4h5M20 9V4h-5M4 15v5h5M20 15v5h-5M9 9h6v6H9z" />}
      </IconButton>
      <span className={cx("ml-1 font-mono text-sm tabular-nums text-ink-muted", p.disabled && "invisible")} aria-hidden="true">
        {p.zoomReadout}
      </span>
    </div>
  );
}
