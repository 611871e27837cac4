import type { ComponentProps } from "react";

/** Text for assistive technology only: read aloud, not drawn. */
export function VisuallyHidden({ className, ...rest }: ComponentProps<"span">) {
  return <span className={`sr-only ${className ?? ""}`} {...rest} />;
}
