// Triage of a bracket set through the real services and the worker: what
// ingest measures on each frame (histogram, sharpness, limb), groups (auto,
// split, merge) and reductions of one group, the clock offset from a frame
// that shows a trusted clock, mail to the photographer when a reduction
// finishes or fails, and sending the set for review with mail to curators.
import { randomUUID } from "node:crypto";
import { and, eq, like } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { bracketSets, frames, kits, outboxMessages, reductions, type Frame } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { changeGroups, correctFrame, findBracketSet, submitBracketSet, updateBracketSet } from "@/lib/bracket-sets";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { encodeFits } from "@/lib/media/fits-write";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues, enqueue } from "@/lib/queue/enqueue";
import { notifyReductionOutcome } from "@/lib/reductions/run";
import { findReduction, startReduction } from "@/lib/reductions/reductions";
import { bucketName, findObjectSize, readObjectRange } from "@/lib/storage";
import { requireTestDatabase } from "../support/env";
import { firstLink, waitForMail } from "../support/mailbox";
import { createMember, createSetFor, uploadFile } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(async () => {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

async function waitFor<T>(what: string, read: () => Promise<T | undefined>, timeoutMs = 120_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const v = await read();
    if (v !== undefined) return v;
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`${what} did not happen within ${timeoutMs} ms`);
}

const waitForIngest = (frameId: string) =>
  waitFor(`ingest of ${frameId}`, async () => {
    const [row] = await db.select().from(frames).where(eq(frames.id, frameId));
    return row && row.ingestState !== "received" ? row : undefined;
  });

const W = 256;
const H = 224;
// Mid-totality at Luxor (about 10:05 UTC, DESIGN.md section 7): a bracket of three
// frames 2 s apart, then a second bracket of two a minute later.
const T0 = Date.UTC(2027, 7, 2, 10, 4, 30);
const OFFSETS_S = [0, 2, 4, 64, 66];

let owner: Actor;
let curator: Actor;
let setId: string;
let moonRadiusPx: number;
const frameIds: string[] = [];
let noTimeFrameId = "";

beforeAll(async () => {
  owner = await createMember(db, "Halima Okonjo-Reyes");
  curator = await createMember(db, "Bertil Sandqvist", ["member", "curator"]);
  setId = await createSetFor(db, owner, "Luxor, two brackets");
  // An equatorial kit squared to north: the reduction takes the north angle from the mount.
  const [kit] = await db
    .insert(kits)
    .values({ ownerId: owner.userId, name: "Short refractor", camera: "Mono camera", sensorWidthMm: 10, sensorHeightMm: 8, pixelPitchUm: 5, focalMm: 600, fNumber: 7, mount: "equatorial" })
    .returning({ id: kits.id });
  await db.update(bracketSets).set({ kitId: kit.id }).where(eq(bracketSets.id, setId));
  const { frames: synth, truth } = synthesizeBracket({
    width: W,
    height: H,
    channels: 1,
    exposuresS: [1 / 500, 1 / 125, 1 / 30, 1 / 250, 1 / 60],
    sunRadiusPx: 40,
    seed: 23,
    whiteLevel: 16383,
  });
  moonRadiusPx = truth.moonRadiusPx;
  for (const [i, f] of synth.entries()) {
    const fits = encodeFits({
      width: W,
      height: H,
      planes: [Uint16Array.from(f.planes[0])],
      cards: [
        { key: "EXPTIME", value: f.exposureS, comment: "seconds" },
        { key: "DATE-OBS", value: new Date(T0 + OFFSETS_S[i] * 1000).toISOString().replace("Z", "") },
        { key: "SATURATE", value: 16383 },
        { key: "INSTRUME", value: "Crownlight synthetic" },
      ],
    });
    const sent = await uploadFile(db, owner, setId, `luxor-${i + 1}.fits`, new Uint8Array(fits));
    frameIds.push(sent.id);
  }
  // A PNG without EXIF: no capture time.
  const png = await sharp({ create: { width: 16, height: 16, channels: 3, background: "#101010" } }).png().toBuffer();
  noTimeFrameId = (await uploadFile(db, owner, setId, "clock-face.png", new Uint8Array(png))).id;
  for (const id of [...frameIds, noTimeFrameId]) await waitForIngest(id);
}, 240_000);

describe("ingest measures for triage", () => {
  let rows: Frame[];
  beforeAll(async () => {
    rows = await db.select().from(frames).where(eq(frames.bracketSetId, setId));
  });

  it("records a 64-bin histogram that adds up to the pixel count", () => {
    for (const id of frameIds) {
      const row = rows.find((r) => r.id === id)!;
      expect(row.ingestState, row.refusalReason ?? "").toBe("ingested");
      expect(row.flags.histogram).toHaveLength(64);
      expect(row.flags.histogram!.reduce((s, n) => s + n, 0)).toBe(W * H);
    }
  });

  it("fits the limb near the generator's Moon, in the original's pixels", () => {
    const limbs = frameIds.map((id) => rows.find((r) => r.id === id)!.flags.limb!);
    const good = limbs.filter((l) => l.quality === "good");
    expect(good.length).toBeGreaterThanOrEqual(3);
    // Tolerance 1 px: lib/imaging/limb-fit.ts documents an inward bias of 0.3 to 0.9 px at a 32 px Sun.
    for (const l of good) expect(Math.abs(l.radiusPx - moonRadiusPx)).toBeLessThan(1);
  });

  it("measures sharpness and marks no frame of a sharp bracket as blurred", async () => {
    for (const id of frameIds) expect(rows.find((r) => r.id === id)!.flags.sharpness).toBeGreaterThan(0);
    const set = await findBracketSet(db, owner, setId);
    const light = set.frames.filter((f) => frameIds.includes(f.id));
    expect(light.every((f) => f.flags.isBlurred === false)).toBe(true);
  });
});

describe("groups", () => {
  it("groups by the gap between frames, and then refuses to reduce without a group, naming the groups", async () => {
    const set = await changeGroups(db, owner, setId, { action: "auto", gapS: 20 });
    const groupOf = (id: string) => set.frames.find((f) => f.id === id)!.groupNumber;
    expect(frameIds.map(groupOf)).toEqual([1, 1, 1, 2, 2]);
    // The PNG has no capture time: it joins the last group.
    expect(groupOf(noTimeFrameId)).toBe(2);
    await expect(startReduction(db, owner, setId, { registration: "corona" })).rejects.toThrow(/holds 2 groups of frames \(1, 2\); choose the group/);
    await expect(startReduction(db, owner, setId, { registration: "corona", groupNumber: 5 })).rejects.toThrow(/has no group 5; its groups are 1, 2/);
  });

  it("splits at a frame and merges back", async () => {
    const split = await changeGroups(db, owner, setId, { action: "split", frameId: frameIds[1] });
    expect(frameIds.map((id) => split.frames.find((f) => f.id === id)!.groupNumber)).toEqual([1, 2, 2, 3, 3]);
    await expect(startReduction(db, owner, setId, { registration: "corona", groupNumber: 1 })).rejects.toThrow(/Group 1 of the bracket set "Luxor, two brackets" has 1 usable light frame; a reduction needs at least 2/);
    const merged = await changeGroups(db, owner, setId, { action: "merge", groupNumber: 2 });
    expect(frameIds.map((id) => merged.frames.find((f) => f.id === id)!.groupNumber)).toEqual([1, 1, 1, 2, 2]);
  });

  it("puts a frame uploaded after grouping in the group nearest to it in time", async () => {
    const late = encodeFits({
      width: 32,
      height: 32,
      planes: [new Uint16Array(32 * 32).fill(900)],
      cards: [
        { key: "EXPTIME", value: 0.5, comment: "seconds" },
        { key: "DATE-OBS", value: new Date(T0 + 70_000).toISOString().replace("Z", "") },
      ],
    });
    const sent = await uploadFile(db, owner, setId, "luxor-late.fits", new Uint8Array(late));
    const row = await waitForIngest(sent.id);
    expect(row.groupNumber).toBe(2);
    // Left out of the reductions below: a flat frame, not part of either bracket.
    await correctFrame(db, owner, setId, sent.id, { included: false });
  });

  it("lets only the owner change groups", async () => {
    await expect(changeGroups(db, curator, setId, { action: "auto", gapS: 20 })).rejects.toMatchObject({ code: "forbidden" });
    const stranger = await createMember(db, "Ilse Vanderhoek");
    await expect(changeGroups(db, stranger, setId, { action: "auto", gapS: 20 })).rejects.toMatchObject({ code: "not_found" });
  });
});

describe("clock offset from a frame showing a trusted clock", () => {
  it("sets offset = camera time - time shown, so the corrected time is the time shown", async () => {
    // The camera recorded 10:04:32 (T0 + 2 s) for the frame; the clock in it showed 10:02:59.5 UTC.
    const shown = "2027-08-02T10:02:59.500Z";
    const summary = await updateBracketSet(db, owner, setId, { clockFrameId: frameIds[1], clockShownAt: shown });
    expect(summary.clockOffsetS).toBeCloseTo(92.5, 6);
    const set = await findBracketSet(db, owner, setId);
    expect(set.frames.find((f) => f.id === frameIds[1])!.correctedCaptureAt).toBe(shown);
    await updateBracketSet(db, owner, setId, { clockOffsetS: 0 });
  });

  it("refuses a frame without a capture time, naming the file, and keeps the offset", async () => {
    await expect(updateBracketSet(db, owner, setId, { clockFrameId: noTimeFrameId, clockShownAt: "2027-08-02T10:03:00Z" })).rejects.toThrow(/clock-face\.png has no capture time/);
    expect((await findBracketSet(db, owner, setId)).clockOffsetS).toBe(0);
  });
});

describe("reductions of one group, mail, and sending for review", () => {
  let reductionId = "";

  it("refuses to send for review before a reduction has finished", async () => {
    await expect(submitBracketSet(db, owner, setId)).rejects.toThrow(/has no finished reduction yet/);
  });

  it("reduces only the chosen group, keeps every parameter, and mails the photographer once", async () => {
    const started = await startReduction(db, owner, setId, { registration: "corona", filter: "nrgf", filterStrength: 0.5, groupNumber: 1 });
    reductionId = started.id;
    expect(started.params).toMatchObject({ registration: "corona", filter: "nrgf", filterStrength: 0.5, groupNumber: 1, outputLongSidePx: 0, recoverResponse: false });
    const done = await waitFor(
      "the reduction",
      async () => {
        const r = await findReduction(db, owner, started.id);
        if (r.state === "failed") throw new Error(`the reduction failed: ${r.error}`);
        return r.state === "done" ? r : undefined;
      },
      200_000,
    );
    expect(done.progress).toBe(1);
    // report.json lists the frames reduced: the three of group 1.
    const [row] = await db.select({ outputs: reductions.outputs }).from(reductions).where(eq(reductions.id, started.id));
    const ref = { bucket: bucketName("derived"), key: row.outputs!.report };
    const report = JSON.parse((await readObjectRange(ref, 0, (await findObjectSize(ref))!)).toString("utf8")) as { frames: { name: string }[] };
    expect(report.frames.map((f) => f.name).sort()).toEqual(["luxor-1.fits", "luxor-2.fits", "luxor-3.fits"]);

    const mail = await waitForMail(owner.email, (m) => m.subject.includes("Reduction finished"), 60_000);
    expect(mail.subject).toBe("Reduction finished: Luxor, two brackets");
    expect(firstLink(mail.text)).toBe(`${process.env.APP_URL}/studio/reductions/${started.id}`);

    // A repeated notice (a retried job) adds no second message.
    await notifyReductionOutcome(db, started.id);
    const rows = await db.select().from(outboxMessages).where(like(outboxMessages.id, `reduction-outcome-${started.id}%`));
    expect(rows).toHaveLength(1);
  }, 260_000);

  it("mails the photographer the reason when a reduction fails for good", async () => {
    // A reduction whose group has gone (regrouped after the start): the worker refuses it without retry.
    const id = randomUUID();
    await db.insert(reductions).values({ id, bracketSetId: setId, requestedBy: owner.userId, params: { registration: "corona", filter: "mgn", recoverResponse: false, groupNumber: 9 } as never });
    await enqueue(db, "reduction.run", { reductionId: id });
    const failed = await waitFor("the failed reduction", async () => {
      const r = await findReduction(db, owner, id);
      return r.state === "failed" ? r : undefined;
    });
    expect(failed.error).toMatch(/has no group 9/);
    const mail = await waitForMail(owner.email, (m) => m.subject.startsWith("Reduction failed") && m.text.includes("no group 9"), 60_000);
    expect(mail.text).toMatch(/Reason: The bracket set "Luxor, two brackets" has no group 9/);
    expect(firstLink(mail.text)).toBe(`${process.env.APP_URL}/studio/reductions/${id}`);
  }, 180_000);

  it("moves the set to awaiting review and mails every curator a link to it", async () => {
    expect(reductionId).not.toBe("");
    await expect(submitBracketSet(db, curator, setId)).rejects.toMatchObject({ code: "forbidden" });
    const summary = await submitBracketSet(db, owner, setId);
    expect(summary.state).toBe("awaiting-review");
    const mail = await waitForMail(curator.email, (m) => m.subject.includes("Luxor, two brackets"), 60_000);
    expect(mail.subject).toBe("Bracket set awaiting review: Luxor, two brackets");
    expect(mail.text).toContain("Halima Okonjo-Reyes");
    expect(firstLink(mail.text)).toBe(`${process.env.APP_URL}/review/sets/${setId}`);
    // Once awaiting review, it is not sent again and its frames and groups are closed to changes.
    await expect(submitBracketSet(db, owner, setId)).rejects.toMatchObject({ code: "conflict" });
    await expect(changeGroups(db, owner, setId, { action: "auto", gapS: 20 })).rejects.toMatchObject({ code: "conflict" });
    await expect(correctFrame(db, owner, setId, frameIds[0], { included: false })).rejects.toMatchObject({ code: "conflict" });
    const [row] = await db.select({ included: frames.included }).from(frames).where(and(eq(frames.id, frameIds[0]), eq(frames.bracketSetId, setId)));
    expect(row.included).toBe(true);
  }, 120_000);
});
