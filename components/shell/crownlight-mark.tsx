import type { ComponentProps } from "react";

/**
 * Our mark: a dark disk inside a thin bright ring with uneven streamers. Drawn in
 * currentColor on the page background so it follows the theme. Decorative: the
 * text next to it names the site.
 */
export function CrownlightMark({ className, ...rest }: ComponentProps<"svg">) {
  return (
    <svg viewBox="0 0 64 64" aria-hidden="true" focusable="false" className={className} {...rest}>
      <g fill="none" stroke="currentColor" strokeLinecap="round">
        <path
          d="M32 10v-4M50 18l4-4M54 34h5M46 50l3 4M14 16l-3-3M9 38H5M20 52l-2 4"
          strokeWidth="2.4"
          opacity="0.75"
        />
        <circle cx="32" cy="32" r="15.5" strokeWidth="3" />
      </g>
    </svg>
  );
}
