// A member takes a bracket from files on disk to a reduction in the browser,
// walking every dead end this journey used to have: creates a bracket set
// without a kit (the page says north would be unknown, and the kit is chosen
// there), uploads a synthetic bracket whose files carry no capture time plus a
// duplicate and a file that is not what it claims (the uploader's list follows
// each to its end: measured, duplicate, refused), removes the two bad frames,
// sees alignment on the Sun not offered and why, gives the times from a CSV
// (a bad one first: refused with its line and column), corrects an exposure
// (a value out of range is shown on its row), reads the kit's plate-scale
// warning and the reach of the bracket, reduces aligned on the Sun, and submits
// for review (the confirmation takes the focus). Phone-size screenshots with no
// sideways scroll and axe checks on the way. Screenshots go to .artifacts/.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { bracketSets, frames as frameRows, kits, sites, users } from "@/db/schema";
import { DEMO_PEOPLE } from "@/db/seed/people";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { encodeFits } from "@/lib/media/fits-write";
import { seriousViolations } from "../support/axe";
import { launchBrowser, snap } from "../support/browser";
import { expectNoSidewaysScroll } from "../support/layout";
import { signIn } from "../support/sign-in";
import { APP, requireTestDatabase } from "../support/env";

requireTestDatabase();
let browser: Browser;
let dir: string;
const files: string[] = [];
const member = DEMO_PEOPLE.find((p) => p.email.startsWith("oskar"))!;
const siteName = `Luxor, Crocodile Island ${Date.now().toString(36)}`;
const kitName = `Refractor 600 mm ${Date.now().toString(36)}`;
const setName = `Second contact, 600 mm refractor ${Date.now().toString(36)}`;
const START_MS = Date.UTC(2027, 7, 2, 10, 4, 40);
const INTERVAL_S = 2;

beforeAll(async () => {
  browser = await launchBrowser();
  // The member's site, made directly: the site form has its own journey.
  const db = getDb();
  const [owner] = await db.select({ id: users.id }).from(users).where(eq(users.email, member.email));
  await db.insert(sites).values({ ownerId: owner.id, name: siteName, kind: "fixed", latDeg: 25.67, lonDeg: 32.65 });
  // An equatorial mount squared to north gives the image orientation (a bracket of a few seconds cannot).
  // Its 600 mm and 5 um pitch (1.72 arcsec/px) are not what the small synthetic frames show (the Moon about 40 px across in radius): the page warns.
  await db.insert(kits).values({ ownerId: owner.id, name: kitName, camera: "Mono camera", sensorWidthMm: 10, sensorHeightMm: 8, pixelPitchUm: 5, focalMm: 600, fNumber: 7, mount: "equatorial" });

  // Mid-totality at Luxor. No file has a DATE-OBS card, as TIFFs from a raw
  // converter have no time; the third has no EXPTIME either.
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "crownlight-e2e-bracket-"));
  const { frames } = synthesizeBracket({
    width: 256,
    height: 224,
    channels: 1,
    exposuresS: [1 / 500, 1 / 125, 1 / 30, 1 / 8],
    sunRadiusPx: 40,
    seed: 23,
    whiteLevel: 16383,
    captureStartMs: START_MS,
    frameIntervalS: INTERVAL_S,
  });
  frames.forEach((f, i) => {
    const cards = [...(i === 2 ? [] : [{ key: "EXPTIME", value: f.exposureS, comment: "seconds" }]), { key: "SATURATE", value: 16383 }];
    const bytes = encodeFits({ width: 256, height: 224, planes: [Uint16Array.from(f.planes[0])], cards });
    const file = path.join(dir, `luxor-${String(i + 1).padStart(2, "0")}.fits`);
    fs.writeFileSync(file, bytes);
    files.push(file);
  });
  // The same bytes again under another name (refused as a duplicate at ingest), and text that claims to be FITS (refused on arrival).
  fs.copyFileSync(files[0], path.join(dir, "luxor-01-copy.fits"));
  fs.writeFileSync(path.join(dir, "notes.fits"), "These are notes, not an image.\n".repeat(20));
}, 60_000);

afterAll(async () => {
  await browser?.close();
  fs.rmSync(dir, { recursive: true, force: true });
  await closeDb();
});

describe("a member's bracket, from disk to a reduction", () => {
  it("walks the set page's dead ends: kit and north, bad files, missing times, a bad CSV, an exposure out of range, the reduction and the submission", async () => {
    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, member.email);

    await page.goto("/studio");
    await page.getByRole("link", { name: "New bracket set" }).click();
    await page.getByLabel("Name").fill(setName);
    await page.getByLabel("Site").selectOption({ label: siteName });
    await page.getByLabel("Kit").selectOption({ label: "No kit" });
    await page.getByRole("button", { name: "Create bracket set" }).click();
    await page.getByRole("heading", { name: setName }).waitFor({ timeout: 20_000 });
    const setUrl = page.url();
    expect(setUrl).toMatch(/\/studio\/sets\/[0-9a-f-]{36}$/);
    const setId = setUrl.split("/").pop()!;

    // No kit: the page says north would be estimated or unknown, before any run, and offers the kit.
    // Waits for the text (a loaded machine renders late): isVisible alone does not wait.
    await page.getByText("No kit is chosen, so nothing says where north is in the image", { exact: false }).first().waitFor({ timeout: 15_000 });
    await page.getByLabel("Kit the frames were taken with").selectOption({ label: kitName });
    await page.getByRole("button", { name: "Save kit" }).click();
    await page.getByText(`North in the image comes from the equatorial mount of the kit “${kitName}”.`).waitFor({ timeout: 15_000 });

    // No progress bar moves before a file is chosen; the picker offers only the formats we read.
    expect(await page.getByRole("progressbar").count()).toBe(0);
    const picker = page.getByLabel(/Choose frames/);
    expect((await picker.getAttribute("accept"))?.split(",")).toEqual(expect.arrayContaining([".fits", ".tif", ".dng", ".cr3", ".jpg", ".png"]));

    await picker.setInputFiles([...files, path.join(dir, "notes.fits")]);
    await page.getByRole("progressbar", { name: "All files" }).waitFor();
    // Every file to its end state: measured, or refused with the reason.
    const uploads = page.getByRole("list", { name: "Files being sent" });
    const settle = async (done: () => Promise<boolean>) =>
      expect
        .poll(done, { timeout: 90_000, interval: 500 })
        .toBe(true)
        .catch(async (err) => {
          await snap(page, "20-debug");
          throw err;
        });
    await settle(async () => (await uploads.getByText("Measured", { exact: false }).count()) === files.length);
    // The refused file reaches its end state on its own time: wait for it too (under load it came after the others).
    await settle(async () => (await uploads.getByText(/notes\.fits: the content is/).count()) === 1);
    // The same bytes again under another name, once the first copy is measured: a duplicate, not stored twice.
    await picker.setInputFiles([path.join(dir, "luxor-01-copy.fits")]);
    await settle(async () => (await uploads.getByText(/^Duplicate: the same file as luxor-01\.fits/).count()) === 1);
    await snap(page, "20-frames-uploaded");

    // The refused and the duplicate frame are removed from the set (not only excluded).
    for (const name of ["notes.fits", "luxor-01-copy.fits"]) {
      await page.getByRole("button", { name: `Remove ${name}`, exact: true }).click();
      await page.getByRole("button", { name: `Yes, remove ${name}` }).click();
      await page.getByText(`${name} is removed from the set.`).waitFor({ timeout: 15_000 });
    }
    await expect.poll(() => page.getByRole("link", { name: /Download the original of (notes|luxor-01-copy)\.fits/ }).count(), { timeout: 15_000 }).toBe(0);
    const rows = await getDb().select({ name: frameRows.originalFileName }).from(frameRows).innerJoin(bracketSets, eq(bracketSets.id, frameRows.bracketSetId)).where(eq(bracketSets.id, setId));
    expect(rows.map((r) => r.name).sort()).toEqual(files.map((f) => path.basename(f)).sort());

    // No times in the files: alignment on the Sun is not offered, and the form says why.
    const align = page.getByRole("combobox", { name: /^Align frames on/ });
    await expect(align.locator('option[value="sun"]').isDisabled()).resolves.toBe(true);
    await expect(align.inputValue()).resolves.toBe("corona");
    await page.getByText(/Not offered: Aligning on the Sun's centre needs every frame's capture time; 4 of 4 frames have none/).first().waitFor({ timeout: 15_000 });

    // A bad CSV changes nothing and names the line and the column.
    const csvPath = path.join(dir, "times.csv");
    fs.writeFileSync(csvPath, "file,capture_time\nluxor-01.fits,2027-08-02T10:04:40Z\nluxor-02.fits,2027-08-02 10:04:42\nluxor-09.fits,10:04:50Z\n");
    await page.getByLabel("CSV file").setInputFiles(csvPath);
    await page.getByRole("button", { name: "Use this CSV" }).click();
    const refusal = page.getByRole("alert").filter({ hasText: "times.csv was not used, nothing was changed." });
    await refusal.waitFor({ timeout: 15_000 });
    await expect(refusal.innerText()).resolves.toMatch(/line 3, column capture_time: "2027-08-02 10:04:42" has no time zone/);
    await expect(refusal.innerText()).resolves.toMatch(/line 4, column capture_time: "10:04:50Z" is not a time/);
    await snap(page, "21-csv-refused");

    // The camera's own list: times as its clock showed them (the offset is 0 here), one with its zone offset.
    const lines = files.map((f, i) => `${path.basename(f)},${new Date(START_MS + i * INTERVAL_S * 1000).toISOString()}`);
    lines[1] = `luxor-02.fits,2027-08-02T12:04:42+02:00`;
    fs.writeFileSync(csvPath, `file,capture_time\n${lines.join("\n")}\n`);
    await page.getByLabel("CSV file").setInputFiles(csvPath);
    await page.getByRole("button", { name: "Use this CSV" }).click();
    await page.getByText("times.csv: Saved 4 capture times.").waitFor({ timeout: 15_000 });
    await expect.poll(() => page.getByText("from your CSV").count(), { timeout: 15_000 }).toBe(files.length);
    await expect(page.getByText("10:04:42.000 UTC").count()).resolves.toBeGreaterThan(0);
    await expect(align.locator('option[value="sun"]').isDisabled()).resolves.toBe(false);

    // The exposure the file lacks: a value out of range is refused on its row, then a good one is kept as typed.
    const exposure = page.getByLabel("Exposure of luxor-03.fits", { exact: true });
    expect(await page.getByText("the file gives none").count()).toBe(1);
    await exposure.fill("5000");
    await page.getByRole("button", { name: "Save the exposure of luxor-03.fits" }).click();
    await page.locator("#exposure-problem-" + (await exposure.getAttribute("id"))!.replace("exposure-", "")).getByText("must be at most 3600 s").waitFor({ timeout: 15_000 });
    await expect(exposure.getAttribute("aria-invalid")).resolves.toBe("true");
    await exposure.fill("1/30");
    await page.getByRole("button", { name: "Save the exposure of luxor-03.fits" }).click();
    await page.getByText("luxor-03.fits: exposure set to 1/30 s.").waitFor({ timeout: 15_000 });
    await expect.poll(() => page.getByText("the file gives none").count(), { timeout: 15_000 }).toBe(0);

    // The kit's scale against the frames', with both numbers; and the reach of each frame on one radius axis.
    const warning = page.getByRole("note").filter({ hasText: "The kit and the frames do not agree on the plate scale." });
    await expect(warning.innerText()).resolves.toMatch(new RegExp(`The frames show \\d+\\.\\d\\d″ per pixel .* the kit “${kitName}” gives 1\\.72″ per pixel`));
    await expect(page.getByRole("img", { name: /^Reach of 4 frames on one radius axis, shortest exposure at the top\. Together the included frames are well exposed from/ }).count()).resolves.toBe(1);
    expect(await seriousViolations(page)).toEqual([]);
    await snap(page, "22-frames-triaged");

    // The same page on a phone: the frame table is a list of cards, nothing scrolls sideways.
    await page.setViewportSize({ width: 390, height: 844 });
    await page.reload();
    await page.getByRole("heading", { name: setName }).waitFor();
    await expectNoSidewaysScroll(page);
    expect(await seriousViolations(page)).toEqual([]);
    await snap(page, "23-set-page-phone");
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.reload();

    // Aligned on the Sun's centre, now offered: the reduction runs and shows both renditions.
    await align.selectOption("sun");
    await page.getByRole("button", { name: "Start reduction" }).click();
    await page.waitForURL(/\/studio\/reductions\/[0-9a-f-]{36}$/, { timeout: 20_000 });
    await snap(page, "24-reduction-running");
    await page.getByRole("img", { name: `Structure rendition of the corona from ${setName}` }).waitFor({ timeout: 180_000 });
    await page.getByRole("img", { name: `Natural rendition of the corona from ${setName}` }).waitFor({ timeout: 15_000 });
    await expect(page.getByRole("note").filter({ hasText: "The kit and the frames do not agree on the plate scale." }).count()).resolves.toBe(1);
    await snap(page, "25-reduction-done");

    // Submitted: the confirmation is at the top of the page and holds the focus.
    await page.goto(setUrl);
    await page.getByRole("button", { name: "Submit for review" }).click();
    await page.getByRole("heading", { name: "Submitted for review" }).waitFor({ timeout: 20_000 });
    await expect.poll(() => page.evaluate(() => document.activeElement?.textContent ?? ""), { timeout: 10_000 }).toContain("Submitted for review");
    const [set] = await getDb().select({ state: bracketSets.state }).from(bracketSets).where(and(eq(bracketSets.id, setId)));
    expect(set.state).toBe("awaiting-review");
    await snap(page, "26-submitted");
    await ctx.close();
  }, 400_000);
});
