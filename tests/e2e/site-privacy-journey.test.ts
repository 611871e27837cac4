// A member gives a site a private name and a public label, then hides it; the
// plate page of a published plate from that site shows what the precision
// allows, and nothing more. Keyboard and screen reader: the forms are labelled
// (axe finds no serious violation), and nothing scrolls sideways at 390 px.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { reductions, sites, users } from "@/db/schema";
import { DEMO_PEOPLE } from "@/db/seed/people";
import { createBracketSet } from "@/lib/bracket-sets";
import { createPlateFromReduction } from "@/lib/plates/publish";
import { bucketName, putObjectBytes, buildReductionPrefix } from "@/lib/storage";
import { seriousViolations } from "../support/axe";
import { launchBrowser, snap } from "../support/browser";
import { APP, requireTestDatabase } from "../support/env";
import { signIn } from "../support/sign-in";

requireTestDatabase();
const db = getDb();
let browser: Browser;
const tag = randomUUID().slice(0, 6);
const member = DEMO_PEOPLE.find((p) => p.email.startsWith("oskar"))!;

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await closeDb();
});

async function hasNoSidewaysScroll(page: Page): Promise<boolean> {
  return page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth);
}

describe("a site's privacy", () => {
  let siteId = "";

  it("takes a private name and a public label, and says what public pages will show", async () => {
    const ctx = await browser.newContext({ baseURL: APP });
    const page = await signIn(ctx, member.email);
    await page.goto("/studio/sites/new");
    await page.getByLabel("Site name").fill(`Hotel roof ${tag}`);
    await page.getByLabel("Public label").fill("Luxor");
    // Written the way Number() would have read as 32. The browser's number field will not take it,
    // so it is sent as a script would send it: the server refuses it, naming the field.
    await page.getByLabel("Longitude (°)").fill("32.63921");
    await page.getByLabel("Latitude (°)").evaluate((el) => {
      const input = el as HTMLInputElement;
      input.type = "text";
      input.value = "0x20";
      input.form!.requestSubmit();
    });
    await page.getByText(/expected a number of degrees in decimal notation/).first().waitFor({ timeout: 15_000 });
    await page.getByLabel("Latitude (°)").fill("25.68734");
    await page.getByLabel("Longitude (°)").fill("32.63921");
    await page.getByRole("button", { name: "Save site" }).click();
    await page.getByText("Site saved.").waitFor({ timeout: 15_000 });
    siteId = page.url().split("/studio/sites/")[1].split("?")[0];
    const shows = await page.getByText(/^“Luxor”, the country and/).innerText();
    expect(shows).toContain("25.7°, 32.6°");
    expect(await seriousViolations(page)).toEqual([]);
    await snap(page, "60-site-public-label");

    // Hide it: the page says nothing of the site will be shown.
    await page.getByRole("combobox", { name: "Location on public pages" }).selectOption("hidden");
    await page.getByRole("button", { name: "Save changes" }).click();
    await page.getByText("nothing of the site: no position, label or country (hidden)").waitFor({ timeout: 15_000 });
    await page.setViewportSize({ width: 390, height: 844 });
    expect(await hasNoSidewaysScroll(page)).toBe(true);
    await snap(page, "61-site-hidden-390");
    await ctx.close();
  });

  it("shows a published plate from a rounded site with its label and rounded place, and from a hidden one with neither", async () => {
    const [owner] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, member.email));
    const actor = { userId: owner.id, email: member.email, name: owner.name, roles: ["member" as const] };
    const set = await createBracketSet(db, actor, { name: `Privacy journey ${tag}`, eclipseId: "2027-08-02", siteId, kitId: null, notes: "", clockOffsetS: 0 });
    const [red] = await db.insert(reductions).values({ bracketSetId: set.id, params: { registration: "sun", filter: "mgn", recoverResponse: false } }).returning();
    const prefix = buildReductionPrefix(set.id, red.id);
    const json = (key: string, v: unknown) => putObjectBytes({ bucket: bucketName("derived"), key: prefix + key }, Buffer.from(JSON.stringify(v)), "application/json");
    await json("report.json", { frames: [], overall: { masterSize: { width: 40, height: 30 } } });
    await json("tiles/natural-iiif/info.json", { width: 40, height: 30 });
    await db.update(reductions).set({ state: "done", progress: 1, pipelineVersion: "test", outputs: { prefix, report: `${prefix}report.json`, tiles: `${prefix}tiles/` } }).where(eq(reductions.id, red.id));
    const slug = `privacy-journey-${tag}`;
    await db.update(sites).set({ precision: "rounded" }).where(eq(sites.id, siteId));
    await createPlateFromReduction(db, { reductionId: red.id, slug, title: `Privacy journey ${tag}`, caption: "A test plate.", description: "", altText: "A test image.", acquiredBy: owner.name, processedBy: "Crownlight pipeline", licence: "CC-BY-4.0", renditions: ["natural"], publish: true, createdBy: null });

    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 390, height: 844 } });
    const page = await ctx.newPage();
    await page.goto(`/plates/${slug}`);
    const site = page.getByRole("definition").filter({ hasText: "Luxor" });
    await site.waitFor({ timeout: 15_000 });
    expect(await site.innerText()).toMatch(/Luxor\s+25\.7°, 32\.6° \(rounded to about 10 km\)\s+Egypt/);
    expect(await page.content()).not.toContain(`Hotel roof ${tag}`);
    expect(await hasNoSidewaysScroll(page)).toBe(true);
    await snap(page, "62-plate-rounded-site-390");

    await db.update(sites).set({ precision: "hidden" }).where(eq(sites.id, siteId));
    await page.goto(`/plates/${slug}`);
    await page.getByText("The observer keeps the site private.").waitFor({ timeout: 15_000 });
    const html = await page.content();
    for (const text of ["Luxor", "Egypt", "25.7", `Hotel roof ${tag}`]) expect(html.includes(text), text).toBe(false);
    await snap(page, "63-plate-hidden-site-390");
    await ctx.close();
  });
});
