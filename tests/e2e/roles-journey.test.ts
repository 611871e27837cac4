// A newcomer signs up, confirms by mail, sees a member's navigation; an admin
// grants the curator role and the newcomer's navigation changes; a member who
// calls an admin route handler directly is refused.
import { randomUUID } from "node:crypto";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "@/db/seed/people";
import { APP } from "../support/env";
import { launchBrowser, snap } from "../support/browser";
import { firstLink, waitForMail } from "../support/mailbox";

const newcomer = {
  name: `Imogen Tarrant ${randomUUID().slice(0, 4)}`,
  email: `imogen.${randomUUID().slice(0, 8)}@journey-test.example`,
  password: "corona-streamer-42",
};
const adminEmail = DEMO_PEOPLE.find((p) => p.roles.includes("admin"))!.email;

let browser: Browser;
let newcomerCtx: BrowserContext;
let adminCtx: BrowserContext;
let page: Page;

const ip = () => `10.77.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}`;

beforeAll(async () => {
  browser = await launchBrowser();
  newcomerCtx = await browser.newContext({ baseURL: APP, extraHTTPHeaders: { "x-forwarded-for": ip() } });
  adminCtx = await browser.newContext({ baseURL: APP, extraHTTPHeaders: { "x-forwarded-for": ip() } });
  page = await newcomerCtx.newPage();
});

afterAll(async () => {
  await browser?.close();
});

async function navLabels(p: Page): Promise<string[]> {
  return (await p.getByRole("navigation", { name: "Main" }).getByRole("link").allInnerTexts()).map((s) => s.trim());
}

describe("signing up and roles", () => {
  it("signs up, confirms the address from the mail and lands signed in", async () => {
    await page.goto("/sign-up");
    await page.getByLabel("Name").fill(newcomer.name);
    await page.getByLabel("E-mail").fill(newcomer.email);
    await page.getByLabel("Password", { exact: true }).fill(newcomer.password);
    await page.getByLabel("Password again").fill(newcomer.password);
    await snap(page, "01-sign-up-filled");
    await page.getByRole("button", { name: "Create account" }).click();
    await page.getByText(`confirmation link to ${newcomer.email}`).waitFor({ timeout: 15_000 });

    const mail = await waitForMail(newcomer.email, (m) => m.subject.startsWith("Confirm your address"));
    const link = firstLink(mail.text);
    expect(new URL(link).origin).toBe(APP);
    await page.goto(link);
    await page.waitForURL("**/welcome", { timeout: 15_000 });
    await expect(page.getByRole("heading", { level: 1 }).innerText()).resolves.toContain("Welcome");
    await snap(page, "02-welcome");
  });

  it("shows a member's navigation: the studio, not the desks", async () => {
    await page.goto("/");
    const labels = await navLabels(page);
    expect(labels).toContain("Studio");
    expect(labels).not.toContain("Review desk");
    expect(labels).not.toContain("People");
  });

  it("refuses the member who calls an admin route handler directly", async () => {
    const res = await page.request.get("/api/admin/people");
    expect(res.status()).toBe(403);
    const grant = await page.request.post("/api/admin/people/anyone/roles", { data: { role: "admin", grant: true } });
    expect(grant.status()).toBe(403);
    const pageRes = await page.goto("/admin/people");
    expect(pageRes?.status()).toBe(403);
    await snap(page, "03-member-refused");
  });

  it("lets an admin grant the curator role, and the newcomer's navigation changes", async () => {
    const admin = await adminCtx.newPage();
    await admin.goto("/sign-in");
    await admin.getByLabel("E-mail").fill(adminEmail);
    await admin.getByLabel("Password").fill(DEMO_PASSWORD);
    await admin.getByRole("button", { name: "Sign in" }).click();
    await admin.waitForURL(APP + "/", { timeout: 15_000 });

    await admin.goto(`/admin/people?q=${encodeURIComponent(newcomer.email)}`);
    const toggle = admin.getByRole("button", { name: new RegExp(`^Curator role for ${newcomer.name}: not held`) });
    await toggle.click();
    await admin
      .getByRole("button", { name: new RegExp(`^Curator role for ${newcomer.name}: held`) })
      .waitFor({ timeout: 15_000 });
    await snap(admin, "04-admin-granted-curator");

    await page.goto("/");
    expect(await navLabels(page)).toContain("Review desk");
    const review = await page.goto("/review");
    expect(review?.status()).toBe(200);
    await snap(page, "05-newcomer-review-desk");
  });
});
