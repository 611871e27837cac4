// Debian's Chromium driven by playwright-core (its own browser download cannot
// work here); playwright gives every launch a fresh temporary profile. Screenshots go to .artifacts/ as test artefacts.
import fs from "node:fs";
import path from "node:path";
import { chromium, type Browser, type Page } from "playwright-core";

export const ARTIFACTS = process.env.ARTIFACTS ?? path.resolve(".artifacts");

export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
}

export async function snap(page: Page, name: string): Promise<void> {
  fs.mkdirSync(ARTIFACTS, { recursive: true });
  await page.screenshot({ path: path.join(ARTIFACTS, `${name}.png`), fullPage: true });
}
