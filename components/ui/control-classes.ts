import { cx } from "@/components/ui/cx";

/**
 * Shared look of text inputs, selects and text areas. Borders use line-strong
 * (at least 3:1 against every surface, WCAG 1.4.11); an invalid control turns its
 * border to the danger colour and thickens it, so the state does not rest on
 * colour alone together with the field's error text.
 */
export function controlClasses(className?: string): string {
  return cx(
    "block w-full rounded-control border border-line-strong bg-surface-sunken px-3 py-2 text-base text-ink",
    "placeholder:text-ink-muted",
    "disabled:cursor-not-allowed disabled:opacity-60",
    "aria-invalid:border-2 aria-invalid:border-danger",
    className,
  );
}
