import type { ComponentProps } from "react";
import { cx } from "@/components/ui/cx";

export type ButtonVariant = "primary" | "secondary" | "quiet" | "danger";
export type ButtonSize = "sm" | "md" | "lg";

const BASE =
  "inline-flex items-center justify-center gap-2 rounded-control font-medium no-underline " +
  "transition-colors select-none whitespace-nowrap " +
  "disabled:cursor-not-allowed disabled:opacity-60 aria-disabled:cursor-not-allowed aria-disabled:opacity-60";

const VARIANTS: Record<ButtonVariant, string> = {
  primary: "bg-accent text-on-accent hover:bg-accent-hover hover:text-on-accent",
  secondary:
    "border border-line-strong bg-surface-raised text-ink hover:bg-surface-hover hover:text-ink",
  quiet: "bg-transparent text-ink hover:bg-surface-hover hover:text-ink",
  danger: "bg-danger text-on-danger hover:opacity-90 hover:text-on-danger",
};

// Heights keep a 44px target at md and lg (WCAG 2.5.5); sm is for dense tables.
const SIZES: Record<ButtonSize, string> = {
  sm: "min-h-8 px-3 text-sm",
  md: "min-h-11 px-4 text-base",
  lg: "min-h-12 px-6 text-lg",
};

export type ButtonStyle = { variant?: ButtonVariant; size?: ButtonSize; className?: string };

/** Classes of a button, for links and summaries that must look like one. */
export function buttonClasses({ variant = "secondary", size = "md", className }: ButtonStyle = {}): string {
  return cx(BASE, VARIANTS[variant], SIZES[size], className);
}

export type ButtonProps = ComponentProps<"button"> &
  ButtonStyle & {
    /** Work in progress: the button is busy and cannot be pressed again. */
    pending?: boolean;
    /** Text shown while pending, e.g. "Saving…"; defaults to the children. */
    pendingLabel?: string;
  };

/**
 * A native button. It has no handlers of its own so it renders as a server
 * component; type defaults to "button" so it never submits a form by accident.
 */
export function Button({
  variant,
  size,
  className,
  pending = false,
  pendingLabel,
  type = "button",
  disabled,
  children,
  ...rest
}: ButtonProps) {
  return (
    <button
      type={type}
      className={buttonClasses({ variant, size, className })}
      disabled={disabled || pending}
      aria-busy={pending || undefined}
      {...rest}
    >
      {pending ? <Spinner /> : null}
      {pending && pendingLabel ? pendingLabel : children}
    </button>
  );
}

function Spinner() {
  return (
    <svg
      aria-hidden="true"
      viewBox="0 0 16 16"
      className="size-4 animate-spin motion-reduce:animate-none"
    >
      <circle cx="8" cy="8" r="6" fill="none" stroke="currentColor" strokeOpacity="0.3" strokeWidth="2" />
      <path d="M14 8a6 6 0 0 0-6-6" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
    </svg>
  );
}
