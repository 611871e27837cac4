// A newcomer signs up, confirms by mail, sees a member's navigation; an admin
// grants the curator role after a confirmation (notices replace one another,
// the admin's own admin role is locked, people filter by role) and the
// newcomer's navigation changes; a member who calls an admin route handler
// directly is refused; the admin disables the newcomer (signed out, sign-in
// refused in our words) and enables them again, and invites a person by
// e-mail who chooses a password from the link and signs in.
import { randomUUID } from "node:crypto";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { NAV_ENTRIES } from "@/lib/auth/nav";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_PEOPLE } from "@/db/seed/people";
import { APP } from "../support/env";
import { launchBrowser, snap } from "../support/browser";
import { firstLink, waitForMail } from "../support/mailbox";
import { seriousViolations } from "../support/axe";
import { expectPeopleWording } from "../support/wording";
import { signInThroughForm } from "../support/sign-in";

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


beforeAll(async () => {
  browser = await launchBrowser();
  newcomerCtx = await browser.newContext({ baseURL: APP });
  adminCtx = await browser.newContext({ baseURL: APP });
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
    // The whole list, in order: a desk's entry appearing (or the studio's going) fails here.
    expect(labels).toEqual(["Home", "Gallery", "Eclipses", "Planner", "Studio"]);
    // The entries a member must not see do exist for other roles, so their absence above means something.
    expect(NAV_ENTRIES.map((e) => e.label)).toEqual(expect.arrayContaining(["Review desk", "Editions", "Admin"]));
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
    const admin = await signInThroughForm(adminCtx, adminEmail);

    await admin.goto(`/admin/people?q=${encodeURIComponent(newcomer.email)}`);
    await expectPeopleWording(admin);
    const toggle = admin.getByRole("button", { name: new RegExp(`^Curator role for ${newcomer.name}: not held`) });
    // The change asks first; Cancel changes nothing.
    await toggle.click();
    const ask = admin.getByRole("dialog", { name: `Grant the curator role to ${newcomer.name}?` });
    await ask.waitFor();
    expect(await seriousViolations(admin, "dialog")).toEqual([]);
    await ask.getByRole("button", { name: "Cancel" }).click();
    await ask.waitFor({ state: "hidden" });
    await toggle.click();
    await ask.getByRole("button", { name: "Grant curator" }).click();
    await admin
      .getByRole("button", { name: new RegExp(`^Curator role for ${newcomer.name}: held`) })
      .waitFor({ timeout: 15_000 });
    await snap(admin, "04-admin-granted-curator");
    // A second change's notice replaces the first instead of stacking.
    await admin.getByRole("button", { name: new RegExp(`^Editor role for ${newcomer.name}: not held`) }).click();
    await admin.getByRole("dialog", { name: `Grant the editor role to ${newcomer.name}?` }).getByRole("button", { name: "Grant editor" }).click();
    await admin.getByText(`Editor role granted to ${newcomer.name}.`).waitFor({ timeout: 15_000 });
    expect(await admin.getByText(`Curator role granted to ${newcomer.name}.`).count()).toBe(0);
    await admin.getByRole("button", { name: new RegExp(`^Editor role for ${newcomer.name}: held`) }).click();
    await admin.getByRole("dialog", { name: `Revoke the editor role from ${newcomer.name}?` }).getByRole("button", { name: "Revoke editor" }).click();
    await admin.getByRole("button", { name: new RegExp(`^Editor role for ${newcomer.name}: not held`) }).waitFor({ timeout: 15_000 });

    // People filtered by role: the newcomer is among the curators, not among the admins.
    await admin.goto(`/admin/people?role=curator&q=${encodeURIComponent(newcomer.email)}`);
    await admin.getByRole("row").filter({ hasText: newcomer.email }).first().waitFor();
    await admin.goto(`/admin/people?role=admin`);
    expect(await admin.getByText(newcomer.name).count()).toBe(0);
    // The admin's own admin role cannot be revoked from here (and the server refuses it too: tests/integration/desk-notices.test.ts).
    const own = admin.getByRole("button", { name: /^Administrator role for Miriam Achterberg: held \(You cannot revoke your own administrator role/ });
    // It stays in the tab order (aria-disabled, not disabled), and pressing it says why.
    await own.focus();
    await admin.keyboard.press("Enter");
    await admin.getByRole("status").getByText(/You cannot revoke your own administrator role/).waitFor();
    expect(await admin.getByRole("dialog").filter({ hasText: "Revoke" }).count()).toBe(0);
    await expectPeopleWording(admin);
    await snap(admin, "04b-admin-people-filtered");

    await page.goto("/");
    expect(await navLabels(page)).toContain("Review desk");
    const review = await page.goto("/review");
    expect(review?.status()).toBe(200);
    await snap(page, "05-newcomer-review-desk");
  });

  it("lets an admin disable the newcomer, who is signed out and cannot sign in, then enable them again", async () => {
    const admin = await adminCtx.newPage();
    await admin.goto(`/admin/people?q=${encodeURIComponent(newcomer.email)}`);
    await admin.getByRole("button", { name: `Disable ${newcomer.name}` }).click();
    await admin.getByRole("dialog", { name: `Disable ${newcomer.name}?` }).getByRole("button", { name: "Disable", exact: true }).click();
    await admin.getByText(`${newcomer.name} can no longer sign in.`).waitFor({ timeout: 15_000 });
    await admin.goto("/admin/people?status=disabled");
    await admin.getByRole("row").filter({ hasText: newcomer.email }).getByText("disabled", { exact: true }).waitFor();

    // The newcomer's session is gone, and signing in says why in our words.
    const res = await page.goto("/review");
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    expect(res?.status()).toBeLessThan(500);
    await page.getByLabel("E-mail").fill(newcomer.email);
    await page.getByLabel("Password").fill(newcomer.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByText("This account is disabled. Ask the society's administrators if you think this is a mistake.").waitFor({ timeout: 15_000 });
    await expectPeopleWording(page);
    await snap(page, "06-disabled-sign-in-refused");

    await admin.goto(`/admin/people?q=${encodeURIComponent(newcomer.email)}`);
    await admin.getByRole("button", { name: `Enable ${newcomer.name}` }).click();
    await admin.getByRole("dialog", { name: `Let ${newcomer.name} sign in again?` }).getByRole("button", { name: "Enable", exact: true }).click();
    await admin.getByText(`${newcomer.name} can sign in again.`).waitFor({ timeout: 15_000 });
    await page.getByRole("button", { name: "Sign in" }).click();
    // Back where the newcomer was going.
    await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"), { timeout: 15_000 });
  });

  it("lets an admin invite a person by e-mail, who chooses a password from the link and signs in", async () => {
    const admin = await adminCtx.newPage();
    const invitee = { name: `Ottoline Fairbairn ${randomUUID().slice(0, 4)}`, email: `ottoline.${randomUUID().slice(0, 8)}@journey-test.example` };
    await admin.goto("/admin/people");
    await admin.getByText("Invite a person by e-mail").click();
    await admin.getByRole("textbox", { name: "Name", exact: true }).fill(invitee.name);
    await admin.getByRole("textbox", { name: "E-mail" }).fill(invitee.email);
    await admin.getByRole("checkbox", { name: "Curator" }).check();
    await admin.getByRole("button", { name: "Send the invitation" }).click();
    await admin.getByText(`Invitation sent to ${invitee.email}, as member, curator.`).waitFor({ timeout: 15_000 });
    await snap(admin, "07-admin-invited");

    const mail = await waitForMail(invitee.email, (m) => m.subject.startsWith("You are invited to"));
    const ctx = await browser.newContext({ baseURL: APP });
    const p = await ctx.newPage();
    await p.goto(firstLink(mail.text));
    await p.getByRole("heading", { level: 1, name: "Choose your password" }).waitFor({ timeout: 15_000 });
    await expectPeopleWording(p);
    await p.getByLabel("New password", { exact: true }).fill("bailys-beads-2027");
    await p.getByLabel("New password again").fill("bailys-beads-2027");
    await p.getByRole("button", { name: "Save the new password" }).click();
    await p.getByRole("link", { name: "Sign in with it." }).click();
    await p.waitForURL(/\/sign-in/, { timeout: 15_000 });
    await p.getByLabel("E-mail").fill(invitee.email);
    await p.getByLabel("Password").fill("bailys-beads-2027");
    await p.getByRole("button", { name: "Sign in" }).click();
    await p.waitForURL(APP + "/", { timeout: 15_000 });
    expect(await navLabels(p)).toContain("Review desk");
    await ctx.close();
  });
});
