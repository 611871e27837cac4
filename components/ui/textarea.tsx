import type { ComponentProps } from "react";
import { controlClasses } from "@/components/ui/control-classes";

export type TextareaProps = ComponentProps<"textarea">;

/** A native text area; vertical resize only so it never breaks the page width. */
export function Textarea({ className, rows = 4, ...rest }: TextareaProps) {
  return <textarea rows={rows} className={controlClasses(`resize-y ${className ?? ""}`)} {...rest} />;
}
