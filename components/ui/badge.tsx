import type { ComponentProps } from "react";
import { cx } from "@/components/ui/cx";

export type BadgeTone = "neutral" | "accent" | "ok" | "warn" | "danger";

// Tinted backgrounds stay faint so the tone's text colour keeps its contrast.
const TONES: Record<BadgeTone, string> = {
  neutral: "border-line-strong bg-surface-raised text-ink-muted",
  accent: "border-accent/50 bg-accent/10 text-accent",
  ok: "border-ok/50 bg-ok/10 text-ok",
  warn: "border-warn/50 bg-warn/10 text-warn",
  danger: "border-danger/50 bg-danger/10 text-danger",
};

export type BadgeProps = ComponentProps<"span"> & { tone?: BadgeTone };

/**
 * A short state label such as "published" or "needs exposure". The word carries
 * the meaning; the tone only repeats it for sighted readers.
 */
export function Badge({ tone = "neutral", className, ...rest }: BadgeProps) {
  return (
    <span
      className={cx(
        "inline-flex items-center gap-1 rounded-full border px-2 py-0.5 text-xs font-medium whitespace-nowrap",
        TONES[tone],
        className,
      )}
      {...rest}
    />
  );
}
