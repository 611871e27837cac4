"use client";
import Link from "next/link";
import { usePathname } from "next/navigation";
import { cx } from "@/components/ui/cx";

/**
 * A main-navigation link that marks itself as the current page (aria-current)
 * from the address, since the server layout does not know the path. "/" is
 * current only on the landing page; other entries also cover their sub-pages.
 */
export function NavLink({ href, label, current }: { href: string; label: string; current?: boolean }) {
  const pathname = usePathname();
  const isCurrent = current ?? (href === "/" ? pathname === "/" : pathname === href || pathname.startsWith(`${href}/`));
  return (
    <Link
      href={href}
      aria-current={isCurrent ? "page" : undefined}
      className={cx(
        "inline-flex min-h-11 items-center rounded-control px-3 text-base whitespace-nowrap",
        // The current page is marked by weight and an underline, not colour alone.
        isCurrent
          ? "font-semibold text-ink underline decoration-accent decoration-2 underline-offset-8 hover:text-ink"
          : "text-ink-muted no-underline hover:bg-surface-hover hover:text-ink",
      )}
    >
      {label}
    </Link>
  );
}
