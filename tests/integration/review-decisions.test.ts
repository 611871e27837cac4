// Curators' decisions against the real database, queue and SMTP fake: each
// decision writes its row, the audit entry and the mail; two curators deciding
// at once cannot both win; nobody judges their own set; the photographer reads
// the message but never a private note; the audit log takes no edits.
import fs from "node:fs";
import path from "node:path";
import { and, desc, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { auditLog, bracketSets, curatorNotes, frames, reductions, reviewDecisions, users } from "@/db/schema";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { submitBracketSet } from "@/lib/bracket-sets";
import { decide } from "@/lib/review/decisions";
import { findDecidedReduction } from "@/lib/review/move";
import { findLatestMessageToPhotographer, listCuratorNotes, listDecisionHistory } from "@/lib/review/history";
import { assignToMe, listReviewQueue, queueQuerySchema } from "@/lib/review/queue";
import { parseInput } from "@/lib/validation";
import { Client } from "../support/http";
import { firstLink, waitForMail } from "../support/mailbox";
import { requireTestDatabase } from "../support/env";
import { createMember, createSetFor } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(closeDb);

const tag = Date.now().toString(36);
let owner: Actor;
let curator: Actor;
let otherCurator: Actor;
const PRIVATE_NOTE = `Compared with the ship's log; the offset looks 2 s off ${tag}`;

/** A set on the desk, with one finished reduction of a known pipeline version. */
async function setOnDesk(of: Actor, name: string): Promise<string> {
  const id = await createSetFor(db, of, name);
  await db.insert(reductions).values({
    bracketSetId: id,
    requestedBy: of.userId,
    params: { registration: "sun", filter: "mgn", recoverResponse: false },
    state: "done",
    progress: 1,
    pipelineVersion: `0.9.${tag}`,
    finishedAt: new Date(),
  });
  await db.update(bracketSets).set({ state: "awaiting-review" }).where(eq(bracketSets.id, id));
  return id;
}

async function stateOf(id: string) {
  const [row] = await db.select({ state: bracketSets.state }).from(bracketSets).where(eq(bracketSets.id, id));
  return row.state;
}

beforeAll(async () => {
  owner = await createMember(db, `Halvard Steenbeek ${tag}`);
  curator = await createMember(db, `Ines Carvalho-Baird ${tag}`, ["member", "curator"]);
  otherCurator = await createMember(db, `Ruairi Mbeki ${tag}`, ["member", "curator"]);
});

describe("review decisions", () => {
  it("asking for changes writes the decision, the audit entry, the private note and mails the photographer", async () => {
    const setId = await setOnDesk(owner, `Luxor totality ${tag}`);
    const result = await decide(db, curator, setId, {
      action: "request-changes",
      reasonCode: "exposure-times",
      message: "Frame 3 says 1/500 s but looks like 1/125 s; please check the camera's record.",
      note: PRIVATE_NOTE,
    });
    expect(result).toMatchObject({ fromState: "awaiting-review", toState: "changes-requested", reasonLabel: "Exposure times missing or wrong", pipelineVersion: `0.9.${tag}` });
    expect(await stateOf(setId)).toBe("changes-requested");

    const [row] = await db.select().from(reviewDecisions).where(eq(reviewDecisions.id, result.id));
    expect(row).toMatchObject({ bracketSetId: setId, action: "request-changes", reasonCode: "exposure-times", decidedBy: curator.userId, pipelineVersion: `0.9.${tag}` });
    expect(row.messageToPhotographer).toContain("Frame 3");

    const [audit] = await db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.subjectType, "bracket-set"), eq(auditLog.subjectId, setId), eq(auditLog.action, "review.request-changes")));
    expect(audit.actorId).toBe(curator.userId);
    expect(audit.detail).toMatchObject({ from: "awaiting-review", to: "changes-requested", reason: "Exposure times missing or wrong", pipelineVersion: `0.9.${tag}`, decisionId: result.id });
    expect(JSON.stringify(audit.detail)).not.toContain("ship's log");

    const notes = await db.select().from(curatorNotes).where(eq(curatorNotes.bracketSetId, setId));
    expect(notes.map((n) => n.body)).toEqual([PRIVATE_NOTE]);
    expect((await listCuratorNotes(db, otherCurator, setId)).map((n) => n.body)).toEqual([PRIVATE_NOTE]);

    const mail = await waitForMail(owner.email, (m) => m.subject === `Changes asked for: Luxor totality ${tag}`, 60_000);
    expect(mail.text).toContain("Reason: Exposure times missing or wrong");
    expect(mail.text).toContain("Frame 3 says 1/500 s");
    expect(mail.text).not.toContain("ship's log");
    expect(firstLink(mail.text)).toBe(`${process.env.APP_URL}/studio/sets/${setId}`);

    // The photographer reads the message and the reason, never the note.
    const seen = await findLatestMessageToPhotographer(db, owner, setId);
    expect(seen).toMatchObject({ reasonLabel: "Exposure times missing or wrong", message: expect.stringContaining("Frame 3") });
    expect(JSON.stringify(seen)).not.toContain("ship's log");
    await expect(listCuratorNotes(db, owner, setId)).rejects.toMatchObject({ code: "forbidden" });
    await expect(listDecisionHistory(db, owner, setId)).rejects.toMatchObject({ code: "forbidden" });

    // The photographer resubmits through the same state machine; the history keeps both moves.
    await submitBracketSet(db, owner, setId);
    expect(await stateOf(setId)).toBe("awaiting-review");
    const history = await listDecisionHistory(db, curator, setId);
    expect(history.map((h) => h.action)).toEqual(["submit", "request-changes"]);
    const [resubmitted] = await db.select().from(auditLog).where(and(eq(auditLog.subjectId, setId), eq(auditLog.action, "review.resubmit")));
    expect(resubmitted.actorId).toBe(owner.userId);
    expect(await findLatestMessageToPhotographer(db, owner, setId)).toBeNull();
  }, 90_000);

  it("approves, mails the photographer, and refuses a second approval naming the state and the action", async () => {
    const setId = await setOnDesk(owner, `Cadiz bracket ${tag}`);
    await decide(db, curator, setId, { action: "approve" });
    const mail = await waitForMail(owner.email, (m) => m.subject === `Approved: Cadiz bracket ${tag}`, 60_000);
    expect(firstLink(mail.text)).toBe(`${process.env.APP_URL}/studio/sets/${setId}`);
    await expect(decide(db, otherCurator, setId, { action: "approve" })).rejects.toMatchObject({ code: "conflict", message: expect.stringMatching(/approved.*"approve"/) });
    // Undoing needs a note; with one, the set is back on the desk.
    await expect(decide(db, otherCurator, setId, { action: "reopen" })).rejects.toMatchObject({ code: "invalid_input", fields: [expect.objectContaining({ field: "note" })] });
    await decide(db, otherCurator, setId, { action: "reopen", note: "Approved the wrong Cadiz set." });
    expect(await stateOf(setId)).toBe("awaiting-review");
  }, 90_000);

  it("rejects with a reason from the society's list and refuses a reason not on it", async () => {
    const setId = await setOnDesk(owner, `Gulf of Gabes ${tag}`);
    await expect(decide(db, curator, setId, { action: "reject", reasonCode: "bad-vibes" })).rejects.toMatchObject({
      code: "invalid_input",
      fields: [expect.objectContaining({ field: "reasonCode", message: expect.stringContaining("bad-vibes") })],
    });
    expect(await stateOf(setId)).toBe("awaiting-review");
    await decide(db, curator, setId, { action: "reject", reasonCode: "not-the-sun" });
    const mail = await waitForMail(owner.email, (m) => m.subject === `Not accepted: Gulf of Gabes ${tag}`, 60_000);
    expect(mail.text).toContain("Reason: Not the Sun");
  }, 90_000);

  it("lets exactly one of two curators deciding at once win", async () => {
    const setId = await setOnDesk(owner, `Race ${tag}`);
    const results = await Promise.allSettled([
      decide(db, curator, setId, { action: "approve" }),
      decide(db, otherCurator, setId, { action: "reject", reasonCode: "rights-unclear" }),
    ]);
    const won = results.filter((r) => r.status === "fulfilled");
    const lost = results.filter((r): r is PromiseRejectedResult => r.status === "rejected");
    expect(won).toHaveLength(1);
    expect(lost).toHaveLength(1);
    expect(lost[0].reason).toMatchObject({ code: "conflict" });
    const rows = await db.select().from(reviewDecisions).where(eq(reviewDecisions.bracketSetId, setId));
    expect(rows).toHaveLength(1);
    expect(await stateOf(setId)).toBe(rows[0].toState);
    const audits = await db.select().from(auditLog).where(and(eq(auditLog.subjectType, "bracket-set"), eq(auditLog.subjectId, setId)));
    expect(audits).toHaveLength(1);
  });

  it("does not let a curator decide on, or take in hand, their own set", async () => {
    const setId = await setOnDesk(curator, `Own set ${tag}`);
    await expect(decide(db, curator, setId, { action: "approve" })).rejects.toMatchObject({ code: "forbidden" });
    await expect(assignToMe(db, curator, { setIds: [setId], assign: true })).rejects.toMatchObject({ code: "forbidden" });
    expect(await stateOf(setId)).toBe("awaiting-review");
    expect(await db.select().from(reviewDecisions).where(eq(reviewDecisions.bracketSetId, setId))).toEqual([]);
    // Another curator may.
    await decide(db, otherCurator, setId, { action: "approve" });
    expect(await stateOf(setId)).toBe("approved");
  });

  it("refuses decisions from anyone without the review permission", async () => {
    const setId = await setOnDesk(owner, `Not yours ${tag}`);
    await expect(decide(db, owner, setId, { action: "approve" })).rejects.toMatchObject({ code: "forbidden" });
    const editor = await createMember(db, `Editor ${tag}`, ["member", "editor"]);
    await expect(decide(db, editor, setId, { action: "approve" })).rejects.toMatchObject({ code: "forbidden" });
    expect(await stateOf(setId)).toBe("awaiting-review");
  });

  it("answers 403 to a member and an editor on the decision route, and leaves the set as it was", async () => {
    const setId = await setOnDesk(owner, `Route ${tag}`);
    for (const roles of [["member"], ["member", "editor"]]) {
      const person = DEMO_PEOPLE.find((p) => p.roles.join() === roles.join())!;
      const client = new Client();
      await client.signIn(person.email, DEMO_PASSWORD);
      const res = await client.json(`/api/review/sets/${setId}/decisions`, { action: "approve" });
      expect(res.status, person.email).toBe(403);
    }
    expect((await new Client().json(`/api/review/sets/${setId}/decisions`, { action: "approve" })).status).toBe(401);
    expect(await stateOf(setId)).toBe("awaiting-review");
  });

  it("shows the photographer the message on their set's page and the curators the note on the desk", async () => {
    const oskar = DEMO_PEOPLE.find((p) => p.roles.join() === "member")!;
    const [row] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, oskar.email));
    const photographer: Actor = { userId: row.id, email: oskar.email, name: row.name, roles: ["member"] };
    const setId = await setOnDesk(photographer, `Pages ${tag}`);
    await decide(db, curator, setId, { action: "request-changes", reasonCode: "clock-offset", message: `Your camera clock looks 40 s fast ${tag}.`, note: PRIVATE_NOTE });

    const owner = new Client();
    await owner.signIn(oskar.email, DEMO_PASSWORD);
    const studio = await owner.request(`/studio/sets/${setId}`);
    expect(studio.status).toBe(200);
    const studioHtml = await studio.text();
    expect(studioHtml).toContain(`Your camera clock looks 40 s fast ${tag}.`);
    expect(studioHtml).toContain("Clock offset doubtful");
    expect(studioHtml).not.toContain("ship&#x27;s log");
    expect(studioHtml).not.toContain("ship's log");

    const desk = new Client();
    await desk.signIn(DEMO_PEOPLE.find((p) => p.roles.includes("curator"))!.email, DEMO_PASSWORD);
    const page = await desk.request(`/review/sets/${setId}`);
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toMatch(/ship(&#x27;|')s log/);
    expect(html).toContain(`Your camera clock looks 40 s fast ${tag}.`);
    const queue = await desk.request(`/review?state=changes-requested&photographer=${row.id}`);
    expect(queue.status).toBe(200);
    expect(await queue.text()).toContain(`Pages ${tag}`);
    const csv = await desk.request(`/api/review/queue.csv?state=all&photographer=${row.id}`);
    expect(csv.headers.get("content-type")).toContain("text/csv");
    expect(await csv.text()).toContain(`${setId},Pages ${tag},changes-requested,2027-08-02`);
  }, 60_000);

  it("pages, filters and counts the queue in the database", async () => {
    const q = (raw: Record<string, string>) => parseInput(queueQuerySchema, raw);
    const all = await listReviewQueue(db, curator, q({ state: "all", photographer: owner.userId, sort: "name" }));
    const names = all.rows.map((r) => r.name);
    expect(names).toEqual([...names].sort((a, b) => a.toLowerCase().localeCompare(b.toLowerCase())));
    expect(all.total).toBe(Object.values(all.counts).reduce((a, b) => a + b, 0));
    const waiting = await listReviewQueue(db, curator, q({ photographer: owner.userId }));
    expect(waiting.rows.every((r) => r.state === "awaiting-review")).toBe(true);
    expect(waiting.total).toBe(all.counts["awaiting-review"]);
    await expect(listReviewQueue(db, owner, q({}))).rejects.toMatchObject({ code: "forbidden" });
    expect(() => q({ sort: "owner_id; drop table users" })).toThrow(/sort/);
  });

  it("counts only the included light frames of a set", async () => {
    const setId = await setOnDesk(owner, `Frame count ${tag}`);
    const frame = (name: string, kind: "light" | "dark" | "flat" | "bias", included: boolean) => ({
      id: crypto.randomUUID(), bracketSetId: setId, originalKey: `test/${tag}/${name}`, originalFileName: name, sizeBytes: 1000, kind, included,
    });
    await db.insert(frames).values([
      frame("l1.fits", "light", true), frame("l2.fits", "light", true), frame("l3.fits", "light", true),
      frame("l4.fits", "light", false), frame("d1.fits", "dark", true), frame("f1.fits", "flat", true),
    ]);
    const page = await listReviewQueue(db, curator, parseInput(queueQuerySchema, { photographer: owner.userId, state: "all" }));
    expect(page.rows.find((r) => r.id === setId)?.frameCount).toBe(3);
    // Excluding a light frame takes it off the count.
    await db.update(frames).set({ included: false }).where(and(eq(frames.bracketSetId, setId), eq(frames.originalFileName, "l1.fits")));
    const after = await listReviewQueue(db, curator, parseInput(queueQuerySchema, { photographer: owner.userId, state: "all" }));
    expect(after.rows.find((r) => r.id === setId)?.frameCount).toBe(2);
  });
});

describe("the reduction decided on", () => {
  it("is the set's latest finished reduction, and a submission and a later decision record the same one", async () => {
    const setId = await createSetFor(db, owner, `Rattlesnake Butte bracket ${tag}`);
    const params = { registration: "sun" as const, filter: "mgn" as const, recoverResponse: false };
    const at = (minutes: number) => new Date(Date.UTC(2027, 7, 2, 12, minutes));
    // Started first but finished last: the one decided on.
    const [early] = await db
      .insert(reductions)
      .values({ bracketSetId: setId, requestedBy: owner.userId, params, state: "done", progress: 1, pipelineVersion: `early.${tag}`, createdAt: at(0), finishedAt: at(30) })
      .returning({ id: reductions.id });
    // Started later, finished sooner; and one finished without a finish time (an older row), started last of all.
    await db.insert(reductions).values({ bracketSetId: setId, requestedBy: owner.userId, params, state: "done", progress: 1, pipelineVersion: `late.${tag}`, createdAt: at(5), finishedAt: at(20) });
    await db.insert(reductions).values({ bracketSetId: setId, requestedBy: owner.userId, params, state: "done", progress: 1, pipelineVersion: `untimed.${tag}`, createdAt: at(10) });
    // Still running: not finished, whenever it started.
    await db.insert(reductions).values({ bracketSetId: setId, requestedBy: owner.userId, params, state: "running", createdAt: at(40) });

    expect(await findDecidedReduction(db, setId)).toEqual({ id: early.id, pipelineVersion: `early.${tag}` });
    await submitBracketSet(db, owner, setId);
    const decided = await decide(db, curator, setId, { action: "approve" });
    expect(decided.pipelineVersion).toBe(`early.${tag}`);
    const rows = await db.select({ action: reviewDecisions.action, reductionId: reviewDecisions.reductionId }).from(reviewDecisions).where(eq(reviewDecisions.bracketSetId, setId));
    expect(rows.sort((a, b) => a.action.localeCompare(b.action))).toEqual([
      { action: "approve", reductionId: early.id },
      { action: "submit", reductionId: early.id },
    ]);
  });

  it("counts a finished reduction without a finish time when none has one", async () => {
    const setId = await createSetFor(db, owner, `Untimed bracket ${tag}`);
    const params = { registration: "sun" as const, filter: "mgn" as const, recoverResponse: false };
    await db.insert(reductions).values({ bracketSetId: setId, requestedBy: owner.userId, params, state: "done", pipelineVersion: `older.${tag}`, createdAt: new Date(Date.UTC(2027, 7, 2, 12, 0)) });
    const [newer] = await db
      .insert(reductions)
      .values({ bracketSetId: setId, requestedBy: owner.userId, params, state: "done", pipelineVersion: `newer.${tag}`, createdAt: new Date(Date.UTC(2027, 7, 2, 12, 5)) })
      .returning({ id: reductions.id });
    expect((await findDecidedReduction(db, setId))?.id).toBe(newer.id);
  });
});

describe("the audit log", () => {
  it("refuses updates and deletes in the database itself", async () => {
    const [entry] = await db.select().from(auditLog).orderBy(desc(auditLog.id)).limit(1);
    // Drizzle wraps the database's error; the trigger's message is in its cause.
    const refusal = async (work: Promise<unknown>) => {
      const err = await work.then(
        () => null,
        (e: unknown) => e as Error & { cause?: Error },
      );
      return `${err?.message ?? "accepted"} ${err?.cause?.message ?? ""}`;
    };
    expect(await refusal(db.update(auditLog).set({ action: "review.approve" }).where(eq(auditLog.id, entry.id)))).toMatch(/append-only: UPDATE refused/);
    expect(await refusal(db.delete(auditLog).where(eq(auditLog.id, entry.id)))).toMatch(/append-only: DELETE refused/);
    const [after] = await db.select().from(auditLog).where(eq(auditLog.id, entry.id));
    expect(after).toEqual(entry);
  });

  it("has no route that changes it, and no lib code that updates or deletes it", () => {
    const routes: string[] = [];
    const walk = (dir: string) => {
      for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
        const p = path.join(dir, e.name);
        if (e.isDirectory()) walk(p);
        else if (/^route\.tsx?$/.test(e.name) && /audit/i.test(p)) routes.push(p);
      }
    };
    walk(path.resolve("app"));
    for (const r of routes) expect(fs.readFileSync(r, "utf8"), r).not.toMatch(/export const (POST|PUT|PATCH|DELETE)/);
    const libs: string[] = [];
    const walkLib = (dir: string) => {
      for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
        const p = path.join(dir, e.name);
        if (e.isDirectory()) walkLib(p);
        else if (/\.tsx?$/.test(e.name)) libs.push(p);
      }
    };
    for (const root of ["lib", "app", "db/queries", "worker"]) walkLib(path.resolve(root));
    for (const f of libs) expect(fs.readFileSync(f, "utf8"), f).not.toMatch(/\.(update|delete)\(auditLog\)/);
  });
});
