// An editor works on an edition with the keyboard: renames it (a bad title is
// named under its label), moves plates and keeps the focus on the pressed
// button (or its sibling at the bottom), takes a plate's newer version (the
// missing rendition is replaced and said so), and deletes the edition through
// the confirm dialog. axe-core checks the builder.
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { findRolesOfUser } from "@/db/queries/roles";
import { plates, plateVersions, reductions, users } from "@/db/schema";
import { DEMO_PEOPLE } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { addEditionItem, createEdition, findEdition, updateEditionItem } from "@/lib/editions/editions";
import { seriousViolations } from "../support/axe";
import { launchBrowser, snap } from "../support/browser";
import { signIn } from "../support/sign-in";
import { expectPeopleWording } from "../support/wording";
import { APP, requireTestDatabase } from "../support/env";
import { createMember, createSetFor, ECLIPSE_ID } from "../integration/bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
let browser: Browser;
const tag = Date.now().toString(36);
const editorEmail = DEMO_PEOPLE.find((p) => p.roles.includes("editor"))!.email;
let editor: Actor;
let editionId = "";
const titles = [1, 2, 3].map((n) => `Gulf of Gabes plate ${tag} ${n}`);

/** A published plate written directly, version 1 with both renditions. */
async function makePlate(owner: Actor, n: number): Promise<{ id: string; reductionId: string }> {
  const setId = await createSetFor(db, owner, `Builder set ${tag} ${n}`);
  const [red] = await db.insert(reductions).values({ bracketSetId: setId, params: { registration: "sun", filter: "mgn", recoverResponse: false }, state: "done", progress: 1 }).returning({ id: reductions.id });
  const [plate] = await db
    .insert(plates)
    .values({
      slug: `builder-${tag}-${n}`,
      bracketSetId: setId,
      eclipseId: ECLIPSE_ID,
      state: "published",
      title: titles[n - 1],
      caption: "Synthetic corona for the builder journey.",
      altText: "A dark disk with grey streamers.",
      acquiredBy: owner.name,
      processedBy: "Crownlight pipeline test",
      licence: "CC-BY-4.0",
      publishedAt: new Date(),
    })
    .returning({ id: plates.id });
  const facts = { exposuresS: [0.004], captureStartUtc: null, captureEndUtc: null, moonSilhouetteUtc: null, referenceFrame: null, dynamicRangeStops: null, masterSize: null };
  await db.insert(plateVersions).values({ plateId: plate.id, version: 1, reductionId: red.id, renditions: ["natural", "structure"], imageSizes: { natural: { width: 1024, height: 768 }, structure: { width: 1024, height: 768 } }, geometry: {}, facts });
  return { id: plate.id, reductionId: red.id };
}

const focusedLabel = (page: Page) => page.evaluate(() => document.activeElement?.getAttribute("aria-label") ?? document.activeElement?.textContent ?? "");

beforeAll(async () => {
  const owner = await createMember(db, `Rosalind Vey ${tag}`);
  const [row] = await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.email, editorEmail));
  editor = { userId: row.id, name: row.name, email: row.email, roles: await findRolesOfUser(db, row.id) };
  ({ id: editionId } = await createEdition(db, editor, { title: `Autumn bulletin ${tag}`, kind: "newsletter", issueLabel: "No. 43" }));
  const made = [];
  for (const n of [1, 2, 3]) made.push(await makePlate(owner, n));
  for (const p of made) await addEditionItem(db, editor, editionId, { plateId: p.id });
  // The second plate is laid out in the structure rendition; its version 2 publishes only the natural one.
  const second = (await findEdition(db, editor, editionId)).items[1];
  await updateEditionItem(db, editor, editionId, second.id, { slot: "web", rendition: "structure" });
  await db.insert(plateVersions).values({
    plateId: made[1].id,
    version: 2,
    reductionId: made[1].reductionId,
    renditions: ["natural"],
    imageSizes: { natural: { width: 2048, height: 1536 } },
    geometry: {},
    facts: { exposuresS: [0.004], captureStartUtc: null, captureEndUtc: null, moonSilhouetteUtc: null, referenceFrame: null, dynamicRangeStops: null, masterSize: null },
  });
  await db.update(plates).set({ currentVersion: 2 }).where(eq(plates.id, made[1].id));
  browser = await launchBrowser();
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await closeDb();
});

describe("the edition builder", () => {
  it("renames, reorders with the focus kept, takes a newer version and deletes, by keyboard", async () => {
    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, editorEmail);
    await page.goto(`/editions/${editionId}`);
    await page.getByRole("heading", { level: 1, name: `Autumn bulletin ${tag}` }).waitFor();
    expect(await seriousViolations(page, "#main")).toEqual([]);

    await expectPeopleWording(page);
    // Each plate shows its thumbnail, and its own caption as text beside the override (not as a placeholder).
    expect(await page.locator('ol[aria-label="Plates in print order"] img[src$="/preview.jpg"]').count()).toBe(3);
    const firstLayout = page.getByRole("form", { name: `Layout of “${titles[0]}”` });
    await firstLayout.getByText("Synthetic corona for the builder journey.").waitFor();
    expect(await firstLayout.getByLabel("Caption in this edition").getAttribute("placeholder")).toBeNull();
    // The needed-against-available panel follows the slot before it is saved: a cover needs 2480 px of the 1024 there are.
    await firstLayout.getByLabel("Layout slot").selectOption({ label: "Cover, 210 mm at 300 dpi" });
    const panel = firstLayout.getByRole("status").filter({ hasText: "Pixels needed and available" });
    await panel.getByText("not saved yet").waitFor();
    await panel.getByText("2480 x 1860 px", { exact: true }).waitFor();
    await panel.getByText(/would have to be enlarged by 142%/).waitFor();
    await firstLayout.getByLabel("Layout slot").selectOption({ label: "Web, 2048 px wide" });
    await panel.getByText("2048 x 1536 px", { exact: true }).waitFor();
    await firstLayout.getByLabel("Layout slot").selectOption({ label: "Custom width in mm and dpi" });
    await firstLayout.getByLabel("Width (mm)").fill("60");
    await firstLayout.getByLabel("Resolution (dpi)").fill("150");
    // round(60 / 25.4 x 150) = 354 px: large enough.
    await panel.getByText("354 x 266 px", { exact: true }).waitFor();
    await panel.getByText("Large enough: no enlargement.").waitFor();
    await snap(page, "edition-builder-00-live-panel");
    // Nothing was saved by choosing.
    expect((await findEdition(db, editor, editionId)).items[0].slot).not.toBe("custom");
    await page.reload();

    // Rename: an empty title is named under its label; then a good one is saved and announced.
    const name = page.getByRole("form", { name: "Name of the edition" });
    await name.getByLabel("Title").fill("   ");
    await name.getByLabel("Title").press("Enter");
    await name.getByText(/a title is required/).waitFor();
    expect(await name.getByLabel("Title").getAttribute("aria-invalid")).toBe("true");
    await name.getByLabel("Title").fill(`Kestrel Ridge Journal ${tag}`);
    await name.getByLabel("Kind").selectOption("journal");
    await name.getByLabel("Issue label").fill("Vol. 12, issue 4");
    await name.getByRole("button", { name: "Save name" }).click();
    await name.getByRole("status").filter({ hasText: `Saved: the edition is now called “Kestrel Ridge Journal ${tag}”.` }).waitFor();
    await page.getByRole("heading", { level: 1, name: `Kestrel Ridge Journal ${tag}` }).waitFor();

    // Order: the first plate goes down twice; the focus stays on its Down button, then moves to its Up button at the bottom.
    const down = `Down: move “${titles[0]}” later`;
    await page.getByRole("button", { name: down }).focus();
    await page.keyboard.press("Enter");
    await page.getByRole("status").filter({ hasText: `“${titles[0]}” is now number 2 of 3.` }).waitFor();
    expect(await focusedLabel(page)).toBe(down);
    await page.keyboard.press("Enter");
    await page.getByRole("status").filter({ hasText: `“${titles[0]}” is now number 3 of 3.` }).waitFor();
    expect(await focusedLabel(page)).toBe(`Up: move “${titles[0]}” earlier`);
    expect((await findEdition(db, editor, editionId)).items.map((i) => i.plate.title)).toEqual([titles[1], titles[2], titles[0]]);

    // The newer version of the second plate, whose structure rendition it no longer has.
    await page.getByText("Version 2 is newer.").waitFor();
    await page.getByRole("button", { name: `Use version 2 of “${titles[1]}”` }).click();
    const answer = page.getByText("Now version 2. Version 2 has no structure rendition, so the natural rendition is used instead.");
    await answer.waitFor();
    expect(await answer.evaluate((el) => el === document.activeElement)).toBe(true);
    await snap(page, "edition-builder-01-after-changes");
    const item = (await findEdition(db, editor, editionId)).items.find((i) => i.plate.title === titles[1]);
    expect(item).toMatchObject({ version: 2, rendition: "natural" });

    // Delete: the confirm step backs out with Escape, then deletes.
    const open = page.getByRole("button", { name: "Delete this edition…" });
    await open.click();
    const dialog = page.getByRole("dialog", { name: `Delete “Kestrel Ridge Journal ${tag}”?` });
    await dialog.waitFor();
    await page.keyboard.press("Escape");
    await dialog.waitFor({ state: "hidden" });
    expect(await open.evaluate((el) => el === document.activeElement)).toBe(true);
    await page.keyboard.press("Enter");
    await dialog.getByRole("button", { name: "Delete the edition" }).click();
    await page.waitForURL(`${APP}/editions`);
    await page.getByRole("heading", { level: 1, name: "Editions" }).waitFor();
    expect(await page.getByRole("link", { name: `Kestrel Ridge Journal ${tag}` }).count()).toBe(0);
    await ctx.close();
  });
});
