import type { ComponentProps } from "react";
import { controlClasses } from "@/components/ui/control-classes";

export type SelectOption = { value: string; label: string; disabled?: boolean };

export type SelectProps = ComponentProps<"select"> & {
  /** Options as data; children may be given instead (for optgroups). */
  options?: SelectOption[];
  /** A first, empty option such as "Choose a kit"; its value is "". */
  placeholder?: string;
};

/** A native select: keyboard and screen reader behaviour come from the browser. */
export function Select({ className, options, placeholder, children, ...rest }: SelectProps) {
  return (
    <select className={controlClasses(`pr-8 ${className ?? ""}`)} {...rest}>
      {placeholder !== undefined ? <option value="">{placeholder}</option> : null}
      {options?.map((option) => (
        <option key={option.value} value={option.value} disabled={option.disabled}>
          {option.label}
        </option>
      ))}
      {children}
    </select>
  );
}
