// A visitor plans for a typed place and downloads the iCalendar file (its times
// equal the page's to the second); sees the path of totality on the map; plans
// from outside the path (distance, direction, partial-phase advice) and follows
// the link into it; picks a sensor format for the framing; opens an address with
// bad values and gets messages beside the fields. Phone-size checks with axe.
// A member saves a kit and a site and finds them in the planner.
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_PEOPLE } from "@/db/seed/people";
import { seriousViolations } from "../support/axe";
import { launchBrowser, snap } from "../support/browser";
import { APP } from "../support/env";
import { signIn } from "../support/sign-in";

let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("field planner", () => {
  it("lets a visitor plan for a typed place and download the timeline", async () => {
    const ctx = await browser.newContext({ baseURL: APP, acceptDownloads: true });
    const page = await ctx.newPage();
    await page.goto("/planner?eclipse=2027-08-02");
    await page.getByLabel("Place name (optional)").fill("Cadiz");
    await page.getByLabel("Latitude (°, north positive)").fill("36.53");
    await page.getByLabel("Longitude (°, east positive)").fill("-6.29");
    await page.getByRole("button", { name: "Plan", exact: true }).click();
    await page.getByRole("heading", { name: /2027-08-02: total eclipse at Cadiz/ }).waitFor({ timeout: 20_000 });
    const summary = await page.getByRole("heading", { name: /total eclipse at Cadiz/ }).locator("xpath=..").innerText();
    expect(summary).toMatch(/Totality lasts 2 min/);
    await snap(page, "10-planner-cadiz");

    const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: /calendar \(\.ics\)/ }).click()]);
    expect(download.suggestedFilename()).toBe("eclipse-2027-08-02-cadiz.ics");
    const text = fs.readFileSync((await download.path())!, "utf8");
    expect(text).toMatch(/^BEGIN:VCALENDAR/);
    expect(text.match(/BEGIN:VEVENT/g)).toHaveLength(5);
    // Every event starts at the second the page's timeline shows in its UTC column.
    const starts = [...text.matchAll(/DTSTART:\d{8}T(\d{2})(\d{2})(\d{2})Z/g)].map((m) => `${m[1]}:${m[2]}:${m[3]}`);
    const utcColumn = await page.getByRole("table", { name: "Timeline" }).locator("tbody tr td:nth-child(2)").allInnerTexts();
    expect(starts).toHaveLength(5);
    expect(starts).toEqual(utcColumn.map((t) => t.trim()));

    // The map draws the path of totality from the ephemeris: a band, the central line and both limits.
    const drawn = page.getByTestId("path-of-totality").locator("path");
    expect(await drawn.count()).toBe(4);
    for (const d of await drawn.evaluateAll((els) => els.map((e) => e.getAttribute("d") ?? ""))) expect(d.length).toBeGreaterThan(100);
    await page.getByText(/Shaded: the path of totality, computed from the positions of the Sun and Moon/).waitFor();
    await ctx.close();
  });

  it("tells a visitor outside the path how far totality is, advises on the partial phase, and leads into the path", async () => {
    const ctx = await browser.newContext({ baseURL: APP });
    const page = await ctx.newPage();
    // Tunis: north of the 2027 path (DESIGN.md: the eclipse is only partial there).
    await page.goto("/planner?eclipse=2027-08-02&place=Tunis&lat=36.8&lon=10.18");
    await page.getByRole("heading", { name: "No totality here" }).waitFor({ timeout: 20_000 });
    const reach = await page.getByTestId("totality-reach").innerText();
    expect(reach).toMatch(/about \d+ km to the south/);
    // Partial-phase advice with the filter cautions, and no corona rows in the ladder.
    await page.getByRole("heading", { name: "Photographing the partial phase" }).waitFor();
    await page.getByText(/The filter stays on from first to fourth contact/).waitFor();
    const ladder = await page.getByRole("table", { name: /Exposure ladder/ }).innerText();
    expect(ladder).toMatch(/Partial phase, ND 5.0 filter/);
    expect(ladder).not.toMatch(/Corona|Prominences/);
    await snap(page, "13-planner-outside-path");
    await page.getByRole("link", { name: "Plan for a place just inside the path" }).click();
    await page.getByRole("heading", { name: /2027-08-02: total eclipse at/ }).waitFor({ timeout: 20_000 });
    expect(await page.getByRole("heading", { name: "No totality here" }).count()).toBe(0);
    await ctx.close();
  });

  it("draws the frame for a sensor format picked from the list", async () => {
    const ctx = await browser.newContext({ baseURL: APP });
    const page = await ctx.newPage();
    await page.goto("/planner?eclipse=2027-08-02&lat=25.69&lon=32.64");
    await page.getByLabel("Focal length (mm)").fill("800");
    await page.getByLabel("Sensor", { exact: true }).selectOption({ label: "Full frame (36 × 24 mm)" });
    await page.getByRole("button", { name: "Plan", exact: true }).click();
    await page.waitForURL(/sensor=full-frame/);
    // 36 x 24 mm at 800 mm: 9281 by 6188 arcsec (computed), over the day's solar radius of about 946 arcsec.
    await page.getByText(/The sensor covers 9\.8 by 6\.5 solar radii\./).first().waitFor({ timeout: 20_000 });
    // A typed size wins over the list.
    await page.getByLabel("Sensor width (mm)").fill("17.3");
    await page.getByLabel("Sensor height (mm)").fill("13");
    await page.getByRole("button", { name: "Plan", exact: true }).click();
    await page.getByText(/The sensor covers 4\.7 by 3\.5 solar radii\./).first().waitFor({ timeout: 20_000 });
    await ctx.close();
  });

  it("answers bad values in the address with messages beside the fields", async () => {
    const ctx = await browser.newContext({ baseURL: APP });
    const page = await ctx.newPage();
    const res = await page.goto("/planner?eclipse=2027-13-45&lat=abc&lon=500&isos=1,2&sensor=potato&tz=Mars%2FOlympus&f=0");
    expect(res?.status()).toBe(200);
    await page.getByTestId("address-problems").waitFor();
    // Beside each field, in words a visitor reads (no field keys).
    const latField = page.getByLabel("Latitude (°, north positive)");
    expect(await latField.getAttribute("aria-invalid")).toBe("true");
    await page.getByText("Latitude: expected a number from -90 to 90 degrees (north positive); the address gave “abc”.", { exact: true }).waitFor();
    await page.getByText("Longitude: expected a number from -180 to 180 degrees (east positive); the address gave “500”.", { exact: true }).waitFor();
    await page.getByText(/^Sensor: expected one of the sensor formats in the list/).waitFor();
    await page.getByText(/^Time zone: expected a time zone from the list/).waitFor();
    await page.getByText(/^ISO speeds: expected one to six ISO speeds/).waitFor();
    await page.getByText(/^Eclipse: there is no solar eclipse on 2027-13-45/).waitFor();
    // The rest still plans: the next total eclipse at its point of greatest eclipse.
    await page.getByRole("heading", { name: /total eclipse at Point of greatest eclipse/ }).waitFor({ timeout: 20_000 });
    const body = await page.locator("main").innerText();
    expect(body).not.toMatch(/\b(lat|lon|isos|tz|sw|sh):/);
    await ctx.close();
  });

  it("fits a phone and passes axe", async () => {
    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
    const page = await ctx.newPage();
    for (const [address, shot] of [
      ["/planner?eclipse=2027-08-02&place=Cadiz&lat=36.53&lon=-6.29&focal=400&sensor=aps-c&mount=equatorial", "14-planner-phone"],
      ["/planner?eclipse=2027-08-02&place=Tunis&lat=36.8&lon=10.18", "15-planner-phone-outside"],
    ] as const) {
      await page.goto(address);
      await page.getByRole("heading", { name: /2027-08-02: (total|partial) eclipse at/ }).waitFor({ timeout: 20_000 });
      await snap(page, shot);
      const widths = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, inner: window.innerWidth }));
      expect(widths.scroll).toBeLessThanOrEqual(widths.inner);
      expect(await seriousViolations(page)).toEqual([]);
    }
    await ctx.close();
  });

  it("shows a member's saved kit and site in the planner", async () => {
    const ctx = await browser.newContext({ baseURL: APP });
    const member = DEMO_PEOPLE.find((p) => p.roles.join() === "member" && p.email.startsWith("nadia"))!;
    const page = await signIn(ctx, member.email);

    const kitName = `Refractor ${randomUUID().slice(0, 4)}`;
    await page.goto("/studio/kits/new");
    await page.getByLabel("Kit name").fill(kitName);
    await page.getByRole("textbox", { name: /^Camera/ }).fill("Astro camera");
    await page.getByLabel("Sensor width (mm)").fill("23.5");
    await page.getByLabel("Sensor height (mm)").fill("15.6");
    await page.getByLabel("Pixel pitch (µm)").fill("3.9");
    await page.getByLabel("Focal length (mm)").fill("0");
    await page.getByLabel("f-number").fill("7");
    await page.getByRole("button", { name: "Save kit" }).click();
    // A zero focal length is refused with the field named; nothing is saved.
    await page.getByText("Please correct the marked field.").waitFor({ timeout: 15_000 });
    await page.getByText(/must be greater than 0 \(mm\)/).first().waitFor({ timeout: 15_000 });
    await page.getByLabel("Focal length (mm)").fill("540");
    await page.getByRole("button", { name: "Save kit" }).click();
    await page.getByRole("heading", { name: "What this kit records" }).waitFor({ timeout: 15_000 });
    await snap(page, "11-kit-saved");

    const siteName = `Luxor west bank ${randomUUID().slice(0, 4)}`;
    await page.goto("/studio/sites/new");
    await page.getByLabel("Site name").fill(siteName);
    await page.getByLabel("Latitude (°)").fill("25.70");
    await page.getByLabel("Longitude (°)").fill("32.61");
    await page.getByRole("button", { name: "Save site" }).click();
    await page.getByText("Site saved.").waitFor({ timeout: 15_000 });

    await page.goto("/planner?eclipse=2027-08-02");
    await page.getByLabel("One of your sites").selectOption({ label: siteName });
    await page.getByLabel("One of your kits").selectOption({ label: `${kitName} (Astro camera)` });
    await page.getByRole("button", { name: "Plan", exact: true }).click();
    await page.getByRole("heading", { name: new RegExp(`total eclipse at ${siteName}`) }).waitFor({ timeout: 20_000 });
    expect(await page.getByRole("table", { name: /Exposure ladder at f\/7/ }).count()).toBe(1);
    await snap(page, "12-planner-member");
    await ctx.close();
  });
});
