// A curator composes two observers' finished reductions in the browser: the
// chooser lists each with its plate scale and field, the composite runs in the
// worker with its progress on the page, and the result shows both renditions,
// the contribution map over them on request, each input's brightness factor and
// position correction, and the credits. The photographers of the inputs see it;
// another member is told it does not exist. Once both sets are approved, the
// curator makes a plate of it from its page, publishes it on the plate desk, and
// a visitor's viewer on the public plate lays the contribution map over the
// corona, with every input listed under "how this image was made".
import { eq, inArray } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { bracketSets, sites, users } from "@/db/schema";
import { DEMO_PEOPLE } from "@/db/seed/people";
import { launchBrowser, snap } from "../support/browser";
import { makeComposableReduction, TEST_KITS } from "../support/composite-fixtures";
import { signIn } from "../support/sign-in";
import { APP, requireTestDatabase } from "../support/env";
import { seriousViolations } from "../support/axe";

requireTestDatabase();
const tag = Date.now().toString(36);
const person = (prefix: string) => DEMO_PEOPLE.find((p) => p.email.startsWith(prefix))!;
const curator = DEMO_PEOPLE.find((p) => p.roles.includes("curator"))!;
const longSet = `Long lens at Luxor ${tag}`;
const shortSet = `Short lens at Cadiz ${tag}`;
let browser: Browser;
const setIds: string[] = [];

async function setOf(email: string, name: string, place: { latDeg: number; lonDeg: number }): Promise<string> {
  const db = getDb();
  const [owner] = await db.select({ id: users.id }).from(users).where(eq(users.email, email));
  const [site] = await db.insert(sites).values({ ownerId: owner.id, name: `${name} site`, kind: "fixed", ...place }).returning({ id: sites.id });
  const [set] = await db.insert(bracketSets).values({ ownerId: owner.id, name, eclipseId: "2027-08-02", siteId: site.id }).returning({ id: bracketSets.id });
  return set.id;
}

beforeAll(async () => {
  browser = await launchBrowser();
  const db = getDb();
  setIds.push(await setOf(person("oskar").email, longSet, { latDeg: 25.69, lonDeg: 32.64 }), await setOf(person("nadia").email, shortSet, { latDeg: 36.53, lonDeg: -6.29 }));
  await makeComposableReduction(db, setIds[0], TEST_KITS[0]);
  await makeComposableReduction(db, setIds[1], TEST_KITS[1]);
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await closeDb();
});

describe("composing two observers' reductions", () => {
  let compositeUrl = "";

  it("a curator chooses them, follows the run and sees the result with the contribution map", async () => {
    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, curator.email);
    await page.goto("/studio/composites");
    // Nothing chosen: the form says what is missing, in words.
    await page.getByRole("button", { name: "Compose" }).click();
    await page.getByText("Choose at least two reductions.").waitFor();
    const long = page.getByRole("checkbox", { name: new RegExp(`${longSet}, by Oskar Lindqvist`) });
    await page.getByText(/16\.00 arcsec per pixel; field 1\.\d solar radii to its nearest edge, 2\.\d to its corners/).waitFor();
    await long.check();
    await page.getByRole("checkbox", { name: new RegExp(shortSet) }).check();
    await page.getByLabel("Title").fill(`Luxor and Cadiz ${tag}`);
    await page.getByRole("button", { name: "Compose" }).click();
    await page.waitForURL(/\/studio\/composites\/[0-9a-f-]{36}$/);
    compositeUrl = new URL(page.url()).pathname;
    await page.getByText("Finished: the results are below.").waitFor({ timeout: 120_000 });
    await page.getByText(`Data: Oskar Lindqvist, Nadia Fairweather. Composed by ${curator.name}`, { exact: false }).waitFor();
    // The progress says "finished" as soon as it polls it; the results come with the page's refresh after.
    const table = page.getByRole("table", { name: "How each input went into the composite" });
    await table.waitFor({ timeout: 30_000 });
    const rows = table.getByRole("row");
    expect(await rows.count()).toBe(3);
    // The short lens's camera has 0.6 the gain of the long lens's: its factor is near 1 / 0.6.
    expect(await rows.nth(2).innerText()).toMatch(/1\.6[4-9]\d/);
    expect(await rows.nth(1).innerText()).toContain("(reference)");
    // The zooming viewer holds both renditions; the contribution map goes over them on request, with its legend.
    const toggle = page.getByRole("checkbox", { name: "Show where each input contributes" });
    await expect.poll(() => toggle.isEnabled(), { timeout: 30_000 }).toBe(true);
    expect(await toggle.isChecked()).toBe(false);
    await toggle.check();
    expect(await toggle.isChecked()).toBe(true);
    await page.getByText(/^Short lens at Cadiz \S+: \d+\.\d % of the light$/).waitFor();
    await page.waitForTimeout(1500);
    await snap(page, "composite-journey-result");
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);
    expect(await seriousViolations(page)).toEqual([]);
    await ctx.close();
  }, 180_000);

  it("shows it to the photographers of its inputs and to nobody else", async () => {
    for (const [who, visible] of [["oskar", true], ["nadia", true], ["priya", false]] as const) {
      const ctx = await browser.newContext({ baseURL: APP });
      const page = await signIn(ctx, person(who).email);
      const res = await page.goto(compositeUrl);
      expect(res?.status(), who).toBe(visible ? 200 : 404);
      if (visible) await page.getByRole("heading", { name: `Luxor and Cadiz ${tag}` }).waitFor();
      await ctx.close();
    }
  }, 120_000);

  it("the curator publishes it as a plate, and a visitor's viewer shows the contribution map", async () => {
    // The review desk's approval of both sets is another journey (review-journey.test.ts).
    await getDb().update(bracketSets).set({ state: "approved" }).where(inArray(bracketSets.id, setIds));
    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, curator.email);
    await page.goto(compositeUrl);
    await page.getByRole("heading", { name: "Plate" }).waitFor();
    await page.getByRole("button", { name: "Make a plate" }).click();
    await page.waitForURL(/\/review\/plates\/[0-9a-f-]{36}$/);
    // Both photographers are credited for the data, the curator for the composite.
    expect(await page.getByLabel("Data acquisition").inputValue()).toBe("Oskar Lindqvist and Nadia Fairweather");
    expect(await page.getByLabel("Processing").inputValue()).toMatch(new RegExp(`^${curator.name} \\(composite\\)`));
    await page.getByRole("heading", { name: "What the public sees of the sites" }).waitFor();
    await page.locator('[aria-roledescription="zoomable image"]').waitFor({ timeout: 20_000 });
    // The desk's viewer offers the contribution map as the public one will.
    await page.getByRole("checkbox", { name: "Show where each input contributes" }).waitFor();
    await page.getByRole("textbox", { name: "Caption", exact: true }).fill("One corona from Luxor and Cadiz, a long and a short lens; synthetic test data.");
    await page.getByLabel("Alt text").fill("A dark Moon ringed by the corona, solar north up.");
    await page.getByRole("button", { name: "Save the texts" }).click();
    await page.getByRole("status").filter({ hasText: "Saved:" }).waitFor();
    await page.getByRole("button", { name: "Publish the plate" }).click();
    await page.getByRole("dialog", { name: /^Publish “/ }).getByRole("button", { name: "Publish", exact: true }).click();
    await page.getByRole("status").filter({ hasText: "Published." }).waitFor();
    const slug = (await page.getByRole("link", { name: /^\/plates\// }).innerText()).replace(/^\/plates\//, "");
    await snap(page, "composite-journey-plate-desk");
    await ctx.close();

    const visitor = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
    const pub = await visitor.newPage();
    await pub.goto(`/plates/${slug}`);
    await pub.getByRole("heading", { name: "The 2 inputs" }).waitFor();
    await pub.getByText("Oskar Lindqvist and Nadia Fairweather").first().waitFor();
    const layer = pub.getByRole("checkbox", { name: "Show where each input contributes" });
    await expect.poll(() => layer.isEnabled(), { timeout: 30_000 }).toBe(true);
    await layer.check();
    await pub.getByText(/^Nadia Fairweather: \d+\.\d % of the light$/).waitFor();
    await pub.waitForTimeout(1500);
    await snap(pub, "composite-journey-public-plate");
    expect(await pub.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);
    expect(await seriousViolations(pub)).toEqual([]);
    // On a phone the page does not scroll sideways either.
    await pub.setViewportSize({ width: 390, height: 844 });
    await pub.getByRole("heading", { name: "The 2 inputs" }).scrollIntoViewIfNeeded();
    await snap(pub, "composite-journey-public-plate-phone");
    expect(await pub.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);
    await visitor.close();
  }, 180_000);
});
