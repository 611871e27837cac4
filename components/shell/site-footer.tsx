import type { ReactNode } from "react";

export type SiteFooterProps = {
  /** Licence of the site's own text; each plate states its image licence itself. */
  textLicence: { name: string; href: string };
  /** Extra footer content such as links to the society or the privacy page. */
  children?: ReactNode;
};

export function SiteFooter({ textLicence, children }: SiteFooterProps) {
  return (
    <footer className="mt-16 border-t border-line bg-surface-raised">
      <div className="mx-auto flex max-w-7xl flex-col gap-3 px-4 py-8 text-sm text-ink-muted sm:px-6">
        {children}
        <p>
          Text on this site is available under the{" "}
          <a href={textLicence.href} rel="license">
            {textLicence.name}
          </a>{" "}
          licence unless stated otherwise. Images carry their own licence and credits on each plate.
        </p>
      </div>
    </footer>
  );
}
