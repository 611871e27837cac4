// Signing in for a browser journey. Every browser here connects from 127.0.0.1,
// so all journeys' sign-ins through the form would share one bucket of the
// sign-in limit (SIGN_IN_ATTEMPTS_PER_MINUTE per address) and a journey would
// fail by the order the files ran in. A journey about something else therefore
// gets its session as an API client does, from its own loopback address, and
// carries the cookie into the browser. The form itself is walked by
// signInThroughForm here (the roles journey's administrator) and by the roles
// and content-security journeys' own steps.
import type { BrowserContext, Page } from "playwright-core";
import { DEMO_PASSWORD } from "@/db/seed/people";
import { APP } from "./env";
import { Client } from "./http";

export async function signIn(ctx: BrowserContext, email: string, password = DEMO_PASSWORD): Promise<Page> {
  const client = new Client();
  await client.signIn(email, password);
  await ctx.addCookies(client.cookieList().map(([name, value]) => ({ name, value, url: APP, httpOnly: true, sameSite: "Lax" as const })));
  const page = await ctx.newPage();
  await page.goto("/");
  return page;
}

/** Through the real form, as a person would; lands on the home page. */
export async function signInThroughForm(ctx: BrowserContext, email: string, password = DEMO_PASSWORD): Promise<Page> {
  const page = await ctx.newPage();
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(APP + "/", { timeout: 15_000 });
  return page;
}
