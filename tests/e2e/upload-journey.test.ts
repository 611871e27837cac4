// A member takes a bracket from files on disk to a reduction in the browser:
// creates a bracket set, uploads a synthetic bracket of several files (straight
// to the S3 fake, with progress shown), corrects the exposure of the frame whose
// file gives none, starts a reduction, watches its progress and sees both
// renditions. Screenshots go to .artifacts/.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { kits, sites, users } from "@/db/schema";
import { DEMO_PEOPLE } from "@/db/seed/people";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { encodeFits } from "@/lib/media/fits-write";
import { launchBrowser, snap } from "../support/browser";
import { signIn } from "../support/sign-in";
import { APP, requireTestDatabase } from "../support/env";

requireTestDatabase();
let browser: Browser;
let dir: string;
const files: string[] = [];
const ip = () => `10.89.${Math.floor(Math.random() * 250)}.${Math.floor(Math.random() * 250)}`;
const member = DEMO_PEOPLE.find((p) => p.email.startsWith("oskar"))!;
const siteName = `Luxor, Crocodile Island ${Date.now().toString(36)}`;
const kitName = `Refractor 600 mm ${Date.now().toString(36)}`;

beforeAll(async () => {
  browser = await launchBrowser();
  // The member's site, made directly: the site form has its own journey.
  const db = getDb();
  const [owner] = await db.select({ id: users.id }).from(users).where(eq(users.email, member.email));
  await db.insert(sites).values({ ownerId: owner.id, name: siteName, kind: "fixed", latDeg: 25.67, lonDeg: 32.65 });
  // An equatorial mount squared to north gives the image orientation (a bracket of a few seconds cannot).
  await db.insert(kits).values({ ownerId: owner.id, name: kitName, camera: "Mono camera", sensorWidthMm: 10, sensorHeightMm: 8, pixelPitchUm: 5, focalMm: 600, fNumber: 7, mount: "equatorial" });

  // Mid-totality at Luxor; the third file has no EXPTIME card, as a camera
  // driver that forgets it would write.
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "crownlight-e2e-bracket-"));
  const { frames } = synthesizeBracket({
    width: 256,
    height: 224,
    channels: 1,
    exposuresS: [1 / 500, 1 / 125, 1 / 30, 1 / 8],
    sunRadiusPx: 40,
    seed: 23,
    whiteLevel: 16383,
    captureStartMs: Date.UTC(2027, 7, 2, 10, 4, 40),
    frameIntervalS: 2,
  });
  frames.forEach((f, i) => {
    const cards = [
      ...(i === 2 ? [] : [{ key: "EXPTIME", value: f.exposureS, comment: "seconds" }]),
      { key: "DATE-OBS", value: new Date(f.captureTimeMs).toISOString().replace("Z", "") },
      { key: "SATURATE", value: 16383 },
    ];
    const bytes = encodeFits({ width: 256, height: 224, planes: [Uint16Array.from(f.planes[0])], cards });
    const file = path.join(dir, `luxor-${String(i + 1).padStart(2, "0")}.fits`);
    fs.writeFileSync(file, bytes);
    files.push(file);
  });
}, 60_000);

afterAll(async () => {
  await browser?.close();
  fs.rmSync(dir, { recursive: true, force: true });
  await closeDb();
});

describe("a member's bracket, from disk to a reduction", () => {
  it("creates a set, uploads frames, corrects an exposure, reduces and shows the result", async () => {
    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 }, extraHTTPHeaders: { "x-forwarded-for": ip() } });
    const page = await signIn(ctx, member.email);

    await page.goto("/studio");
    await page.getByRole("link", { name: "New bracket set" }).click();
    await page.getByLabel("Name").fill("Second contact, 600 mm refractor");
    await page.getByLabel("Site").selectOption({ label: siteName });
    await page.getByLabel("Kit").selectOption({ label: kitName });
    await page.getByRole("button", { name: "Create bracket set" }).click();
    await page.getByRole("heading", { name: "Second contact, 600 mm refractor" }).waitFor({ timeout: 20_000 });
    const setUrl = page.url();
    expect(setUrl).toMatch(/\/studio\/sets\/[0-9a-f-]{36}$/);

    await page.getByLabel(/Choose frames/).setInputFiles(files);
    // Per-file and overall progress, then every file sent.
    await page.getByRole("progressbar", { name: "All files" }).waitFor();
    await page.getByText(`${files.length} of ${files.length} files sent`).first().waitFor({ timeout: 60_000 });
    await snap(page, "20-frames-uploaded");

    // Ingest finishes in the worker; the page refreshes itself while frames are checked.
    const exposure = page.getByLabel("Exposure of luxor-03.fits", { exact: true });
    await expect
      .poll(async () => (await exposure.count()) > 0 && (await page.getByText("being checked", { exact: true }).count()) === 0, { timeout: 60_000, interval: 500 })
      .toBe(true)
      .catch(async (err) => {
        await snap(page, "20-debug");
        throw err;
      });
    expect(await page.getByText("the file gives none").count()).toBe(1);
    await exposure.fill("1/30");
    await page.getByRole("button", { name: "Save the exposure of luxor-03.fits" }).click();
    await page.getByText("luxor-03.fits: exposure set to 1/30 s.").waitFor({ timeout: 15_000 });
    await expect.poll(() => page.getByText("the file gives none").count(), { timeout: 15_000 }).toBe(0);
    await snap(page, "21-frames-triaged");

    // Start a reduction with the default parameters and watch it.
    await page.getByRole("button", { name: "Start reduction" }).click();
    await page.waitForURL(/\/studio\/reductions\/[0-9a-f-]{36}$/, { timeout: 20_000 });
    await page.getByRole("progressbar").first().waitFor({ timeout: 15_000 }).catch(() => undefined);
    await snap(page, "22-reduction-running");
    await page.getByRole("img", { name: /structure/i }).first().waitFor({ timeout: 180_000 });
    expect(await page.getByRole("img", { name: /natural/i }).first().isVisible()).toBe(true);
    await snap(page, "23-reduction-done");
    await ctx.close();
  }, 300_000);
});
