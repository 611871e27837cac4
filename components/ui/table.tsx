import { useId, type ComponentProps, type ReactNode } from "react";
import { cx } from "@/components/ui/cx";

export type TableProps = ComponentProps<"table"> & {
  /** Every table says what it lists; hide it visually only when a heading already does. */
  caption: ReactNode;
  captionHidden?: boolean;
  /** Class of the scrolling wrapper that keeps wide tables usable on phones. */
  wrapperClassName?: string;
};

/**
 * A semantic table. The wrapper scrolls sideways on narrow screens and is focusable
 * and labelled by the caption so keyboard users can scroll it too. Positioned
 * (relative) so that visually hidden labels inside it (sr-only, absolutely
 * positioned) stay inside the scroll box instead of widening the page.
 */
export function Table({ caption, captionHidden = false, wrapperClassName, className, children, ...rest }: TableProps) {
  const captionId = useId();
  return (
    <div
      className={cx("relative w-full overflow-x-auto rounded-card border border-line", wrapperClassName)}
      tabIndex={0}
      role="region"
      aria-labelledby={captionId}
    >
      <table className={cx("w-full border-collapse text-left text-sm", className)} {...rest}>
        <caption
          id={captionId}
          className={cx(
            captionHidden ? "sr-only" : "px-4 py-3 text-left text-base font-semibold text-ink",
          )}
        >
          {caption}
        </caption>
        {children}
      </table>
    </div>
  );
}

export function TableHead({ className, ...rest }: ComponentProps<"thead">) {
  return <thead className={cx("bg-surface-raised text-ink-muted", className)} {...rest} />;
}

export function TableBody({ className, ...rest }: ComponentProps<"tbody">) {
  return <tbody className={cx("divide-y divide-line", className)} {...rest} />;
}

export function TableRow({ className, ...rest }: ComponentProps<"tr">) {
  return <tr className={cx("hover:bg-surface-hover", className)} {...rest} />;
}

/** A header cell; scope defaults to "col". */
export function TableHeader({ className, scope = "col", ...rest }: ComponentProps<"th">) {
  return (
    <th
      scope={scope}
      className={cx("border-b border-line-strong px-4 py-2.5 font-semibold whitespace-nowrap", className)}
      {...rest}
    />
  );
}

export function TableCell({ className, ...rest }: ComponentProps<"td">) {
  return <td className={cx("px-4 py-2.5 align-top text-ink", className)} {...rest} />;
}

export type TableEmptyRowProps = { colSpan: number; children: ReactNode };

/** The one row a table shows when it has no data, so the caption and headers stay. */
export function TableEmptyRow({ colSpan, children }: TableEmptyRowProps) {
  return (
    <tr>
      <td colSpan={colSpan} className="px-4 py-8 text-center text-ink-muted">
        {children}
      </td>
    </tr>
  );
}
