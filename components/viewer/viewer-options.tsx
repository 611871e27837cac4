"use client";
import { useId } from "react";
import { cx } from "@/components/ui/cx";
import type { OverlayAvailability } from "./overlay-geometry";
import { OVERLAY_KEYS, type OverlayKey, type RenditionKey, type ViewerMapLayer, type ViewerRendition } from "./types";

const OVERLAY_LABELS: Record<OverlayKey, string> = {
  rings: "Rings at 1 to 4 solar radii",
  moon: "Moon's outline",
  north: "Solar north and east",
  scale: "Scale bar",
};

/** The rendition switch: native radio buttons (arrow keys move between them) drawn as one segmented control. */
export function RenditionSwitch({
  renditions,
  value,
  onChange,
  comparing,
  unavailable,
}: {
  renditions: ViewerRendition[];
  value: RenditionKey;
  onChange: (key: RenditionKey) => void;
  comparing: boolean;
  unavailable: ReadonlySet<RenditionKey>;
}) {
  const noteId = useId();
  const name = useId();
  return (
    <fieldset disabled={comparing} aria-describedby={comparing ? noteId : undefined} className="min-w-0">
      <legend className="mb-1 text-sm font-medium text-ink">Rendition</legend>
      <div className="inline-flex rounded-control border border-line-strong bg-surface-sunken p-0.5">
        {renditions.map((r) => (
          <label
            key={r.key}
            className={cx(
              "relative flex min-h-10 cursor-pointer items-center rounded-control px-4 text-sm font-medium",
              "has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-offset-2 has-[:focus-visible]:outline-focus",
              value === r.key && !comparing ? "bg-accent text-on-accent" : "text-ink hover:bg-surface-hover",
              (comparing || unavailable.has(r.key)) && "cursor-not-allowed opacity-60",
            )}
          >
            <input
              type="radio"
              name={name}
              value={r.key}
              checked={value === r.key}
              disabled={unavailable.has(r.key)}
              onChange={() => onChange(r.key)}
              className="sr-only"
            />
            {r.label}
          </label>
        ))}
      </div>
      {comparing ? (
        <p id={noteId} className="mt-1 text-sm text-ink-muted">
          Both renditions show while the curtain is on.
        </p>
      ) : null}
    </fieldset>
  );
}

/** Curtain comparison: a switch, and a range input that moves the curtain from the keyboard. */
export function CurtainControl({
  left,
  right,
  curtain,
  onToggle,
  onMove,
  unavailableReason,
}: {
  left: ViewerRendition | undefined;
  right: ViewerRendition | undefined;
  curtain: number | null;
  onToggle: (on: boolean) => void;
  onMove: (fraction: number) => void;
  unavailableReason: string | null;
}) {
  const reasonId = useId();
  const rangeId = useId();
  const percent = Math.round((curtain ?? 0.5) * 100);
  return (
    <div className="flex min-w-0 flex-col gap-2">
      <label className="flex items-center gap-3 text-sm font-medium text-ink">
        <input
          type="checkbox"
          className="size-5 accent-accent"
          checked={curtain !== null}
          disabled={unavailableReason !== null}
          aria-describedby={unavailableReason ? reasonId : undefined}
          onChange={(e) => onToggle(e.target.checked)}
        />
        Compare with a curtain
      </label>
      {unavailableReason ? (
        <p id={reasonId} className="text-sm text-ink-muted">
          {unavailableReason}
        </p>
      ) : null}
      {curtain !== null && left && right ? (
        <div className="flex flex-col gap-1">
          <label htmlFor={rangeId} className="text-sm text-ink">
            Curtain position: {left.label} on the left, {right.label} on the right
          </label>
          <input
            id={rangeId}
            type="range"
            min={0}
            max={100}
            step={1}
            value={percent}
            aria-valuetext={`${percent} % of the width`}
            onChange={(e) => onMove(Number(e.target.value) / 100)}
            className="w-full max-w-xs accent-accent"
          />
        </div>
      ) : null}
    </div>
  );
}

/** One labelled checkbox per overlay; an overlay without data is off, disabled, and says why. */
export function OverlayToggles({
  availability,
  on,
  onChange,
}: {
  availability: Record<OverlayKey, OverlayAvailability>;
  on: ReadonlySet<OverlayKey>;
  onChange: (key: OverlayKey, on: boolean) => void;
}) {
  const baseId = useId();
  return (
    <fieldset className="min-w-0">
      <legend className="mb-1 text-sm font-medium text-ink">Overlays</legend>
      <ul className="flex flex-col gap-1.5">
        {OVERLAY_KEYS.map((key) => {
          const a = availability[key];
          const reasonId = `${baseId}-${key}`;
          return (
            <li key={key}>
              <label className={cx("flex items-start gap-3 text-sm text-ink", !a.available && "cursor-not-allowed")}>
                <input
                  type="checkbox"
                  className="mt-0.5 size-5 shrink-0 accent-accent"
                  checked={a.available && on.has(key)}
                  disabled={!a.available}
                  aria-describedby={a.available ? undefined : reasonId}
                  onChange={(e) => onChange(key, e.target.checked)}
                />
                <span className={cx(!a.available && "opacity-60")}>{OVERLAY_LABELS[key]}</span>
              </label>
              {a.available ? null : (
                <p id={reasonId} className="ml-8 text-sm text-ink-muted">
                  {a.reason}
                </p>
              )}
            </li>
          );
        })}
      </ul>
    </fieldset>
  );
}

/** The map over the renditions (a composite's contribution map): a checkbox and the legend of its colours. */
export function MapLayerToggle({ layer, shown, available, disabled, onChange }: { layer: ViewerMapLayer; shown: boolean; available: boolean; disabled: boolean; onChange: (on: boolean) => void }) {
  const legendId = useId();
  return (
    <div className="flex min-w-0 flex-col gap-2">
      <label className={cx("flex items-center gap-3 text-sm font-medium text-ink", (!available || disabled) && "cursor-not-allowed opacity-60")}>
        <input type="checkbox" className="size-5 accent-accent" checked={shown && available} disabled={!available || disabled} aria-describedby={legendId} onChange={(e) => onChange(e.target.checked)} />
        {layer.label}
      </label>
      <ul id={legendId} className="ml-8 flex flex-col gap-1 text-sm text-ink-muted">
        {layer.legend.map((item) => (
          <li key={item.label} className="flex items-center gap-2">
            <span aria-hidden="true" className="inline-block size-3 shrink-0 rounded-sm border border-line" style={{ backgroundColor: item.colour }} />
            <span>{item.label}</span>
          </li>
        ))}
        {available || disabled ? null : <li>The map could not be loaded.</li>}
      </ul>
    </div>
  );
}
