"use client";
import type { ReactNode } from "react";
import { cx } from "@/components/ui/cx";

// The viewer's control strip, laid out as an instrument panel: three labelled
// groups (magnify, turn, view) on one sunken strip, each a joined row of real
// buttons with visible words where an icon alone would be a guess. Colours
// are the app's tokens, so night red dims it like the rest of the page; the
// focus ring is the app's global one.

const SEGMENT =
  "inline-flex min-h-11 min-w-11 items-center justify-center gap-1.5 px-3 text-sm font-medium text-ink " +
  "bg-surface-raised hover:bg-surface-hover disabled:cursor-not-allowed disabled:opacity-50 " +
  "aria-pressed:bg-accent aria-pressed:text-on-accent first:rounded-l-control last:rounded-r-control focus-visible:relative focus-visible:z-10";

/** Quarter-turn arrows, one the mirror of the other. */
const TURN_ICONS = {
  left: (
    <>
      <path d="M9 4 5 8l4 4" />
      <path d="M5 8h8a6 6 0 0 1 0 12h-2" />
    </>
  ),
  right: (
    <>
      <path d="m15 4 4 4-4 4" />
      <path d="M19 8h-8a6 6 0 0 0 0 12h2" />
    </>
  ),
};

function Segment({
  label,
  onClick,
  disabled,
  pressed,
  icon,
  text,
  keys,
}: {
  label: string;
  onClick: () => void;
  disabled?: boolean;
  pressed?: boolean;
  icon: ReactNode;
  /** Visible words beside the icon (hidden on the narrowest screens when marked so). */
  text?: string;
  /** The keyboard equivalent, shown as a tooltip and told to screen readers. */
  keys?: string;
}) {
  return (
    <button
      type="button"
      className={SEGMENT}
      onClick={onClick}
      disabled={disabled}
      aria-pressed={pressed}
      aria-label={text ? undefined : label}
      aria-keyshortcuts={keys}
      title={keys ? `${label} (${keys})` : label}
    >
      <svg aria-hidden="true" viewBox="0 0 24 24" className="size-5 shrink-0" fill="none" stroke="currentColor" strokeWidth={1.8} strokeLinecap="round" strokeLinejoin="round">
        {icon}
      </svg>
      {text ? <span>{text}</span> : null}
    </button>
  );
}

function Group({ name, note, children }: { name: string; note?: string; children: ReactNode }) {
  return (
    <div role="group" aria-label={name} className="flex flex-col gap-1">
      <span aria-hidden="true" className="px-1 text-[0.6875rem] font-semibold uppercase tracking-[0.14em] text-ink-muted">
        {name}
        {note ? <span className="normal-case tracking-normal"> · {note}</span> : null}
      </span>
      <div className="inline-flex divide-x divide-line-strong overflow-hidden rounded-control border border-line-strong">{children}</div>
    </div>
  );
}

export interface ViewerToolbarProps {
  disabled: boolean;
  fullPage: boolean;
  /** "2.3×": follows every zoom at once, before the animation ends. */
  zoomReadout: string;
  /** Clockwise turn of the image in degrees. */
  rotationDeg: number;
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
    <div
      role="toolbar"
      aria-label="Image controls"
      className="flex flex-wrap items-end gap-x-5 gap-y-3 rounded-card border border-line bg-surface-sunken px-3 py-2.5"
      data-testid="viewer-toolbar"
    >
      <Group name="Magnify">
        <Segment label="Zoom out" keys="-" onClick={p.onZoomOut} disabled={p.disabled} icon={<path d="M5 12h14" />} />
        <output
          aria-label="Zoom"
          className={cx("inline-flex min-h-11 min-w-16 items-center justify-center bg-surface px-2 font-mono text-sm tabular-nums text-ink", p.disabled && "text-ink-muted")}
          data-testid="zoom-readout"
        >
          {p.disabled ? "–" : p.zoomReadout}
        </output>
        <Segment label="Zoom in" keys="+" onClick={p.onZoomIn} disabled={p.disabled} icon={<path d="M5 12h14M12 5v14" />} />
        <Segment
          label="Fit the whole image"
          keys="0"
          text="Fit"
          onClick={p.onHome}
          disabled={p.disabled}
          icon={<path d="M4 9V5a1 1 0 0 1 1-1h4M15 4h4a1 1 0 0 1 1 1v4M20 15v4a1 1 0 0 1-1 1h-4M9 20H5a1 1 0 0 1-1-1v-4" />}
        />
      </Group>
      <Group name="Turn" note={p.disabled ? undefined : `${Math.round(p.rotationDeg)}°`}>
        <Segment label="Turn a quarter left" keys="Shift+R" onClick={p.onRotateLeft} disabled={p.disabled} icon={TURN_ICONS.left} />
        <Segment label="Turn a quarter right" keys="R" onClick={p.onRotateRight} disabled={p.disabled} icon={TURN_ICONS.right} />
      </Group>
      <Group name="View">
        <Segment
          label={p.fullPage ? "Leave full page" : "Full page"}
          text={p.fullPage ? "Leave full page" : "Full page"}
          keys={p.fullPage ? "Escape" : undefined}
          onClick={p.onFullPage}
          pressed={p.fullPage}
          icon={p.fullPage ? <path d="M9 4v5H4M15 4v5h5M9 20v-5H4M15 20v-5h5" /> : <path d="M4 9V4h5M20 9V4h-5M4 15v5h5M20 15v5h-5" />}
        />
      </Group>
    </div>
  );
}
