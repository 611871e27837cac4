import type { ReactNode } from "react";
import { cx } from "@/components/ui/cx";

export type SortDirection = "ascending" | "descending" | "none";

export type SortableHeaderProps = {
  children: ReactNode;
  direction: SortDirection;
  /**
   * Where a click leads, for server-rendered sorting through the query string
   * (works without JavaScript). Give either href or onSort.
   */
  href?: string;
  /** Client-side sorting; only usable inside a client component. */
  onSort?: () => void;
  className?: string;
};

const ARROWS: Record<SortDirection, string> = { ascending: "▲", descending: "▼", none: "◆" };

/**
 * A column header that sorts its table. aria-sort sits on the th, as WAI-ARIA
 * asks; the control inside is a real link or button, so it is reachable by
 * keyboard. The arrow is decoration: aria-sort already tells the direction.
 */
export function SortableHeader({ children, direction, href, onSort, className }: SortableHeaderProps) {
  const control = cx(
    "inline-flex items-center gap-1.5 rounded-control font-semibold text-inherit no-underline hover:text-ink",
  );
  const arrow = (
    <span aria-hidden="true" className={cx("text-xs", direction === "none" && "opacity-40")}>
      {ARROWS[direction]}
    </span>
  );
  return (
    <th
      scope="col"
      aria-sort={direction}
      className={cx("border-b border-line-strong px-4 py-2.5 whitespace-nowrap", className)}
    >
      {href !== undefined ? (
        <a href={href} className={control}>
          {children}
          {arrow}
        </a>
      ) : (
        <button type="button" onClick={onSort} className={control}>
          {children}
          {arrow}
        </button>
      )}
    </th>
  );
}
