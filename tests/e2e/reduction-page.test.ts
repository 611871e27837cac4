// The reduction page in Chromium: a member watches a running reduction's
// progress (mirrored in PostgreSQL, polled by the page) until it finishes, and
// then sees its results: both renditions, the radial profile, the coverage map,
// the stage log and the downloads. The outputs are made by the real runner from
// a small synthetic bracket (our own generator) and stored in the S3 fake, as
// the worker stores them. The list of the set's reductions follows another run
// that fails, with its reason in words; the page fits a phone. Screenshots go
// to .artifacts/.
import { readdirSync, readFileSync, rmSync } from "node:fs";
import { join } from "node:path";
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { reductions, users } from "@/db/schema";
import { DEMO_PEOPLE } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { runReductionOnFiles } from "@/lib/reduction-runner";
import { bucketName, putObjectBytes, buildReductionPrefix } from "@/lib/storage";
import { findOutputContentType } from "@/lib/reductions/files/manifest";
import { APP, requireTestDatabase } from "../support/env";
import { launchBrowser, snap } from "../support/browser";
import { seriousViolations } from "../support/axe";
import { signIn } from "../support/sign-in";
import { expectNoSidewaysScroll } from "../support/layout";
import { createSetFor } from "../integration/bracket-upload-helpers";
import { writeBracketFixture, type BracketFixture } from "../unit/reduction-runner/bracket-fixture";

requireTestDatabase();
const db = getDb();
const member = DEMO_PEOPLE.find((p) => p.roles.join() === "member")!;
const params = { registration: "moon", filter: "mgn", recoverResponse: false, filterStrength: 0.3, outputLongSidePx: 0, groupNumber: null } as const;

let browser: Browser;
let page: Page;
let fixture: BracketFixture;
let setId = "";
let reductionId = "";
let outputs: Record<string, string> = {};
let measurements: Record<string, unknown> = {};

/** Every file of a finished output folder, stored under the reduction's prefix as the worker stores it. */
async function storeOutputs(outDir: string, prefix: string): Promise<void> {
  const files = readdirSync(outDir, { recursive: true, withFileTypes: true }).filter((e) => e.isFile());
  for (const e of files) {
    const rel = join(e.parentPath, e.name).slice(outDir.length + 1);
    await putObjectBytes({ bucket: bucketName("derived"), key: prefix + rel }, readFileSync(join(outDir, rel)), findOutputContentType(rel));
  }
}

beforeAll(async () => {
  const [user] = await db.select({ id: users.id }).from(users).where(eq(users.email, member.email));
  const owner: Actor = { userId: user.id, email: member.email, name: member.name, roles: ["member"] };
  setId = await createSetFor(db, owner, "Luxor: long lens, second bracket");
  const [row] = await db.insert(reductions).values({ bracketSetId: setId, requestedBy: owner.userId, params, state: "running", stage: "merge", progress: 0.4 }).returning({ id: reductions.id });
  reductionId = row.id;

  fixture = await writeBracketFixture();
  const outDir = join(fixture.dir, "..", "out");
  const { report } = await runReductionOnFiles({ files: fixture.filesOf("fits"), outDir, params: { registration: "moon" } });
  const prefix = buildReductionPrefix(setId, reductionId);
  await storeOutputs(outDir, prefix);
  outputs = { prefix, master: `${prefix}master.fits`, report: `${prefix}report.json` };
  measurements = { ...report.overall, parameters: report.parameters, timingsMs: report.timingsMs };

  browser = await launchBrowser();
  const ctx = await browser.newContext({ baseURL: APP });
  page = await signIn(ctx, member.email);
}, 180_000);

afterAll(async () => {
  await browser?.close();
  if (fixture) rmSync(join(fixture.dir, ".."), { recursive: true, force: true });
  await closeDb();
});

describe("the reduction page", () => {
  it("follows a running reduction's progress and shows the results when it finishes", async () => {
    await page.goto(`/studio/reductions/${reductionId}`);
    await expect(page.getByRole("heading", { level: 1 }).innerText()).resolves.toBe("Reduction of Luxor: long lens, second bracket");
    const bar = page.getByRole("progressbar");
    await expect(bar.getAttribute("aria-valuenow")).resolves.toBe("40");
    await expect(page.getByRole("status").filter({ hasText: "Merging." }).count()).resolves.toBe(1);

    // The worker moves on: the page reads it from PostgreSQL without a reload.
    await db.update(reductions).set({ stage: "tiles", progress: 0.8 }).where(eq(reductions.id, reductionId));
    await page.waitForFunction(() => document.querySelector('[role="progressbar"]')?.getAttribute("aria-valuenow") === "80", undefined, { timeout: 15_000 });
    await expect(page.getByText("Cutting tiles").first().isVisible()).resolves.toBe(true);
    await snap(page, "reduction-01-running");

    await db
      .update(reductions)
      .set({ state: "done", stage: "done", progress: 1, finishedAt: new Date(), pipelineVersion: "crownlight-imaging 0.1.0", outputs, measurements })
      .where(eq(reductions.id, reductionId));
    // Done: the page refreshes itself and the server renders the results.
    await page.getByRole("heading", { name: "Renditions" }).waitFor({ timeout: 20_000 });
    await expect(page.getByRole("progressbar").count()).resolves.toBe(0);
  }, 60_000);

  it("shows both renditions, the profile with its table, the coverage map, the stage log and downloads", async () => {
    await page.goto(`/studio/reductions/${reductionId}`);
    for (const name of ["Natural rendition of the corona from Luxor: long lens, second bracket", "Structure rendition of the corona from Luxor: long lens, second bracket"]) {
      const img = page.getByRole("img", { name });
      await img.scrollIntoViewIfNeeded();
      await page.waitForFunction((alt) => [...document.images].some((i) => i.alt === alt && i.complete && i.naturalWidth > 0), name, { timeout: 15_000 });
    }
    const coverage = page.getByRole("img", { name: /^Coverage map: brighter where more of the 5 frames contributed/ });
    await expect(coverage.count()).resolves.toBe(1);
    await page.waitForFunction(() => [...document.images].some((i) => i.alt.startsWith("Coverage map") && i.complete && i.naturalWidth > 0), undefined, { timeout: 15_000 });

    await expect(page.getByRole("img", { name: /^Radial brightness profile/ }).count()).resolves.toBe(1);
    await page.getByText("The profile as a table").click();
    const profileRows = await page.getByRole("table", { name: "Mean brightness in rings about the Sun's centre" }).getByRole("row").count();
    expect(profileRows).toBeGreaterThan(10);

    await expect(page.getByText("Dynamic range").count()).resolves.toBe(1);
    await expect(page.getByRole("table", { name: "Stage log: time taken by each stage" }).getByRole("row").count()).resolves.toBeGreaterThan(4);

    const master = page.getByRole("link", { name: "Master FITS" });
    await expect(master.getAttribute("href")).resolves.toBe(`/api/reductions/${reductionId}/files/master.fits?download=1`);
    const res = await page.request.get(`/api/reductions/${reductionId}/files/master.fits?download=1`);
    expect(res.status()).toBe(200);
    expect(res.headers()["content-type"]).toBe("application/fits");
    expect(res.headers()["content-disposition"]).toMatch(/^attachment; filename="luxor-long-lens-second-bracket-[0-9a-f]{8}-master.fits"$/);
    // FITS files begin with the SIMPLE card (FITS Standard 4.0).
    expect((await res.body()).subarray(0, 30).toString("latin1")).toMatch(/^SIMPLE  =\s+T/);
    await expect(page.getByRole("link", { name: "Back to the bracket set" }).getAttribute("href")).resolves.toBe(`/studio/sets/${setId}`);
    await snap(page, "reduction-02-done");
  }, 60_000);

  it("lists the set's reductions and checks a new one's parameters in the browser before the server", async () => {
    await page.goto(`/studio/reductions/${reductionId}`);
    const list = page.getByRole("table", { name: "Reductions of Luxor: long lens, second bracket, newest first" });
    await expect(list.getByRole("row").count()).resolves.toBe(2);
    await expect(list.getByText("This one").count()).resolves.toBe(1);

    await page.getByText("Start another reduction of this set with other parameters").click();
    const strength = page.getByRole("spinbutton", { name: /^Structure strength/ });
    // Prefilled with this reduction's parameters.
    await expect(strength.inputValue()).resolves.toBe("0.3");
    await expect(page.getByRole("combobox", { name: /^Align frames on/ }).inputValue()).resolves.toBe("moon");
    await strength.fill("2");
    await page.getByRole("button", { name: "Start another reduction" }).click();
    // The shared zod schema refuses it in the browser: the problem sits under the field's label.
    // The check runs in the browser as the form is sent; its marks come with the next render, so they are waited for.
    await expect.poll(() => strength.getAttribute("aria-invalid"), { timeout: 15_000 }).toBe("true");
    await page.getByText("must be at most 1").waitFor({ timeout: 15_000 });
    await expect(page.getByRole("alert").filter({ hasText: "Please correct the marked field." }).count()).resolves.toBe(1);
    await snap(page, "reduction-03-form-refused");

    // A valid form goes to the server, which refuses it: the set has no usable frames. Nothing is started.
    await strength.fill("0.5");
    await page.getByRole("button", { name: "Start another reduction" }).click();
    await page.getByRole("alert").filter({ hasText: /light frame/ }).waitFor({ timeout: 15_000 });
    expect(page.url()).toBe(`${APP}/studio/reductions/${reductionId}`);
    expect(await db.select({ id: reductions.id }).from(reductions).where(eq(reductions.bracketSetId, setId))).toHaveLength(1);
  }, 60_000);

  it("follows another run of the set until it fails, and says why in words", async () => {
    const [other] = await db
      .insert(reductions)
      .values({ bracketSetId: setId, requestedBy: (await db.select({ id: users.id }).from(users).where(eq(users.email, member.email)))[0].id, params: { ...params, registration: "sun" }, state: "running", stage: "register", progress: 0.2 })
      .returning({ id: reductions.id });
    await page.goto(`/studio/reductions/${reductionId}`);
    const list = page.getByRole("table", { name: "Reductions of Luxor: long lens, second bracket, newest first" });
    await expect(list.getByText("running").count()).resolves.toBe(1);
    // The worker fails it with the reason it stores for people (lib/reductions/failure-text.ts).
    await db
      .update(reductions)
      .set({ state: "failed", error: "These frames have no capture time: a.tif. Give their times on the bracket set's page.", finishedAt: new Date() })
      .where(eq(reductions.id, other.id));
    await list.getByText("failed").waitFor({ timeout: 20_000 });
    await expect(list.getByText("These frames have no capture time: a.tif.", { exact: false }).isVisible()).resolves.toBe(true);
    expect(await page.getByText(/--[a-z]/).count()).toBe(0);
    // An older reason that still names the command line is worded on reading.
    await db.update(reductions).set({ error: "--register sun: the observer's site is required" }).where(eq(reductions.id, other.id));
    await page.reload();
    await expect(list.getByText("alignment on the Sun's centre: the observer's site is required", { exact: false }).count()).resolves.toBe(1);
    await db.delete(reductions).where(eq(reductions.id, other.id));
  }, 60_000);

  it("fits a phone without sideways scroll and passes axe", async () => {
    await page.setViewportSize({ width: 390, height: 844 });
    await page.goto(`/studio/reductions/${reductionId}`);
    await page.getByRole("heading", { name: "Renditions" }).waitFor({ timeout: 15_000 });
    await expectNoSidewaysScroll(page);
    expect(await seriousViolations(page)).toEqual([]);
    await snap(page, "reduction-04-phone");
    await page.setViewportSize({ width: 1280, height: 720 });
  }, 60_000);
});
