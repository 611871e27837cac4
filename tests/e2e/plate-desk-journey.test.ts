// A curator finishes a draft plate in the editor with the keyboard: the image
// shows in the public viewer beside the texts, the caption counter says when
// the caption is too long, the texts are saved, the plate is published,
// withdrawn for the time being and restored, each after a confirmation that
// repeats the licence warning, and the photographer is mailed each time; a
// visitor then reports it from its public page. axe-core checks the editor,
// the dialog and the plate page with the report form open; every page is
// scanned for developer wording.
import { eq } from "drizzle-orm";
import sharp from "sharp";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { findRolesOfUser } from "@/db/queries/roles";
import { bracketSets, reductions, users } from "@/db/schema";
import { DEMO_PEOPLE } from "@/db/seed/people";
import { createDraftPlate } from "@/lib/plates/desk";
import { closeWebJpegWriter } from "@/lib/plates/web-jpeg";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { bucketName, putObjectBytes, buildReductionPrefix } from "@/lib/storage";
import { seriousViolations } from "../support/axe";
import { launchBrowser, snap } from "../support/browser";
import { signIn } from "../support/sign-in";
import { waitForMail } from "../support/mailbox";
import { expectPeopleWording } from "../support/wording";
import { APP, requireTestDatabase } from "../support/env";
import { createMember, createSetFor } from "../integration/bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
let browser: Browser;
const tag = Date.now().toString(36);
const curatorEmail = DEMO_PEOPLE.find((p) => p.roles.includes("curator"))!.email;
let plateId = "";
let slug = "";
let ownerEmail = "";
let reductionId = "";

beforeAll(async () => {
  const owner = await createMember(db, `Halvard Quist ${tag}`);
  ownerEmail = owner.email;
  const setId = await createSetFor(db, owner, `Cadiz corona ${tag}`);
  const [red] = await db.insert(reductions).values({ bracketSetId: setId, params: { registration: "sun", filter: "mgn", recoverResponse: false } }).returning();
  const prefix = buildReductionPrefix(setId, red.id);
  const put = (key: string, body: Buffer, type: string) => putObjectBytes({ bucket: bucketName("derived"), key: prefix + key }, body, type);
  await put("report.json", Buffer.from(JSON.stringify({ frames: [], overall: { masterSize: { width: 64, height: 48 } } })), "application/json");
  // A valid IIIF Image API 3.0 level-0 descriptor, so the desk's viewer opens it as the public page would.
  for (const r of ["natural", "structure"]) {
    const info = { "@context": "http://iiif.io/api/image/3/context.json", id: `${APP}/iiif/reductions/${red.id}/${r}-iiif`, type: "ImageService3", protocol: "http://iiif.io/api/image", profile: "level0", width: 64, height: 48, sizes: [{ width: 64, height: 48 }], tiles: [{ width: 512, height: 512, scaleFactors: [1] }] };
    await put(`tiles/${r}-iiif/info.json`, Buffer.from(JSON.stringify(info)), "application/json");
  }
  await put("preview.jpg", await sharp({ create: { width: 64, height: 48, channels: 3, background: "#222" } }).jpeg().toBuffer(), "image/jpeg");
  await db.update(reductions).set({ state: "done", progress: 1, pipelineVersion: "0.9.0-e2e", finishedAt: new Date(), outputs: { prefix, report: `${prefix}report.json`, tiles: `${prefix}tiles/` } }).where(eq(reductions.id, red.id));
  await db.update(bracketSets).set({ state: "approved" }).where(eq(bracketSets.id, setId));
  const [curator] = await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.email, curatorEmail));
  const actor = { userId: curator.id, name: curator.name, email: curator.email, roles: await findRolesOfUser(db, curator.id) };
  reductionId = red.id;
  ({ id: plateId, slug } = await createDraftPlate(db, actor, { reductionId: red.id, renditions: ["natural"] }));
  browser = await launchBrowser();
}, 60_000);

afterAll(async () => {
  await browser?.close();
  await closeWebJpegWriter();
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

describe("the plate editor", () => {
  it("counts the caption as the curator types, saves, publishes, and takes a visitor's report", async () => {
    const ctx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
    const page = await signIn(ctx, curatorEmail);

    await page.goto(`/review/plates/${plateId}`);
    expect(await page.getByLabel("Data acquisition").inputValue()).toBe(`Halvard Quist ${tag}`);
    // The image, in the public viewer, beside the texts (tiles from the draft's reduction, private to curators for now).
    await page.locator('[aria-roledescription="zoomable image"]').waitFor({ timeout: 20_000 });
    await expectPeopleWording(page);
    const caption = page.getByRole("textbox", { name: "Caption", exact: true });
    await caption.focus();
    await page.keyboard.type(Array.from({ length: 41 }, (_, i) => `w${i}`).join(" "));
    await page.getByText("41 of 40 words: 1 too many").waitFor();
    await snap(page, "plate-desk-01-caption-too-long");
    expect(await seriousViolations(page, "#main")).toEqual([]);

    await caption.fill("Streamers over Cadiz at mid-totality; synthetic test data.");
    await page.getByText("8 of 40 words").waitFor();
    await page.getByLabel("Alt text").fill("A dark lunar disk with grey streamers around it.");
    await page.getByRole("button", { name: "Save the texts" }).click();
    await page.getByRole("status").filter({ hasText: "Saved:" }).waitFor();
    // Publishing asks first, repeating the licence warning.
    await page.getByRole("button", { name: "Publish the plate" }).click();
    const publish = page.getByRole("dialog", { name: /^Publish “/ });
    await publish.waitFor();
    await publish.getByText(/Creative Commons licences cannot be revoked/).waitFor();
    expect(await seriousViolations(page, "dialog")).toEqual([]);
    await snap(page, "plate-desk-02a-publish-asks");
    // Cancel changes nothing; then publish for real.
    await publish.getByRole("button", { name: "Cancel" }).click();
    await publish.waitFor({ state: "hidden" });
    await page.getByRole("button", { name: "Publish the plate" }).click();
    await publish.getByRole("button", { name: "Publish", exact: true }).click();
    await page.getByRole("status").filter({ hasText: "Published." }).waitFor();
    await snap(page, "plate-desk-02-published");
    // A visitor (no cookie) asks for the tiles' descriptor.
    const visitorTile = () => fetch(`${APP}/iiif/reductions/${reductionId}/natural-iiif/info.json`);
    expect((await visitorTile()).status).toBe(200);

    // Withdraw while it is looked at: the reason is asked for first, then confirmed.
    await page.getByRole("button", { name: "Withdraw while it is looked at" }).click();
    await page.getByText("Give the reason; the public page shows it.").waitFor();
    await page.getByLabel("Reason for withdrawing").fill(`A visitor asked about the site ${tag}`);
    await page.getByRole("button", { name: "Withdraw while it is looked at" }).click();
    const withdraw = page.getByRole("dialog", { name: /^Withdraw “.*” for the time being\?$/ });
    await withdraw.getByText(`A visitor asked about the site ${tag}`).waitFor();
    await withdraw.getByRole("button", { name: "Withdraw", exact: true }).click();
    await page.getByRole("status").filter({ hasText: "Withdrawn for the time being." }).waitFor();
    await expectPeopleWording(page);

    // Restore: asked, done, and the images answer again at once.
    await page.getByRole("button", { name: "Restore to the gallery" }).click();
    await page.getByRole("dialog", { name: /^Restore “/ }).getByRole("button", { name: "Restore", exact: true }).click();
    await page.getByRole("status").filter({ hasText: "Back in the gallery." }).waitFor();
    expect((await visitorTile()).status).toBe(200);
    await snap(page, "plate-desk-02b-restored");
    for (const subject of [/^Published: /, /^Withdrawn for the time being: /, /^Back in the gallery: /]) await waitForMail(ownerEmail, (m) => subject.test(m.subject));
    await ctx.close();

    const visitor = await browser.newPage({ baseURL: APP });
    await visitor.goto(`/plates/${slug}`);
    await expectPeopleWording(visitor);
    await visitor.getByText("Tell the curators about a rights question or an error").click();
    await visitor.getByLabel("What is it about?").selectOption("error");
    await visitor.getByLabel("Your message").fill(`The site is given as Cadiz but it was Jerez ${tag}.`);
    await visitor.getByLabel("Your e-mail address").fill(`visitor-${tag}@visitors.example`);
    expect(await seriousViolations(visitor, "#main")).toEqual([]);
    await visitor.getByRole("button", { name: "Send the report" }).click();
    await visitor.getByRole("status").filter({ hasText: "Thank you." }).waitFor();
    await snap(visitor, "plate-desk-03-report-sent");
    await visitor.close();
  }, 120_000);
});
