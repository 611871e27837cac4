// From a member's submission to a public plate, in the browser: a curator asks
// for changes with a reason, the member reads the message, fixes a frame's
// exposure and resubmits, the curator re-reduces with another filter strength
// (staying on the desk, mailed when it finishes), compares the two runs from their
// tiles, zoomed in, approves, writes the plate and publishes it, and a visitor finds it in the
// gallery. The set, its frames and its first reduction are prepared through
// the same services the pages call. Screenshots go to .artifacts/.
import { and, eq } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { findRolesOfUser } from "@/db/queries/roles";
import { auditLog, frames, kits, outboxMessages, reductions, sites, users } from "@/db/schema";
import { DEMO_PEOPLE } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { createBracketSet, submitBracketSet } from "@/lib/bracket-sets";
import { closeWebJpegWriter } from "@/lib/plates/web-jpeg";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { startReduction } from "@/lib/reductions/reductions";
import { seriousViolations } from "../support/axe";
import { launchBrowser, snap } from "../support/browser";
import { firstLink, waitForMail } from "../support/mailbox";
import { expectPeopleWording } from "../support/wording";
import { signIn } from "../support/sign-in";
import { APP, requireTestDatabase } from "../support/env";
import { makeSyntheticFitsBracket } from "../support/synthetic-fits";
import { waitFor } from "../support/wait";
import { uploadFile } from "../integration/bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
let browser: Browser;
const tag = Date.now().toString(36);
const setName = `Cadiz, second contact ${tag}`;
const plateTitle = `Inner corona over Cadiz ${tag}`;
const photographer = DEMO_PEOPLE.find((p) => p.email.startsWith("nadia"))!;
const curator = DEMO_PEOPLE.find((p) => p.roles.includes("curator"))!;
let setId = "";

async function actorOf(email: string): Promise<Actor> {
  const [u] = await db.select().from(users).where(eq(users.email, email));
  return { userId: u.id, email: u.email, name: u.name, roles: await findRolesOfUser(db, u.id) };
}

async function waitForReductions(count: number): Promise<void> {
  await waitFor(
    `${count} finished reductions`,
    async () => {
      const rows = await db.select({ state: reductions.state, error: reductions.error }).from(reductions).where(eq(reductions.bracketSetId, setId));
      const failed = rows.find((r) => r.state === "failed");
      if (failed) throw new Error(`a reduction failed: ${failed.error}`);
      return rows.filter((r) => r.state === "done").length >= count ? rows : undefined;
    },
    240_000,
  );
}


beforeAll(async () => {
  const owner = await actorOf(photographer.email);
  const [site] = await db.insert(sites).values({ ownerId: owner.userId, name: `Cadiz, Campo del Sur ${tag}`, kind: "fixed", latDeg: 36.53, lonDeg: -6.29, precision: "rounded" }).returning({ id: sites.id });
  const [kit] = await db
    .insert(kits)
    .values({ ownerId: owner.userId, name: `Refractor ${tag}`, camera: "Mono camera", sensorWidthMm: 10, sensorHeightMm: 8, pixelPitchUm: 5, focalMm: 600, fNumber: 7, mount: "equatorial" })
    .returning({ id: kits.id });
  setId = (await createBracketSet(db, owner, { name: setName, eclipseId: "2027-08-02", siteId: site.id, kitId: kit.id, notes: "", clockOffsetS: 0 })).id;
  // Cadiz's totality (08:45 to 08:48 UTC); the third file's EXPTIME is wrong (1/500 s instead of 1/30 s).
  const bracket = makeSyntheticFitsBracket({ width: 480, height: 360, exposuresS: [1 / 500, 1 / 125, 1 / 30, 1 / 8], seed: 77, prefix: "cadiz", captureStartMs: Date.UTC(2027, 7, 2, 8, 46, 0) });
  for (const f of bracket) {
    const sent = await uploadFile(db, owner, setId, f.name, f.bytes);
    await waitFor(`ingest of ${f.name}`, async () => {
      const [row] = await db.select({ state: frames.ingestState }).from(frames).where(eq(frames.id, sent.id));
      return row.state === "received" ? undefined : row;
    });
  }
  const third = (await db.select().from(frames).where(eq(frames.bracketSetId, setId))).find((f) => f.originalFileName === "cadiz-03.fits")!;
  await db.update(frames).set({ exposureS: 1 / 500 }).where(eq(frames.id, third.id));
  await startReduction(db, owner, setId, { registration: "sun", filter: "mgn" });
  await waitForReductions(1);
  await submitBracketSet(db, owner, setId);
  browser = await launchBrowser();
}, 360_000);

afterAll(async () => {
  await browser?.close();
  await closeWebJpegWriter();
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

describe("from submission to a public plate", () => {
  it("runs through the desk, the studio and the gallery", async () => {
    const curatorCtx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
    const memberCtx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
    const desk = await signIn(curatorCtx, curator.email);

    // The queue lists the set; the curator asks for changes with a reason and a message.
    await desk.goto("/review");
    await expectPeopleWording(desk);
    // The queue counts the included light frames (all four here).
    await desk.getByRole("columnheader", { name: /Included light frames/ }).waitFor();
    const row = desk.getByRole("row").filter({ has: desk.getByRole("link", { name: setName }) });
    expect((await row.getByRole("cell").allInnerTexts()).map((t) => t.trim())).toContain("4");
    await desk.getByRole("link", { name: setName }).click();
    await desk.waitForURL(new RegExp(`/review/sets/${setId}`));
    await desk.getByRole("radio", { name: /Ask for changes/ }).check();
    await desk.getByLabel("Reason").selectOption({ label: "Exposure times missing or wrong" });
    await desk.getByLabel("Message to the photographer").fill("cadiz-03.fits says 1/500 s but looks like 1/30 s; please check your log.");
    await desk.getByRole("button", { name: "Ask for changes" }).click();
    await desk.getByText(/Done: ask for changes/).waitFor({ timeout: 15_000 });
    await expectPeopleWording(desk);
    await snap(desk, "40-desk-changes-requested");

    // The member reads the message, fixes the exposure and sends the set again.
    const studio = await signIn(memberCtx, photographer.email);
    await studio.goto(`/studio/sets/${setId}`);
    await studio.getByText("cadiz-03.fits says 1/500 s but looks like 1/30 s").first().waitFor();
    await expectPeopleWording(studio);
    await studio.getByLabel("Exposure of cadiz-03.fits", { exact: true }).fill("1/30");
    await studio.getByRole("button", { name: "Save the exposure of cadiz-03.fits" }).click();
    await studio.getByText("cadiz-03.fits: exposure set to 1/30 s.").waitFor({ timeout: 15_000 });
    await snap(studio, "41-member-fixes-exposure");
    await studio.getByRole("button", { name: "Submit for review" }).click();
    // The page re-reads the set: it is on the desk again and closed to changes.
    await studio.getByText(/This set is awaiting review/).waitFor({ timeout: 15_000 });
    const [frame] = await db.select({ exposureS: frames.exposureS, source: frames.exposureSource }).from(frames).where(and(eq(frames.bracketSetId, setId), eq(frames.originalFileName, "cadiz-03.fits")));
    expect(frame.exposureS).toBeCloseTo(1 / 30, 9);
    expect(frame.source).toBe("photographer");

    // The curator re-reduces with a stronger filter; it joins the queue and finishes.
    await desk.goto(`/review/sets/${setId}`);
    await desk.getByText("Re-reduce with other parameters").click();
    await desk.getByLabel(/Structure strength/).fill("0.5");
    await desk.getByRole("button", { name: "Start a re-reduction" }).click();
    // The curator stays on the review desk; the new run is said to be queued.
    await desk.getByText(/Re-reduction started/).waitFor({ timeout: 20_000 });
    expect(new URL(desk.url()).pathname).toBe(`/review/sets/${setId}`);
    await waitForReductions(2);
    // The re-run's news goes to the curator who started it, with the desk's link; the photographer hears only of their own run.
    const curatorMail = await waitForMail(curator.email, (m) => m.subject === `Re-reduction finished: ${setName}`, 60_000);
    expect(firstLink(curatorMail.text)).toBe(`${APP}/review/sets/${setId}#reductions-h`);
    const toPhotographer = await db.select({ subject: outboxMessages.subject }).from(outboxMessages).where(eq(outboxMessages.to, photographer.email));
    expect(toPhotographer.filter((m) => m.subject.includes(`finished: ${setName}`)).map((m) => m.subject)).toEqual([`Reduction finished: ${setName}`]);
    const [second] = await db.select({ params: reductions.params }).from(reductions).where(eq(reductions.bracketSetId, setId)).orderBy(reductions.createdAt).offset(1);
    expect(second.params.filterStrength).toBe(0.5);

    // The comparison draws both renditions from their tile pyramids, and zooming loads finer tiles.
    const tiles: string[] = [];
    const previews: string[] = [];
    desk.on("response", (r) => {
      if (/preview(-structure)?\.jpg/.test(r.url())) previews.push(r.url());
      if (/\/iiif\/reductions\/[0-9a-f-]{36}\/(natural|structure)-iiif\//.test(r.url()) && r.status() === 200) tiles.push(r.url());
    });
    await desk.goto(`/review/sets/${setId}`);
    await desk.getByTestId("compare-left").locator("canvas").first().waitFor({ timeout: 20_000 });
    await desk.getByTestId("compare-right").locator("canvas").first().waitFor();
    await waitFor("tiles of both pictures", async () => (tiles.some((u) => u.endsWith("info.json")) && tiles.some((u) => u.endsWith("default.jpg")) ? true : undefined), 20_000);
    // This small test rendition is one tile at full size; zooming scales it up without going back to a preview.
    for (let i = 0; i < 2; i++) await desk.getByRole("button", { name: "Zoom in" }).click();
    await desk.getByRole("status").filter({ hasText: /^[2-9]\.\d×$/ }).waitFor({ timeout: 15_000 });
    expect(previews).toEqual([]);
    expect(await seriousViolations(desk, "#main")).toEqual([]);
    await expectPeopleWording(desk);
    await snap(desk, "41b-desk-compare-zoomed");

    // Approve, make the plate from the new reduction, write it and publish it.
    await desk.getByRole("radio", { name: /Approve/ }).check();
    await desk.getByRole("button", { name: "Approve" }).click();
    await desk.getByText(/Done: approve/).waitFor({ timeout: 15_000 });
    await desk.reload();
    await desk.getByRole("button", { name: "Make a plate" }).click();
    await desk.waitForURL(/\/review\/plates\/[0-9a-f-]{36}$/, { timeout: 20_000 });
    await desk.getByLabel("Title").fill(plateTitle);
    await desk.getByLabel("Caption").fill("The inner corona from the Atlantic coast, re-reduced with a stronger filter. Synthetic test data.");
    await desk.getByLabel("Alt text").fill("A black Moon ringed by a bright inner corona with fine streamers.");
    await desk.getByRole("button", { name: "Save the texts" }).click();
    await desk.getByRole("button", { name: "Publish the plate" }).click();
    const confirm = desk.getByRole("dialog", { name: `Publish “${plateTitle}”?` });
    await confirm.waitFor();
    await confirm.getByRole("button", { name: "Publish" }).click();
    await desk.getByText("Published.").waitFor({ timeout: 30_000 });
    await expectPeopleWording(desk);
    await snap(desk, "42-plate-published");

    // Every decision is in the audit log.
    const audit = await db.select({ action: auditLog.action }).from(auditLog).where(eq(auditLog.subjectId, setId));
    expect(audit.map((a) => a.action)).toEqual(expect.arrayContaining(["review.submit", "review.request-changes", "review.resubmit", "review.approve"]));

    // A visitor finds it in the gallery.
    const visitorCtx = await browser.newContext({ baseURL: APP, viewport: { width: 1280, height: 900 } });
    const visitor = await visitorCtx.newPage();
    await visitor.goto(`/gallery?q=${encodeURIComponent(tag)}`);
    await visitor.getByRole("link", { name: new RegExp(plateTitle) }).click();
    await visitor.getByRole("heading", { level: 1, name: plateTitle }).waitFor();
    await expectPeopleWording(visitor);
    await waitForMail(photographer.email, (m) => m.subject === `Published: ${plateTitle}`);
    await snap(visitor, "43-visitor-sees-plate");
    await Promise.all([curatorCtx.close(), memberCtx.close(), visitorCtx.close()]);
  }, 420_000);
});
