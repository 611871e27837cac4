import type { Metadata } from "next";
import { headers } from "next/headers";
import type { ReactNode } from "react";
import { SiteFooter } from "@/components/shell/site-footer";
import { SiteHeader } from "@/components/shell/site-header";
import { ThemeScript } from "@/components/shell/theme-script";
import { SignOutButton } from "@/components/auth/sign-out-button";
import { Providers } from "@/components/data/providers";
import { getDb } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { navFor } from "@/lib/auth/nav";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { currentActor } from "./_server/actor";
import { mono, sans } from "./fonts";
import "./globals.css";

// Every page depends on the session and the society's settings.
export const dynamic = "force-dynamic";

export async function generateMetadata(): Promise<Metadata> {
  const settings = await findSocietySettings(getDb());
  return {
    title: { default: settings.name, template: `%s · ${settings.shortName}` },
    description: `${settings.name}: eclipse photographs of the corona, from bracket to print.`,
  };
}

export default async function RootLayout({ children }: { children: ReactNode }) {
  const [settings, actor, requestHeaders] = await Promise.all([findSocietySettings(getDb()), currentActor(), headers()]);
  const nav = navFor(actor?.roles ?? []).map((e) => ({ href: e.href, label: e.label }));
  return (
    <html lang="en" className={`${sans.variable} ${mono.variable}`} suppressHydrationWarning>
      <head>
        {/* proxy.ts sends the nonce the Content-Security-Policy allows. */}
        <ThemeScript nonce={requestHeaders.get("x-nonce") ?? undefined} />
      </head>
      <body className="flex min-h-screen flex-col bg-surface font-sans text-ink antialiased">
        <Providers>
          <SiteHeader
            societyName={settings.name}
            nav={nav}
            user={actor ? { name: actor.name, email: actor.email, roles: actor.roles.map((r) => ROLE_LABELS[r]) } : null}
            accountSlot={actor ? <SignOutButton /> : undefined}
          />
          <main id="main" tabIndex={-1} className="mx-auto w-full max-w-7xl flex-1 px-4 py-8 outline-none sm:px-6">
            {children}
          </main>
          <SiteFooter textLicence={{ name: settings.siteTextLicenceName, href: settings.siteTextLicenceUrl }} />
        </Providers>
      </body>
    </html>
  );
}
