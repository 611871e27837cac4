// Every page each kind of person reaches from the navigation, at a phone's
// width (390 px): no developer wording (tests/support/wording.ts), no sideways
// scrolling, and no serious axe violation. The journeys scan the pages that
// need data (a set, a plate, an edition) as they walk them.
import type { Browser, BrowserContext } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_PEOPLE } from "@/db/seed/people";
import { seriousViolations } from "../support/axe";
import { launchBrowser, snap } from "../support/browser";
import { APP } from "../support/env";
import { signIn } from "../support/sign-in";
import { expectPeopleWording, scrollsSideways } from "../support/wording";

const PHONE = { width: 390, height: 844 };
const person = (role: string) => DEMO_PEOPLE.find((p) => p.roles.includes(role as never) && (role !== "member" || p.roles.length === 1))!.email;

const PAGES: { who: "visitor" | "member" | "curator" | "editor" | "admin"; paths: string[] }[] = [
  { who: "visitor", paths: ["/", "/gallery", "/eclipses", "/eclipses/2027-08-02", "/planner", "/sign-in", "/sign-up", "/forgot-password"] },
  { who: "member", paths: ["/studio", "/studio/kits", "/studio/kits/new", "/studio/sites", "/studio/sites/new", "/studio/sets/new"] },
  { who: "curator", paths: ["/review", "/review?state=all", "/review/plates"] },
  { who: "editor", paths: ["/editions"] },
  { who: "admin", paths: ["/admin", "/admin/people", "/admin/people?role=curator", "/admin/eclipses", "/admin/settings"] },
];

let browser: Browser;
const contexts: BrowserContext[] = [];

beforeAll(async () => {
  browser = await launchBrowser();
}, 60_000);

afterAll(async () => {
  for (const c of contexts) await c.close();
  await browser?.close();
});

describe("every page in people's words, at 390 px", () => {
  for (const group of PAGES) {
    it(`as ${group.who === "admin" ? "an" : "a"} ${group.who}`, async () => {
      const ctx = await browser.newContext({ baseURL: APP, viewport: PHONE });
      contexts.push(ctx);
      const page = group.who === "visitor" ? await ctx.newPage() : await signIn(ctx, person(group.who));
      const problems: string[] = [];
      for (const path of group.paths) {
        const res = await page.goto(path);
        expect(res?.status(), path).toBeLessThan(400);
        await page.waitForLoadState("networkidle").catch(() => undefined);
        await expectPeopleWording(page).catch((e: Error) => problems.push(e.message));
        if (await scrollsSideways(page)) problems.push(`${path} scrolls sideways at 390 px`);
        const axe = await seriousViolations(page, "#main").catch(() => seriousViolations(page));
        if (axe.length) problems.push(`${path}: ${axe.join("; ")}`);
        await snap(page, `wording-390-${group.who}${path.replace(/[^a-z0-9]+/gi, "-")}`);
      }
      expect(problems).toEqual([]);
    }, 180_000);
  }
});
