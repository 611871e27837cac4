import type { ComponentProps } from "react";
import { cx } from "@/components/ui/cx";

export type SkipLinkProps = Omit<ComponentProps<"a">, "href"> & { href?: string };

/**
 * The first stop of the keyboard: hidden until focused, then shown on top, so
 * keyboard users can pass the header. The target (#main) should carry tabIndex={-1}.
 */
export function SkipLink({ href = "#main", children = "Skip to main content", className, ...rest }: SkipLinkProps) {
  return (
    <a
      href={href}
      className={cx(
        "sr-only focus:not-sr-only focus:fixed focus:top-3 focus:left-3 focus:z-50",
        "focus:rounded-control focus:bg-accent focus:px-4 focus:py-3 focus:font-medium focus:text-on-accent",
        className,
      )}
      {...rest}
    >
      {children}
    </a>
  );
}
