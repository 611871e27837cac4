// A visitor plans for a typed place and downloads the iCalendar file; a member
// saves a kit and a site and finds them in the planner.
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "@/db/seed/people";
import { launchBrowser, snap } from "../support/browser";
import { APP } from "../support/env";

let browser: Browser;
const ip = () => `10.88.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}`;

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("field planner", () => {
  it("lets a visitor plan for a typed place and download the timeline", async () => {
    const ctx = await browser.newContext({ baseURL: APP, acceptDownloads: true, extraHTTPHeaders: { "x-forwarded-for": ip() } });
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
    await ctx.close();
  });

  it("shows a member's saved kit and site in the planner", async () => {
    const ctx = await browser.newContext({ baseURL: APP, extraHTTPHeaders: { "x-forwarded-for": ip() } });
    const page = await ctx.newPage();
    const member = DEMO_PEOPLE.find((p) => p.roles.join() === "member" && p.email.startsWith("nadia"))!;
    await page.goto("/sign-in");
    await page.getByLabel("E-mail").fill(member.email);
    await page.getByLabel("Password").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(APP + "/", { timeout: 15_000 });

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
