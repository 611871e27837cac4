import type { ComponentProps } from "react";
import { controlClasses } from "@/components/ui/control-classes";

export type InputProps = ComponentProps<"input">;

/** A native text-like input with our control styling; every native prop passes through. */
export function Input({ className, type = "text", ...rest }: InputProps) {
  return <input type={type} className={controlClasses(className)} {...rest} />;
}
