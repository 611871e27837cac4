import { useId, type ReactNode } from "react";
import { cx } from "@/components/ui/cx";

export type ProgressBarProps = {
  label: ReactNode;
  /** Current amount; leave undefined when the amount of work is not known yet. */
  value?: number;
  max?: number;
  /** Spoken and shown value, e.g. "12 of 40 frames"; defaults to a percentage. */
  valueText?: string;
  tone?: "accent" | "ok" | "danger";
  className?: string;
};

const FILL = { accent: "bg-accent", ok: "bg-ok", danger: "bg-danger" } as const;

/**
 * A labelled progress bar (role progressbar, WAI-ARIA). Not a live region: a
 * page that wants progress announced pairs it with a polite status message.
 */
export function ProgressBar({ label, value, max = 100, valueText, tone = "accent", className }: ProgressBarProps) {
  const labelId = useId();
  const isKnown = value !== undefined && Number.isFinite(value) && max > 0;
  const clamped = isKnown ? Math.min(Math.max(value, 0), max) : 0;
  const percent = isKnown ? Math.round((clamped / max) * 100) : undefined;
  const text = valueText ?? (percent !== undefined ? `${percent}%` : undefined);

  return (
    <div className={cx("flex flex-col gap-1.5", className)}>
      <div className="flex items-baseline justify-between gap-3 text-sm">
        <span id={labelId} className="font-medium text-ink">
          {label}
        </span>
        {text ? <span className="font-mono text-ink-muted">{text}</span> : null}
      </div>
      <div
        role="progressbar"
        aria-labelledby={labelId}
        aria-valuemin={isKnown ? 0 : undefined}
        aria-valuemax={isKnown ? max : undefined}
        aria-valuenow={isKnown ? clamped : undefined}
        aria-valuetext={text}
        className="h-2.5 w-full overflow-hidden rounded-full border border-line-strong bg-surface-sunken"
      >
        {isKnown ? (
          <div className={cx("h-full transition-[width]", FILL[tone])} style={{ width: `${percent}%` }} />
        ) : (
          // Unknown amount: a sliding band, or a still half-tint when motion is reduced.
          <div
            className={cx(
              "h-full w-2/5 animate-indeterminate motion-reduce:w-full motion-reduce:animate-none motion-reduce:opacity-40",
              FILL[tone],
            )}
          />
        )}
      </div>
    </div>
  );
}
