// The plate desk against the real database, Redis, the S3 and SMTP fakes and
// the running app: drafts only from approved sets, publishing and withdrawing
// change what the public queries return, a new version keeps the old one's
// permanent link, the web JPEG carries the credits in its XMP, reports reach
// curators by mail and answers reach the reporter, every change is audited,
// and members and editors are refused.
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { and, eq } from "drizzle-orm";
import { ExifTool } from "exiftool-vendored";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { auditLog, bracketSets, plateReports } from "@/db/schema";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { addPlateVersion, createDraftPlate, publishPlate, restorePlate, updatePlate, withdrawPlate } from "@/lib/plates/desk";
import { findDeskPlate } from "@/lib/plates/desk-view";
import { findPublicPlate, listPublishedPlates } from "@/lib/plates/public";
import { closeWebJpegWriter } from "@/lib/plates/web-jpeg";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { requireTestDatabase } from "../support/env";
import { Client } from "../support/http";
import { waitForMail } from "../support/mailbox";
import { createMember, createSetFor } from "./bracket-upload-helpers";
import { makeFinishedReduction } from "./plate-fixtures";

requireTestDatabase();
const db = getDb();
const exiftool = new ExifTool({ maxProcs: 1 });

afterAll(async () => {
  await exiftool.end();
  await closeWebJpegWriter();
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

const tag = Date.now().toString(36);
let curator: Actor;
let owner: Actor;
let setId = "";
let firstReduction = "";
let secondReduction = "";
let plateId = "";
let slug = "";

const finishedReduction = (forSet: string, shade: number) => makeFinishedReduction(db, forSet, shade);

const texts = () => ({
  title: `Outer corona over Luxor ${tag}`,
  caption: "Streamers reach four solar radii east of the Sun during totality; synthetic test data.",
  description: "Made for an integration test of the plate desk.",
  altText: "A black lunar disk with faint grey streamers around it.",
  acquiredBy: owner.name,
  processedBy: "Crownlight pipeline 0.9.0-test",
  licence: "CC-BY-SA-4.0",
  slug: `outer-corona-${tag}`,
});

async function auditActions(): Promise<string[]> {
  const rows = await db.select({ action: auditLog.action }).from(auditLog).where(and(eq(auditLog.subjectType, "plate"), eq(auditLog.subjectId, plateId)));
  return rows.map((r) => r.action);
}

beforeAll(async () => {
  curator = await createMember(db, `Ines Halloran ${tag}`, ["curator"]);
  owner = await createMember(db, `Tobias Wrenfield ${tag}`);
  setId = await createSetFor(db, owner, `Luxor corona ${tag}`);
  firstReduction = await finishedReduction(setId, 40);
  secondReduction = await finishedReduction(setId, 90);
}, 60_000);

describe("the plate desk", () => {
  it("makes a draft only from an approved set, prefilled from the set", async () => {
    await expect(createDraftPlate(db, curator, { reductionId: firstReduction, renditions: ["natural"] })).rejects.toMatchObject({ code: "conflict" });
    await expect(createDraftPlate(db, owner, { reductionId: firstReduction, renditions: ["natural"] })).rejects.toMatchObject({ code: "forbidden" });
    await db.update(bracketSets).set({ state: "approved" }).where(eq(bracketSets.id, setId));
    const draft = await createDraftPlate(db, curator, { reductionId: firstReduction, renditions: ["natural", "structure"] });
    plateId = draft.id;
    slug = draft.slug;
    const desk = await findDeskPlate(db, curator, plateId);
    expect(desk.state).toBe("draft");
    expect(desk.acquiredBy).toBe(owner.name);
    expect(desk.processedBy).toBe("Crownlight pipeline 0.9.0-test");
    expect(desk.locations).toEqual([expect.objectContaining({ precision: "rounded", warning: null })]);
    await expect(findPublicPlate(db, slug)).rejects.toMatchObject({ code: "not_found" });
    expect(await auditActions()).toContain("plate.created");
  });

  it("refuses a 41-word caption and a publish without alt text, naming the field", async () => {
    await expect(publishPlate(db, curator, plateId)).rejects.toMatchObject({ code: "invalid_input", fields: expect.arrayContaining([expect.objectContaining({ field: "altText" })]) });
    const long = Array.from({ length: 41 }, (_, i) => `w${i}`).join(" ");
    await expect(updatePlate(db, curator, plateId, { ...texts(), caption: long })).rejects.toMatchObject({ code: "invalid_input", fields: [expect.objectContaining({ field: "caption" })] });
    const changed = await updatePlate(db, curator, plateId, texts());
    expect(changed).toEqual(expect.arrayContaining(["title", "caption", "altText", "licence", "slug"]));
    slug = texts().slug;
    const [edited] = await db.select({ detail: auditLog.detail }).from(auditLog).where(and(eq(auditLog.subjectId, plateId), eq(auditLog.action, "plate.edited")));
    expect(edited.detail).toMatchObject({ licence: { to: "CC-BY-SA-4.0" } });
  });

  it("publishes: the public queries return the plate, with the credited web JPEG", async () => {
    await publishPlate(db, curator, plateId);
    const listed = await listPublishedPlates(db, { q: tag, limit: 60 });
    expect(listed.plates.map((p) => p.slug)).toEqual([slug]);
    const pub = await findPublicPlate(db, slug);
    const web = pub.downloads.find((d) => d.label === "Web JPEG");
    expect(web?.url).toBe(`/api/plates/${slug}/web-jpeg?version=1`);
    // The link name is permanent once public.
    await expect(updatePlate(db, curator, plateId, { ...texts(), slug: `renamed-${tag}` })).rejects.toMatchObject({ fields: [expect.objectContaining({ field: "slug" })] });

    const res = await new Client().request(web!.url);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("image/jpeg");
    expect(res.headers.get("content-disposition")).toBe(`attachment; filename="${slug}-v1-web.jpg"`);
    const dir = await mkdtemp(join(tmpdir(), "plate-desk-"));
    try {
      const file = join(dir, "web.jpg");
      await writeFile(file, Buffer.from(await res.arrayBuffer()));
      const read = (await exiftool.read(file)) as unknown as Record<string, unknown>;
      expect(read.Creator).toEqual([owner.name, "Crownlight pipeline 0.9.0-test"]);
      expect(read.Rights).toBe(`${owner.name}, licensed under CC BY-SA 4.0.`);
      expect(read.WebStatement).toBe("http://creativecommons.org/licenses/by-sa/4.0/");
      expect(read.Description).toBe(texts().caption);
      expect(read.AltTextAccessibility).toBe(texts().altText);
            // The society's credit-line template (the default: "{acquiredBy} / {society}; processing: {processedBy}").
      expect(String(read.Credit)).toBe(`${owner.name} / Kestrel Ridge Astronomical Society; processing: Crownlight pipeline 0.9.0-test`);
      expect(read.GPSLatitude).toBeUndefined();
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
    expect(await auditActions()).toContain("plate.published");
  });

  it("gives a second draft of the set its own link name, and refuses another plate's", async () => {
    const second = await createDraftPlate(db, curator, { reductionId: secondReduction, renditions: ["structure"] });
    const first = await findDeskPlate(db, curator, plateId);
    expect(second.slug).not.toBe(first.slug);
    await expect(updatePlate(db, curator, second.id, { ...texts(), title: "Second draft" })).rejects.toMatchObject({
      code: "invalid_input",
      fields: [{ field: "slug", message: "already taken" }],
    });
  });

  it("adds a version: the current one moves and version 1 keeps its permanent link", async () => {
    await expect(addPlateVersion(db, curator, plateId, { reductionId: secondReduction, renditions: ["natural"], changeNote: "" })).rejects.toMatchObject({ fields: [expect.objectContaining({ field: "changeNote" })] });
    const { version } = await addPlateVersion(db, curator, plateId, { reductionId: secondReduction, renditions: ["natural"], changeNote: "Re-reduced with a gentler filter" });
    expect(version).toBe(2);
    const current = await findPublicPlate(db, slug);
    expect(current).toMatchObject({ version: 2, isCurrentVersion: true, source: { kind: "reduction", id: secondReduction } });
    const old = await findPublicPlate(db, slug, 1);
    expect(old).toMatchObject({ version: 1, isCurrentVersion: false, source: { kind: "reduction", id: firstReduction } });
    expect(current.versions.map((v) => v.url)).toEqual([`/plates/${slug}/v/2`, `/plates/${slug}/v/1`]);
    const client = new Client();
    expect((await client.request(`/plates/${slug}/v/1`)).status).toBe(200);
    expect((await client.request(`/api/plates/${slug}/web-jpeg?version=2`)).status).toBe(200);
    expect((await client.request(`/api/plates/${slug}/web-jpeg?version=3`)).status).toBe(404);
    expect(await auditActions()).toContain("plate.version-added");
  });

  it("withdraws for the time being, restores, then withdraws for good", async () => {
    await withdrawPlate(db, curator, plateId, { reason: "A rights question is being looked at", kind: "temporary" });
    expect((await listPublishedPlates(db, { q: tag })).plates).toEqual([]);
    const w = await findPublicPlate(db, slug);
    expect(w.withdrawn).toMatchObject({ reason: "A rights question is being looked at", kind: "temporary" });
    expect(w.downloads).toEqual([]);
    expect((await new Client().request(`/api/plates/${slug}/web-jpeg`)).status).toBe(404);
    await restorePlate(db, curator, plateId);
    expect((await listPublishedPlates(db, { q: tag })).plates.map((p) => p.slug)).toEqual([slug]);
    await withdrawPlate(db, curator, plateId, { reason: "The photographer asked us to remove it", kind: "permanent" });
    await expect(restorePlate(db, curator, plateId)).rejects.toMatchObject({ code: "conflict" });
    expect((await findPublicPlate(db, slug)).withdrawn?.kind).toBe("permanent");
    const actions = await auditActions();
    expect(actions.filter((a) => a === "plate.withdrawn")).toHaveLength(2);
    expect(actions).toContain("plate.restored");
  });

  it("takes a visitor's report, mails curators, and mails the curator's answer back", async () => {
    const visitor = new Client();
    const bad = await visitor.json(`/api/plates/${slug}/reports`, { kind: "rights", message: "This is my own photograph.", email: "nope" });
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).toContain('"field":"email"');
    const reporter = `reporter-${tag}@visitors.example`;
    const ok = await visitor.json(`/api/plates/${slug}/reports`, { kind: "rights", message: `I took this picture myself ${tag}.`, email: reporter });
    expect(ok.status).toBe(201);
    const mail = await waitForMail(curator.email, (m) => m.text.includes(tag) && m.subject.startsWith("Plate reported"));
    expect(mail.subject).toContain("(rights)");
    expect(mail.text).toContain(`/review/plates/${plateId}`);

    const desk = await findDeskPlate(db, curator, plateId);
    const report = desk.reports.find((r) => r.reporterEmail === reporter);
    expect(report?.state).toBe("open");
    const { answerPlateReport } = await import("@/lib/plates/reports");
    await answerPlateReport(db, curator, plateId, report!.id, { answer: `Thank you; the plate is withdrawn for good ${tag}.`, close: true });
    const answer = await waitForMail(reporter, (m) => m.text.includes(tag));
    expect(answer.text).toContain("withdrawn for good");
    const [row] = await db.select().from(plateReports).where(eq(plateReports.id, report!.id));
    expect(row).toMatchObject({ state: "closed", answeredBy: curator.userId });
    const actions = await auditActions();
    expect(actions).toEqual(expect.arrayContaining(["plate.reported", "plate.report-answered"]));
  });

  it("limits reports per client address", async () => {
    const visitor = new Client();
    const send = () => visitor.json(`/api/plates/${slug}/reports`, { kind: "other", message: "Checking the limit on reports.", email: `limit-${tag}@visitors.example` });
    for (let i = 0; i < 5; i++) expect((await send()).status).toBe(201);
    const refused = await send();
    expect(refused.status).toBe(429);
    expect(JSON.stringify(refused.body)).toContain("Too many reports");
    // Another address is not affected.
    expect((await new Client().json(`/api/plates/${slug}/reports`, { kind: "other", message: "A different visitor writes.", email: `other-${tag}@visitors.example` })).status).toBe(201);
  });
});

describe("the desk pages", () => {
  it("show a curator the plate list and the editor, and every visitor the report form", async () => {
    const desk = new Client();
    await desk.signIn(DEMO_PEOPLE.find((p) => p.roles.includes("curator"))!.email, DEMO_PASSWORD);
    const list = await desk.request("/review/plates");
    expect(list.status).toBe(200);
    expect(await list.text()).toContain(`/review/plates/${plateId}`);
    const editor = await desk.request(`/review/plates/${plateId}`);
    expect(editor.status).toBe(200);
    const html = await editor.text();
    expect(html).toContain("withdrawn for good");
    expect(html).toContain(`/plates/${slug}/v/1`);
    expect(html).toContain("Reports from the public (6 open)");
    const page = await new Client().request(`/plates/${slug}`);
    expect(await page.text()).toContain("Report this plate");
  });
});

describe("the desk routes", () => {
  const memberEmail = DEMO_PEOPLE.find((p) => p.roles.join() === "member")!.email;
  const editorEmail = DEMO_PEOPLE.find((p) => p.roles.includes("editor") && !p.roles.includes("curator"))!.email;

  it("refuse a visitor (401), a member and an editor (403)", async () => {
    const calls: [string, string, unknown?][] = [
      ["GET", "/api/review/plates"],
      ["GET", `/api/review/plates/${plateId}`],
      ["PATCH", `/api/review/plates/${plateId}`, texts()],
      ["POST", `/api/review/plates/${plateId}/publish`, {}],
      ["POST", `/api/review/plates/${plateId}/withdraw`, { reason: "Testing refusals", kind: "temporary" }],
      ["POST", `/api/review/plates/${plateId}/restore`, {}],
    ];
    const visitor = new Client();
    const member = new Client();
    await member.signIn(memberEmail, DEMO_PASSWORD);
    const editor = new Client();
    await editor.signIn(editorEmail, DEMO_PASSWORD);
    for (const [method, path, body] of calls) {
      expect([path, (await visitor.json(path, body, method)).status]).toEqual([path, 401]);
      expect([path, (await member.json(path, body, method)).status]).toEqual([path, 403]);
      expect([path, (await editor.json(path, body, method)).status]).toEqual([path, 403]);
    }
    expect((await member.request(`/review/plates/${plateId}`)).status).toBe(403);
  });
});
