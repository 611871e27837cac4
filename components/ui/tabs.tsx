"use client";

import { useId, useRef, useState, type KeyboardEvent, type ReactNode } from "react";
import { cx } from "@/components/ui/cx";

export type TabItem = {
  /** Stable key, also used in element ids; letters, digits and dashes. */
  id: string;
  label: ReactNode;
  content: ReactNode;
  disabled?: boolean;
};

export type TabsProps = {
  /** Accessible name of the tab list, e.g. "Renditions". */
  label: string;
  items: TabItem[];
  defaultSelectedId?: string;
  /** Controlled selection; pair with onSelectedChange. */
  selectedId?: string;
  onSelectedChange?: (id: string) => void;
  className?: string;
};

/**
 * The WAI-ARIA tabs pattern with automatic activation: one tab stop for the
 * list (roving tabindex), Left and Right arrows move and select, Home and End
 * jump to the ends, disabled tabs are skipped. Inactive panels stay in the DOM,
 * hidden, so server-rendered content is not thrown away.
 */
export function Tabs({ label, items, defaultSelectedId, selectedId, onSelectedChange, className }: TabsProps) {
  const baseId = useId();
  const enabled = items.filter((item) => !item.disabled);
  const [ownSelectedId, setOwnSelectedId] = useState(defaultSelectedId ?? enabled[0]?.id);
  const currentId = selectedId ?? ownSelectedId;
  const tabRefs = useRef(new Map<string, HTMLButtonElement>());

  function select(id: string) {
    if (selectedId === undefined) setOwnSelectedId(id);
    onSelectedChange?.(id);
  }

  function handleKeyDown(event: KeyboardEvent<HTMLButtonElement>) {
    const index = enabled.findIndex((item) => item.id === currentId);
    const last = enabled.length - 1;
    const nextIndex =
      event.key === "ArrowRight" ? (index >= last ? 0 : index + 1)
      : event.key === "ArrowLeft" ? (index <= 0 ? last : index - 1)
      : event.key === "Home" ? 0
      : event.key === "End" ? last
      : null;
    if (nextIndex === null || !enabled[nextIndex]) return;
    event.preventDefault();
    const next = enabled[nextIndex].id;
    select(next);
    tabRefs.current.get(next)?.focus();
  }

  return (
    <div className={cx("flex flex-col gap-4", className)}>
      <div role="tablist" aria-label={label} className="flex flex-wrap gap-1 border-b border-line">
        {items.map((item) => {
          const isSelected = item.id === currentId;
          return (
            <button
              key={item.id}
              ref={(node) => {
                if (node) tabRefs.current.set(item.id, node);
                else tabRefs.current.delete(item.id);
              }}
              type="button"
              role="tab"
              id={`${baseId}-tab-${item.id}`}
              aria-selected={isSelected}
              aria-controls={`${baseId}-panel-${item.id}`}
              tabIndex={isSelected ? 0 : -1}
              disabled={item.disabled}
              onClick={() => select(item.id)}
              onKeyDown={handleKeyDown}
              className={cx(
                "-mb-px min-h-11 border-b-2 px-4 text-base font-medium transition-colors",
                "disabled:cursor-not-allowed disabled:opacity-50",
                isSelected
                  ? "border-accent text-ink"
                  : "border-transparent text-ink-muted hover:border-line-strong hover:text-ink",
              )}
            >
              {item.label}
            </button>
          );
        })}
      </div>
      {items.map((item) => (
        <div
          key={item.id}
          role="tabpanel"
          id={`${baseId}-panel-${item.id}`}
          aria-labelledby={`${baseId}-tab-${item.id}`}
          hidden={item.id !== currentId}
          tabIndex={0}
        >
          {item.content}
        </div>
      ))}
    </div>
  );
}
