// Collects Content-Security-Policy violations in a browser context: the
// securitypolicyviolation events each page fires (listened to from an init
// script, which the policy does not govern) and Chromium's console reports.
import type { BrowserContext, Page } from "playwright-core";

export interface CspViolation {
  page: string;
  directive: string;
  blocked: string;
}

declare global {
  interface Window {
    __cspViolations?: CspViolation[];
  }
}

/** Starts watching a context; console reports from its pages gather in `consoleErrors`. */
export async function watchCsp(ctx: BrowserContext): Promise<{ consoleErrors: string[] }> {
  const consoleErrors: string[] = [];
  await ctx.addInitScript(() => {
    window.__cspViolations = [];
    document.addEventListener("securitypolicyviolation", (e) => {
      window.__cspViolations!.push({ page: location.pathname, directive: e.violatedDirective, blocked: e.blockedURI });
    });
  });
  const track = (page: Page) => {
    page.on("console", (m) => {
      if (/Content.Security.Policy|Refused to (load|execute|apply|connect)/i.test(m.text())) consoleErrors.push(`${page.url()}: ${m.text()}`);
    });
  };
  ctx.on("page", track);
  return { consoleErrors };
}

/** The violations the page has seen so far (call before leaving it). */
export async function violationsOn(page: Page): Promise<CspViolation[]> {
  return page.evaluate(() => window.__cspViolations ?? []);
}
