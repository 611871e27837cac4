// The editor's journey in Chromium: start an edition, add two published plates,
// lay them out in different slots (single column and full width), make the
// print bundle with a CMYK variant, watch its progress to the end, and
// download the ZIP, which holds exactly the files its metadata JSON lists.
// axe-core checks the builder with the bundle panel. Screenshots in .artifacts/.
import { mkdtemp, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { seriousViolations } from "../support/axe";
import { launchBrowser, snap } from "../support/browser";
import { APP, requireTestDatabase } from "../support/env";
import { signIn } from "../support/sign-in";
import { readZipEntries } from "../support/zip";
import { makeExportablePlate, person } from "../integration/edition-fixtures";
import { PDFDocument } from "pdf-lib";
import { expectPeopleWording } from "../support/wording";

requireTestDatabase();
const db = getDb();
let browser: Browser;
let dir = "";
const tag = Date.now().toString(36);

beforeAll(async () => {
  await makeExportablePlate(db, `e2e-${tag}`, 1, "exact", true, true);
  await makeExportablePlate(db, `e2e-${tag}`, 2, "rounded", false, false);
  dir = await mkdtemp(join(tmpdir(), "crownlight-e2e-bundle-"));
  browser = await launchBrowser();
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
  if (dir) await rm(dir, { recursive: true, force: true });
});

describe("the editor's edition", () => {
  it("goes from published plates to a downloaded print bundle", async () => {
    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 }, acceptDownloads: true });
    const page = await signIn(ctx, person("editor").email);

    await page.goto("/editions");
    await expectPeopleWording(page);
    await page.getByLabel("Title").fill(`Corona Notes ${tag}`);
    await page.getByLabel("Issue label").fill("No. 42");
    await page.getByRole("button", { name: "Start the edition" }).click();
    await page.waitForURL(/\/editions\/[0-9a-f-]{36}$/);

    await page.getByRole("searchbox", { name: "Search title, caption or observer" }).fill(tag);
    await page.getByRole("button", { name: "Search", exact: true }).click();
    for (const n of [1, 2]) {
      const title = `Export plate ${n} — Łódź e2e-${tag}`;
      await page.getByRole("button", { name: `Add “${title}” to the edition` }).click();
      await page.getByRole("form", { name: `Layout of “${title}”` }).waitFor();
    }
    const layouts: [number, string][] = [
      [1, "Single column, 88 mm at 300 dpi"],
      [2, "Full width, 180 mm at 300 dpi"],
    ];
    for (const [n, slot] of layouts) {
      const form = page.getByRole("form", { name: `Layout of “Export plate ${n} — Łódź e2e-${tag}”` });
      await form.getByLabel("Layout slot").selectOption({ label: slot });
      await form.getByRole("button", { name: "Save layout" }).click();
      await form.getByRole("status").filter({ hasText: "Saved." }).waitFor();
    }
    // The 1600 px rendition is too small for 180 mm at 300 dpi (2126 px): the builder warns.
    await page.getByText(/needs 2126 x 1595 px but the rendition has 1600 x 1200 px/).waitFor();
    await expectPeopleWording(page);
    await snap(page, "editions-01-laid-out");

    const panel = page.getByRole("region", { name: "Print bundle" });
    await panel.getByLabel("CMYK TIFF for the printer").check();
    await panel.getByRole("button", { name: "Make print bundle" }).click();
    await panel.getByRole("progressbar").first().waitFor();
    await snap(page, "editions-02-exporting");
    const link = panel.getByRole("link", { name: /^Download .*\.zip$/ });
    await link.waitFor({ timeout: 120_000 });
    await page.getByRole("status").filter({ hasText: "The print bundle is ready to download." }).waitFor();
    await panel.getByText(/prints 180 mm wide at 225.8 dpi/).waitFor();
    expect(await seriousViolations(page, "#main")).toEqual([]);
    await snap(page, "editions-03-bundle-ready");

    const [download] = await Promise.all([page.waitForEvent("download"), link.click()]);
    const path = join(dir, download.suggestedFilename());
    await download.saveAs(path);
    expect(download.suggestedFilename()).toMatch(/^Corona-Notes-.*_No.-42_print-bundle\.zip$/);
    const entries = await readZipEntries(await readFile(path));
    const meta = JSON.parse(entries.get("metadata.json")!.toString("utf8")) as { files: { name: string; kind: string }[] };
    expect([...entries.keys()].filter((n) => n !== "metadata.json").sort()).toEqual(meta.files.map((f) => f.name).sort());
    expect(meta.files.filter((f) => f.kind === "tiff-cmyk")).toHaveLength(2);
    expect((await readFile(path)).subarray(0, 2).toString("latin1")).toBe("PK");
    // The printer's README names the CMYK profile in words and says how to have their own used.
    const readme = entries.get("README.txt")!.toString("utf8");
    expect(readme).toContain("“Chemical proof”: the general-purpose CMYK profile built into the libvips image library");
    expect(readme).toMatch(/USING YOUR OWN PROFILE\nTo have the CMYK files made with your press and paper profile/);
    expect(readme).toMatch(/CHECK BEFORE PRINTING\n- Plate 2: /);
    // Every page of the proof has one size; the full-width plate fits on A4.
    const proof = await PDFDocument.load(entries.get("proof.pdf")!);
    expect(new Set(proof.getPages().map((p) => `${Math.round(p.getWidth())}x${Math.round(p.getHeight())}`)).size).toBe(1);

    // Exported: the plates are fixed until the editor reopens the edition.
    await page.getByRole("button", { name: "Reopen for changes" }).waitFor();
    await ctx.close();
  }, 240_000);
});
