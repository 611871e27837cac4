// A real camera's bracket through the browser: light frames whose FITS files keep
// the sensor's offset and name it nowhere, carry no capture time, show hot pixels
// and a satellite trail and include a frame under a passing cloud, uploaded with
// bias, dark and flat frames of the same sensor (our own synthetic sensor,
// lib/imaging/synth-calibration.ts). The member marks the calibration frames,
// reduces on the corona, and the reduction page names every correction: the
// calibration applied, each frame's offset and its source, the dimmed frame, and
// that the master has no WCS because the frames have no times.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { kits, sites, users } from "@/db/schema";
import { DEMO_PEOPLE } from "@/db/seed/people";
import { createSensorModel, recordLightFrames, synthesizeBiasFrames, synthesizeDarkFrames, synthesizeFlatFrames } from "@/lib/imaging/synth-calibration";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import type { LinearFrame } from "@/lib/imaging/types";
import { encodeFits } from "@/lib/media/fits-write";
import { launchBrowser, snap } from "../support/browser";
import { signIn } from "../support/sign-in";
import { APP, requireTestDatabase } from "../support/env";
import { seriousViolations } from "../support/axe";

requireTestDatabase();
const WIDTH = 256;
const HEIGHT = 224;
// A ladder to 4 s with one exposure repeated (the trail falls in one of the two 1/60 s frames).
const EXPOSURES = [1 / 1000, 1 / 250, 1 / 60, 1 / 60, 1 / 15, 1 / 4, 1, 4];
const CLOUDY = 5;
let browser: Browser;
let dir: string;
const lights: string[] = [];
const calibration: { file: string; kind: "bias" | "dark" | "flat" }[] = [];
const member = DEMO_PEOPLE.find((p) => p.email.startsWith("nadia"))!;
const tag = Date.now().toString(36);
const siteName = `Cadiz, harbour wall ${tag}`;
const kitName = `Astronomy camera on a 400 mm lens ${tag}`;

/** FITS as an astronomy camera writes it: raw DN with the offset in, the exposure, and no DATE-OBS. */
function writeFrame(frame: LinearFrame, name: string): string {
  const file = path.join(dir, name);
  const planes = [Uint16Array.from(frame.image.planes[0], (v) => Math.max(0, Math.min(65535, Math.round(v))))];
  fs.writeFileSync(file, encodeFits({ width: WIDTH, height: HEIGHT, planes, cards: [{ key: "EXPTIME", value: frame.exposureS, comment: "seconds" }, { key: "SATURATE", value: 16383 }] }));
  return file;
}

beforeAll(async () => {
  browser = await launchBrowser();
  const db = getDb();
  const [owner] = await db.select({ id: users.id }).from(users).where(eq(users.email, member.email));
  await db.insert(sites).values({ ownerId: owner.id, name: siteName, kind: "fixed", latDeg: 36.53, lonDeg: -6.29 });
  await db.insert(kits).values({ ownerId: owner.id, name: kitName, camera: "Mono astronomy camera", sensorWidthMm: 5, sensorHeightMm: 4.4, pixelPitchUm: 20, focalMm: 400, fNumber: 5.6, mount: "equatorial" });

  dir = fs.mkdtempSync(path.join(os.tmpdir(), "crownlight-e2e-real-camera-"));
  const scene = synthesizeBracket({
    width: WIDTH, height: HEIGHT, channels: 1, exposuresS: EXPOSURES, sunRadiusPx: 32, seed: 61, whiteLevel: 16383, blackLevel: 0, noise: false,
    clouds: [{ frame: CLOUDY, transmission: 0.6 }],
    trail: { frame: 2, from: { x: 0, y: 30 }, to: { x: WIDTH - 1, y: 190 }, sigmaPx: 1.2, peakDn: 3000 },
    shiftsPx: EXPOSURES.map((_, i) => ({ dx: (i % 3) - 1, dy: ((i + 1) % 3) - 1 })),
  });
  const sensor = createSensorModel({ width: WIDTH, height: HEIGHT, channels: 1, seed: 62, electronsPerDn: 4 });
  recordLightFrames(sensor, scene, { seed: 63 }).forEach((f, i) => lights.push(writeFrame(f, `cadiz-${String(i + 1).padStart(2, "0")}.fits`)));
  synthesizeBiasFrames(sensor, 5, 64).forEach((f, i) => calibration.push({ file: writeFrame(f, `bias-${i + 1}.fits`), kind: "bias" }));
  synthesizeDarkFrames(sensor, [1, 1, 1], 65).forEach((f, i) => calibration.push({ file: writeFrame(f, `dark-1s-${i + 1}.fits`), kind: "dark" }));
  synthesizeFlatFrames(sensor, 5, { levelDn: 8000, exposureS: 0.5, seed: 66 }).forEach((f, i) => calibration.push({ file: writeFrame(f, `flat-${i + 1}.fits`), kind: "flat" }));
}, 120_000);

afterAll(async () => {
  await browser?.close();
  fs.rmSync(dir, { recursive: true, force: true });
  await closeDb();
});

describe("a real camera's bracket with calibration frames, from disk to a named list of corrections", () => {
  it("uploads lights and calibration frames, marks their kinds, reduces on the corona and shows every correction", async () => {
    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, member.email);

    await page.goto("/studio");
    await page.getByRole("link", { name: "New bracket set" }).click();
    await page.getByLabel("Name").fill(`Third contact with calibration frames ${tag}`);
    await page.getByLabel("Site").selectOption({ label: siteName });
    await page.getByLabel("Kit").selectOption({ label: kitName });
    await page.getByRole("button", { name: "Create bracket set" }).click();
    await page.getByRole("heading", { name: `Third contact with calibration frames ${tag}` }).waitFor({ timeout: 20_000 });

    const all = [...lights, ...calibration.map((c) => c.file)];
    await page.getByLabel(/Choose frames/).setInputFiles(all);
    await page.getByText(`${all.length} of ${all.length} files sent`).first().waitFor({ timeout: 120_000 });
    // Every frame ingested (the checks finished) before kinds are changed.
    await expect.poll(() => page.getByText("being checked", { exact: true }).count(), { timeout: 120_000, interval: 1000 }).toBe(0);

    for (const c of calibration) {
      const name = path.basename(c.file);
      await page.getByLabel(`Kind of ${name}`, { exact: true }).selectOption(c.kind);
      await expect.poll(async () => page.getByLabel(`Kind of ${name}`, { exact: true }).inputValue(), { timeout: 15_000 }).toBe(c.kind);
    }
    await page.reload();
    for (const c of calibration) expect(await page.getByLabel(`Kind of ${path.basename(c.file)}`, { exact: true }).inputValue()).toBe(c.kind);
    await snap(page, "real-camera-01-frames-marked");

    // The frames carry no capture time: registration on the corona still works (the master has no WCS then).
    await page.getByLabel("Align frames on").selectOption("corona");
    await page.getByRole("button", { name: "Start reduction" }).click();
    await page.waitForURL(/\/studio\/reductions\/[0-9a-f-]{36}$/, { timeout: 20_000 });
    // The page counts frames through the stages that work frame by frame (the flow's parts).
    const frameCount = page.getByText(/^Frames (decoded|measured|merged|merged in the first pass): \d+ of 8$/).first();
    await frameCount.waitFor({ timeout: 120_000 });
    // The list of this set's reductions follows: the one running is no longer listed as queued.
    await page.getByRole("table", { name: /newest first/ }).getByRole("row").filter({ hasText: "This one" }).getByText("running", { exact: true }).waitFor({ timeout: 20_000 });
    await snap(page, "real-camera-01b-progress");
    await page.getByRole("heading", { name: "Corrections and frames left out" }).waitFor({ timeout: 300_000 });
    const section = page.locator(`section[aria-labelledby="corrections"]`);
    await snap(page, "real-camera-02-corrections");

    const text = (await section.innerText()).replace(/\s+/g, " ");
    expect(text).toMatch(/Calibrated with a bias master from 5 frames; dark masters at 1 exposure from 3 frames/);
    expect(text).toMatch(/a flat from 5 frames/);
    expect(text).toMatch(/sensor defects? \(hot, stuck or dead pixels\) masked/);
    expect(text).toMatch(/no helioprojective WCS/i);
    expect(text).toMatch(/no capture time/);
    // Every light frame's offset came from the calibration frames; the clouded one is named.
    for (const light of lights) expect(text).toContain(path.basename(light));
    expect(text.match(/from the bias or dark frames/g)?.length).toBe(lights.length);
    expect(text).toMatch(new RegExp(`cadiz-0${CLOUDY + 1}\\.fits: dimmed to (5[5-9]|6[0-5]) %`));
    expect(text).toMatch(/Frames left out None: every frame was used/);
    expect(await seriousViolations(page)).toEqual([]);
    await ctx.close();
  }, 600_000);
});
