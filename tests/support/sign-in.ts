// Signing in through the real form, as a person would.
import type { BrowserContext, Page } from "playwright-core";
import { DEMO_PASSWORD } from "@/db/seed/people";
import { APP } from "./env";

export async function signIn(ctx: BrowserContext, email: string, password = DEMO_PASSWORD): Promise<Page> {
  const page = await ctx.newPage();
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(APP + "/", { timeout: 15_000 });
  return page;
}
