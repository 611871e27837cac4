// Every page, for every role, loads in Chromium under the Content-Security-
// Policy that proxy.ts sends, and reports no violation: Next.js's scripts carry
// the nonce, the theme script too (a visitor who chose the light theme gets it
// before first paint), styles and images come from where the policy allows.
// Also: signing in with a hostile ?next= lands on the app.
import { eq } from "drizzle-orm";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { bracketSets, plates, plateVersions, users } from "@/db/schema";
import { DEMO_PASSWORD } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { createEdition } from "@/lib/editions/editions";
import { safeNextPath } from "@/lib/http/safe-next";
import { closeProducerRedis } from "@/lib/queue/connection";
import { launchBrowser, snap } from "../support/browser";
import { violationsOn, watchCsp } from "../support/csp";
import { APP, requireTestDatabase } from "../support/env";
import { HOSTILE_NEXT } from "../support/hostile-next";
import { signIn } from "../support/sign-in";
import { makeExportablePlate, person } from "../integration/edition-fixtures";

requireTestDatabase();
const db = getDb();
const tag = Date.now().toString(36);
let browser: Browser;
const pagesFor: Record<string, string[]> = {};

beforeAll(async () => {
  const plateId = await makeExportablePlate(db, `csp-${tag}`, 1, "rounded", true, true);
  const [plate] = await db.select({ slug: plates.slug, setId: plates.bracketSetId }).from(plates).where(eq(plates.id, plateId));
  const [set] = await db.select({ siteId: bracketSets.siteId, kitId: bracketSets.kitId }).from(bracketSets).where(eq(bracketSets.id, plate.setId!));
  const [version] = await db.select({ reductionId: plateVersions.reductionId }).from(plateVersions).where(eq(plateVersions.plateId, plateId));
  const [editor] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, person("editor").email));
  const editorActor: Actor = { userId: editor.id, email: person("editor").email, name: editor.name, roles: ["member", "editor"] };
  const edition = await createEdition(db, editorActor, { title: `Policy check ${tag}`, kind: "newsletter" });

  pagesFor.visitor = ["/", "/gallery", "/eclipses", "/eclipses/2027-08-02", "/planner", `/plates/${plate.slug}`, `/plates/${plate.slug}/v/1`, "/sign-in", "/sign-up", "/forgot-password", "/reset-password", "/welcome"];
  pagesFor.member = ["/studio", "/studio/kits", "/studio/kits/new", `/studio/kits/${set.kitId}`, "/studio/sites", "/studio/sites/new", `/studio/sites/${set.siteId}`, "/studio/sets/new", `/studio/sets/${plate.setId}`, `/studio/reductions/${version.reductionId}`];
  pagesFor.curator = ["/review", "/review/plates", `/review/plates/${plateId}`, `/review/sets/${plate.setId}`];
  pagesFor.editor = ["/editions", `/editions/${edition.id}`];
  pagesFor.admin = ["/admin", "/admin/people", "/admin/settings", "/admin/eclipses"];
  browser = await launchBrowser();
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await closeProducerRedis();
  await closeDb();
});

/** Through the form, with the address to go to after it. */
async function signInThroughForm(ctx: BrowserContext, email: string, next: string): Promise<Page> {
  const page = await ctx.newPage();
  await page.goto(`/sign-in${next ? `?next=${encodeURIComponent(next)}` : ""}`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((url) => url.pathname !== "/sign-in", { timeout: 15_000 });
  return page;
}

describe("Content-Security-Policy", () => {
  for (const who of ["visitor", "member", "curator", "editor", "admin"]) {
    it(`every ${who} page loads under the policy with no violation`, async () => {
      const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
      const { consoleErrors } = await watchCsp(ctx);
      // The light theme is applied by the inline theme script, which runs only with the nonce.
      await ctx.addInitScript(() => localStorage.setItem("crownlight-theme", "light"));
      const page = who === "visitor" ? await ctx.newPage() : await signIn(ctx, person(who).email);
      for (const path of pagesFor[who]) {
        const res = await page.goto(path, { waitUntil: "load" });
        expect(res?.status(), path).toBeLessThan(400);
        expect(res?.headers()["content-security-policy"], path).toMatch(/script-src 'self' 'nonce-/);
        await page.waitForLoadState("networkidle").catch(() => undefined);
        expect(await page.evaluate(() => document.documentElement.getAttribute("data-theme")), path).toBe("light");
        expect(await violationsOn(page), path).toEqual([]);
      }
      if (who === "visitor") await snap(page, "csp-plate-page");
      expect(consoleErrors).toEqual([]);
      await ctx.close();
    });
  }
});

describe("sign-up", () => {
  it("refuses a common password with a message that says why", async () => {
    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 390, height: 844 } });
    const page = await ctx.newPage();
    await page.goto("/sign-up");
    await page.getByLabel("Name").fill("Ansel Brightwater");
    await page.getByLabel("E-mail").fill(`common.${tag}@csp-test.example`);
    await page.getByLabel("Password", { exact: true }).fill("1234567890");
    await page.getByLabel("Password again").fill("1234567890");
    await page.getByRole("button", { name: "Create account" }).click();
    await page.getByText("lists of common passwords that attackers try first").waitFor();
    await snap(page, "csp-sign-up-common-password");
    await ctx.close();
  });
});

describe("before the page's script has taken over", () => {
  // A form that the page's script sends would otherwise go out as a plain GET,
  // with the e-mail address and password in the address bar, the history and the logs.
  it("a form sent by the page's script cannot be sent until the script runs", async () => {
    const bare = await browser.newContext({ baseURL: APP, javaScriptEnabled: false });
    const page = await bare.newPage();
    await page.goto("/sign-in");
    const submit = page.getByRole("button", { name: "Sign in" });
    await expect(submit.isDisabled()).resolves.toBe(true);
    // A browser without scripts shows why (Chromium under test still parses <noscript> as scripting-enabled, so the served HTML is checked).
    expect(await (await page.request.get("/sign-in")).text()).toMatch(/<noscript><span[^>]*>This form is sent by the page(&#x27;|&apos;|')s script: turn JavaScript on to send it\.<\/span><\/noscript>/);
    await page.getByLabel("E-mail").fill(person("member").email);
    await page.getByLabel("Password").fill(DEMO_PASSWORD);
    await page.getByLabel("Password").press("Enter");
    await page.waitForLoadState("load");
    expect(page.url()).toBe(`${APP}/sign-in`);
    await bare.close();

    const scripted = await browser.newContext({ baseURL: APP });
    const live = await scripted.newPage();
    await live.goto("/sign-in");
    await expect.poll(() => live.getByRole("button", { name: "Sign in" }).isEnabled(), { timeout: 15_000 }).toBe(true);
    await scripted.close();
  });
});

describe("after sign-in", () => {
  it("a hostile ?next= lands on the app, never another origin", async () => {
    const ctx = await browser.newContext({ baseURL: APP });
    const page = await signInThroughForm(ctx, person("member").email, "/\\evil.example/x");
    await page.waitForLoadState("load");
    expect(new URL(page.url()).origin).toBe(APP);
    expect(new URL(page.url()).pathname).toBe("/");
    // Every other variant: the path the form would follow, resolved against the app's address by
    // the WHATWG URL parser (as the browser resolves it) and followed by Chromium, every step with a
    // time limit (a navigation started from inside the page had once left this test waiting for good).
    for (const next of HOSTILE_NEXT) {
      const target = safeNextPath(next);
      await page.goto(target, { waitUntil: "load", timeout: 30_000 });
      expect(new URL(page.url()).origin, JSON.stringify(next)).toBe(APP);
    }
    await ctx.close();
  });
});
