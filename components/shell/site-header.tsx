import Link from "next/link";
import type { ReactNode } from "react";
import { buttonClasses } from "@/components/ui/button";
import { SkipLink } from "@/components/ui/skip-link";
import { CrownlightMark } from "@/components/shell/crownlight-mark";
import { NavLink } from "@/components/shell/nav-link";
import { ThemeToggle } from "@/components/shell/theme-toggle";

export type NavItem = { href: string; label: string; current?: boolean };

export type HeaderUser = { name: string; email: string; roles: string[] };

export type SiteHeaderProps = {
  societyName: string;
  nav: NavItem[];
  user?: HeaderUser | null;
  /** Account controls of the signed-in user, e.g. a sign-out form; the lead owns them. */
  accountSlot?: ReactNode;
  signInHref?: string;
  /** Target of the skip link; the layout's <main id="main" tabIndex={-1}>. */
  mainId?: string;
};

/**
 * The top of every page: skip link, site name, main navigation and the account
 * area. The nav is a plain list that wraps on narrow screens, so it needs no
 * JavaScript and nothing is hidden behind a menu button.
 */
export function SiteHeader({
  societyName,
  nav,
  user,
  accountSlot,
  signInHref = "/sign-in",
  mainId = "main",
}: SiteHeaderProps) {
  return (
    <header className="border-b border-line bg-surface-raised">
      <SkipLink href={`#${mainId}`} />
      <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-3 px-4 py-3 sm:px-6">
        <Link href="/" className="flex items-center gap-3 text-ink no-underline hover:text-ink">
          <CrownlightMark className="size-9 shrink-0 text-accent" />
          <span className="flex flex-col leading-tight">
            <span className="text-lg font-semibold tracking-tight">Crownlight</span>
            <span className="text-sm text-ink-muted">{societyName}</span>
          </span>
        </Link>

        {nav.length > 0 ? (
          <nav aria-label="Main" className="order-last w-full md:order-none md:w-auto md:flex-1 print:hidden">
            <ul className="flex flex-wrap gap-1">
              {nav.map((item) => (
                <li key={item.href}>
                  <NavLink href={item.href} label={item.label} current={item.current} />
                </li>
              ))}
            </ul>
          </nav>
        ) : null}

        <div className="ml-auto flex flex-wrap items-center gap-3 print:hidden">
          <ThemeToggle />
          {user ? (
            <AccountSummary user={user} slot={accountSlot} />
          ) : (
            <Link href={signInHref} className={buttonClasses({ variant: "primary" })}>
              Sign in
            </Link>
          )}
        </div>
      </div>
    </header>
  );
}

function AccountSummary({ user, slot }: { user: HeaderUser; slot?: ReactNode }) {
  return (
    <div className="flex items-center gap-3">
      <p className="flex flex-col text-right leading-tight">
        <span className="text-sm font-medium text-ink">
          <span className="sr-only">Signed in as </span>
          {user.name}
        </span>
        <span className="text-sm text-ink-muted">
          <span className="hidden 2xl:inline">{user.email}</span>
          {user.roles.length > 0 ? (
            <>
              <span className="hidden 2xl:inline" aria-hidden="true">
                {" · "}
              </span>
              <span className="sr-only">, roles: </span>
              {user.roles.join(", ")}
            </>
          ) : null}
        </span>
      </p>
      {slot}
    </div>
  );
}
