import type { ReactNode } from "react";
import { cx } from "@/components/ui/cx";

export type EmptyStateProps = {
  title: ReactNode;
  message?: ReactNode;
  /** A next step, usually a link styled with buttonClasses(). */
  action?: ReactNode;
  /** Heading level that fits the page outline; defaults to h2. */
  headingLevel?: 2 | 3 | 4;
  className?: string;
};

/** What a list or page shows when it has nothing yet, and what to do about it. */
export function EmptyState({ title, message, action, headingLevel = 2, className }: EmptyStateProps) {
  const Heading = `h${headingLevel}` as const;
  return (
    <div
      className={cx(
        "flex flex-col items-center gap-3 rounded-card border border-dashed border-line-strong px-6 py-10 text-center",
        className,
      )}
    >
      <Heading className="text-lg font-semibold text-ink">{title}</Heading>
      {message ? <p className="max-w-prose text-base text-ink-muted">{message}</p> : null}
      {action ? <div className="mt-2">{action}</div> : null}
    </div>
  );
}
