// A curator finishes a draft plate in the editor with the keyboard: the
// caption counter says when the caption is too long, the texts are saved, the
// plate is published; a visitor then reports it from its public page. axe-core
// checks the editor and the plate page with the report form open.
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
import { bucketName, buildDerivedPrefix, putObjectBytes } from "@/lib/storage";
import { seriousViolations } from "../support/axe";
import { launchBrowser, snap } from "../support/browser";
import { signIn } from "../support/sign-in";
import { APP, requireTestDatabase } from "../support/env";
import { createMember, createSetFor } from "../integration/bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
let browser: Browser;
const tag = Date.now().toString(36);
const curatorEmail = DEMO_PEOPLE.find((p) => p.roles.includes("curator"))!.email;
let plateId = "";
let slug = "";

beforeAll(async () => {
  const owner = await createMember(db, `Halvard Quist ${tag}`);
  const setId = await createSetFor(db, owner, `Cadiz corona ${tag}`);
  const [red] = await db.insert(reductions).values({ bracketSetId: setId, params: { registration: "sun", filter: "mgn", recoverResponse: false } }).returning();
  const prefix = `${buildDerivedPrefix(setId)}reductions/${red.id}/`;
  const put = (key: string, body: Buffer, type: string) => putObjectBytes({ bucket: bucketName("derived"), key: prefix + key }, body, type);
  await put("report.json", Buffer.from(JSON.stringify({ frames: [], overall: { masterSize: { width: 64, height: 48 } } })), "application/json");
  for (const r of ["natural", "structure"]) await put(`tiles/${r}-iiif/info.json`, Buffer.from(JSON.stringify({ width: 64, height: 48 })), "application/json");
  await put("preview.jpg", await sharp({ create: { width: 64, height: 48, channels: 3, background: "#222" } }).jpeg().toBuffer(), "image/jpeg");
  await db.update(reductions).set({ state: "done", progress: 1, pipelineVersion: "0.9.0-e2e", finishedAt: new Date(), outputs: { prefix, report: `${prefix}report.json`, tiles: `${prefix}tiles/` } }).where(eq(reductions.id, red.id));
  await db.update(bracketSets).set({ state: "approved" }).where(eq(bracketSets.id, setId));
  const [curator] = await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.email, curatorEmail));
  const actor = { userId: curator.id, name: curator.name, email: curator.email, roles: await findRolesOfUser(db, curator.id) };
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
    await page.getByRole("button", { name: "Publish the plate" }).click();
    await page.getByRole("status").filter({ hasText: "Published." }).waitFor();
    await snap(page, "plate-desk-02-published");
    await ctx.close();

    const visitor = await browser.newPage({ baseURL: APP });
    await visitor.goto(`/plates/${slug}`);
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
