"use client";

import { useEffect, useId, useRef, type ReactNode } from "react";
import { cx } from "@/components/ui/cx";

export type DialogProps = {
  open: boolean;
  /** Called whenever the dialog closes by itself: Escape, the close button, the backdrop. */
  onClose: () => void;
  title: ReactNode;
  description?: ReactNode;
  children?: ReactNode;
  /** Buttons at the bottom, e.g. Cancel and Confirm. */
  actions?: ReactNode;
  /** Clicking outside closes; turn off for dialogs that hold unsaved input. */
  dismissOnBackdrop?: boolean;
  closeLabel?: string;
  size?: "sm" | "md" | "lg";
  className?: string;
};

const WIDTHS = { sm: "max-w-sm", md: "max-w-lg", lg: "max-w-3xl" } as const;

/**
 * A modal on the native <dialog>: showModal() gives the focus trap, the inert
 * page behind and Escape for free. Controlled by `open`. Focus goes back to
 * whatever had it before opening, since not every browser does that itself.
 */
export function Dialog({
  open,
  onClose,
  title,
  description,
  children,
  actions,
  dismissOnBackdrop = true,
  closeLabel = "Close",
  size = "md",
  className,
}: DialogProps) {
  const ref = useRef<HTMLDialogElement>(null);
  const returnFocusTo = useRef<HTMLElement | null>(null);
  const titleId = useId();
  const descriptionId = useId();

  useEffect(() => {
    const dialog = ref.current;
    if (!dialog) return;
    if (open && !dialog.open) {
      returnFocusTo.current = document.activeElement instanceof HTMLElement ? document.activeElement : null;
      dialog.showModal();
    } else if (!open && dialog.open) {
      dialog.close();
    }
  }, [open]);

  // Unmounting an open dialog must not strand focus on <body>.
  useEffect(() => () => returnFocusTo.current?.focus(), []);

  function handleClose() {
    returnFocusTo.current?.focus();
    returnFocusTo.current = null;
    if (open) onClose();
  }

  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      aria-describedby={description ? descriptionId : undefined}
      onClose={handleClose}
      onClick={(event) => {
        // A click on the <dialog> itself, not on its content, landed on the backdrop.
        if (dismissOnBackdrop && event.target === event.currentTarget) event.currentTarget.close();
      }}
      className={cx(
        "m-auto w-[calc(100%-2rem)] rounded-card border border-line-strong bg-surface-raised p-0 text-ink shadow-raised",
        WIDTHS[size],
        className,
      )}
    >
      <div className="flex flex-col gap-4 p-5 sm:p-6">
        <div className="flex items-start justify-between gap-4">
          <div className="flex flex-col gap-1">
            <h2 id={titleId} className="text-lg font-semibold text-ink">
              {title}
            </h2>
            {description ? (
              <p id={descriptionId} className="text-sm text-ink-muted">
                {description}
              </p>
            ) : null}
          </div>
          <button
            type="button"
            onClick={() => ref.current?.close()}
            className="-m-1 inline-flex size-9 shrink-0 items-center justify-center rounded-control text-ink-muted hover:bg-surface-hover hover:text-ink"
          >
            <span aria-hidden="true">✕</span>
            <span className="sr-only">{closeLabel}</span>
          </button>
        </div>
        {children ? <div className="text-base">{children}</div> : null}
        {actions ? <div className="flex flex-wrap justify-end gap-3">{actions}</div> : null}
      </div>
    </dialog>
  );
}
