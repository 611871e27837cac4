import type { ComponentProps, ReactNode } from "react";
import { cx } from "@/components/ui/cx";

export type CheckboxProps = Omit<ComponentProps<"input">, "type"> & {
  label: ReactNode;
  hint?: ReactNode;
};

/** A native checkbox with its label wrapped around it, so the whole line is clickable. */
export function Checkbox({ label, hint, className, id, ...rest }: CheckboxProps) {
  return (
    <label className={cx("flex items-start gap-3 text-base text-ink", className)}>
      <input type="checkbox" id={id} className="mt-1 size-5 shrink-0 accent-accent" {...rest} />
      <span>
        {label}
        {hint ? <span className="block text-sm text-ink-muted">{hint}</span> : null}
      </span>
    </label>
  );
}
