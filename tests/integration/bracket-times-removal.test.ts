// Times given for many frames at once and frames removed before submission,
// through the real services, database and S3 fake: a CSV is all or nothing and
// names the line and column; an interval gives times in shot order; a typed
// time wins over the file's and can be forgotten; a Sun-centred reduction is
// refused while a frame lacks a time; only the owner changes anything; removal
// deletes the original only when no reduction may have read it.
import { randomUUID } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { bracketSets, frames, reductions } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { correctFrame, findBracketSet, giveFrameTimes, removeFrame, submitBracketSet } from "@/lib/bracket-sets";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { startReduction } from "@/lib/reductions/reductions";
import { bucketName, findObjectSize } from "@/lib/storage";
import { requireTestDatabase } from "../support/env";
import { createMember, createSetFor, uploadFile } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
let owner: Actor;
let other: Actor;
let curator: Actor;
let setId = "";
const names = ["IMG_9.TIF", "IMG_10.TIF", "IMG_11.TIF"];
const ids: Record<string, string> = {};

/** Frames made ingested and light directly: these tests are about times, not about decoding. */
async function markIngested(frameId: string): Promise<void> {
  await db.update(frames).set({ ingestState: "ingested", exposureS: 0.01, exposureSource: "file" }).where(eq(frames.id, frameId));
}

beforeAll(async () => {
  owner = await createMember(db, "Nadia Fairweather");
  other = await createMember(db, "Another Member");
  curator = await createMember(db, "A Curator", ["member", "curator"]);
  setId = await createSetFor(db, owner, "Cadiz, times test");
  for (const name of names) {
    const f = await uploadFile(db, owner, setId, name, new TextEncoder().encode(`not an image: ${name} ${randomUUID()}`) as Uint8Array<ArrayBuffer>).catch(async () => {
      // Not an image: completion refuses it (unknown content) but records the frame; find it by name.
      const [row] = await db.select({ id: frames.id }).from(frames).where(and(eq(frames.bracketSetId, setId), eq(frames.originalFileName, name)));
      return { id: row.id };
    });
    ids[name] = f.id;
    await db.update(frames).set({ ingestState: "ingested", refusalReason: null }).where(eq(frames.id, f.id));
    await markIngested(f.id);
  }
}, 60_000);

afterAll(async () => {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

const timeOf = async (name: string) => (await findBracketSet(db, owner, setId)).frames.find((f) => f.fileName === name)!;

describe("times given by the photographer", () => {
  it("refuses Sun alignment while frames lack times, in words", async () => {
    await expect(startReduction(db, owner, setId, { registration: "sun" })).rejects.toMatchObject({ code: "invalid_input", message: expect.stringContaining("3 of 3 frames have none") });
  });

  it("takes a CSV all or nothing, naming the line and the column", async () => {
    const bad = "file,capture_time,exposure_s\nIMG_9.TIF,2027-08-02T08:46:10Z,1/1000\nIMG_10.TIF,2027-08-02T08:46:12,1/250\nIMG_12.TIF,2027-08-02T08:46:14Z,\n";
    await expect(giveFrameTimes(db, owner, setId, { method: "csv", fileName: "cam.csv", text: bad })).rejects.toMatchObject({
      code: "invalid_input",
      message: expect.stringMatching(/^cam\.csv was not used, nothing was changed\. line 3, column capture_time: .*has no time zone.*; line 4, column file: no frame of this set is named IMG_12\.TIF/),
    });
    expect((await timeOf("IMG_9.TIF")).captureAt).toBeNull();
    expect((await timeOf("IMG_9.TIF")).exposureS).toBe(0.01);

    const good = "file,capture_time,exposure_s\nimg_9.tif,2027-08-02T10:46:10+02:00,1/1000\nIMG_10.TIF,08:46:12.5,\n";
    const result = await giveFrameTimes(db, owner, setId, { method: "csv", fileName: "cam.csv", text: good });
    expect(result).toMatchObject({ timesSet: 2, exposuresSet: 1 });
    const nine = await timeOf("IMG_9.TIF");
    expect(nine).toMatchObject({ captureAt: "2027-08-02T08:46:10.000Z", captureTimeSource: "csv", exposureS: 0.001, exposureSource: "photographer", fileCaptureAt: null });
    expect((await timeOf("IMG_10.TIF")).captureAt).toBe("2027-08-02T08:46:12.500Z");
  });

  it("applies the set's clock offset to given times as to the files'", async () => {
    await db.update(bracketSets).set({ clockOffsetS: 2 }).where(eq(bracketSets.id, setId));
    expect((await timeOf("IMG_9.TIF")).correctedCaptureAt).toBe("2027-08-02T08:46:08.000Z");
    await db.update(bracketSets).set({ clockOffsetS: 0 }).where(eq(bracketSets.id, setId));
  });

  it("gives the frames without a time their times in shot order, then every frame when asked", async () => {
    const missing = await giveFrameTimes(db, owner, setId, { method: "interval", firstAt: "08:47:00", intervalS: 1.5, scope: "missing" });
    expect(missing.fileNames).toEqual(["IMG_11.TIF"]);
    expect((await timeOf("IMG_11.TIF")).captureAt).toBe("2027-08-02T08:47:00.000Z");
    const all = await giveFrameTimes(db, owner, setId, { method: "interval", firstAt: "2027-08-02T08:46:00Z", intervalS: 1.5, scope: "all" });
    // IMG_9 before IMG_10: the camera's numbering, not the letters.
    expect(all.fileNames).toEqual(names);
    expect((await timeOf("IMG_11.TIF"))).toMatchObject({ captureAt: "2027-08-02T08:46:03.000Z", captureTimeSource: "interval" });
  });

  it("takes a typed time, refuses a bad one on its field, and forgets it on request", async () => {
    await expect(correctFrame(db, owner, setId, ids["IMG_10.TIF"], { captureAt: "8:46" })).rejects.toMatchObject({ fields: [{ field: "captureAt" }] });
    const typed = await correctFrame(db, owner, setId, ids["IMG_10.TIF"], { captureAt: "08:46:01.25" });
    expect(typed).toMatchObject({ captureAt: "2027-08-02T08:46:01.250Z", captureTimeSource: "table" });
    const forgotten = await correctFrame(db, owner, setId, ids["IMG_10.TIF"], { captureAt: null });
    expect(forgotten).toMatchObject({ captureAt: null, captureTimeSource: null, needsTime: true });
    await correctFrame(db, owner, setId, ids["IMG_10.TIF"], { captureAt: "08:46:01.5" });
  });

  it("lets only the owner give times", async () => {
    await expect(giveFrameTimes(db, other, setId, { method: "interval", firstAt: "08:46:00", intervalS: 1, scope: "all" })).rejects.toMatchObject({ code: "not_found" });
    await expect(giveFrameTimes(db, curator, setId, { method: "interval", firstAt: "08:46:00", intervalS: 1, scope: "all" })).rejects.toMatchObject({ code: "forbidden" });
  });
});

describe("removing a frame before submission", () => {
  it("deletes the row and its original when no reduction may have read it; only the owner may", async () => {
    const [row] = await db.select({ key: frames.originalKey }).from(frames).where(eq(frames.id, ids["IMG_11.TIF"]));
    expect(await findObjectSize({ bucket: bucketName("originals"), key: row.key })).not.toBeNull();
    await expect(removeFrame(db, curator, setId, ids["IMG_11.TIF"])).rejects.toMatchObject({ code: "forbidden" });
    await expect(removeFrame(db, other, setId, ids["IMG_11.TIF"])).rejects.toMatchObject({ code: "not_found" });
    await expect(removeFrame(db, owner, setId, ids["IMG_11.TIF"])).resolves.toMatchObject({ fileName: "IMG_11.TIF", isOriginalDeleted: true });
    expect(await db.select().from(frames).where(eq(frames.id, ids["IMG_11.TIF"]))).toEqual([]);
    expect(await findObjectSize({ bucket: bucketName("originals"), key: row.key })).toBeNull();
  });

  it("keeps the original of a frame a finished reduction used, and refuses while one runs", async () => {
    const [red] = await db.insert(reductions).values({ bracketSetId: setId, requestedBy: owner.userId, params: { registration: "corona", filter: "mgn", recoverResponse: false }, state: "running" }).returning();
    await expect(removeFrame(db, owner, setId, ids["IMG_10.TIF"])).rejects.toMatchObject({ code: "conflict", message: expect.stringContaining("while a reduction") });
    await db.update(reductions).set({ state: "done" }).where(eq(reductions.id, red.id));
    const [row] = await db.select({ key: frames.originalKey }).from(frames).where(eq(frames.id, ids["IMG_10.TIF"]));
    await expect(removeFrame(db, owner, setId, ids["IMG_10.TIF"])).resolves.toMatchObject({ isOriginalDeleted: false });
    expect(await findObjectSize({ bucket: bucketName("originals"), key: row.key })).not.toBeNull();
  });

  it("refuses removal once the set is submitted", async () => {
    await submitBracketSet(db, owner, setId);
    await expect(removeFrame(db, owner, setId, ids["IMG_9.TIF"])).rejects.toMatchObject({ code: "conflict" });
  });
});
