// What becomes of refused frames: a refused file's checksum does not block the
// same bytes sent again under the right name; a refused frame can be removed
// (and only a refused one); a frame whose ingest fails with any fault ends
// refused with a reason after its last attempt, never "received" for ever;
// a FITS file of 7 planes, an impossible DATE-OBS and an absurd exposure are
// each named in the frame's record. Test data invented for the tests.
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db/client";
import { frames, type Frame } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { correctFrame, removeRefusedFrame } from "@/lib/bracket-sets";
import { encodeFits } from "@/lib/media/fits-write";
import { bucketName, findObjectSize } from "@/lib/storage";
import { ingestFrame } from "@/worker/jobs/frame-ingest";
import { requireTestDatabase } from "../support/env";
import { waitFor } from "../support/wait";
import { closeUploadTest, createMember, createSetFor, uploadFile } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(closeUploadTest);

const ingested = (frameId: string): Promise<Frame> =>
  waitFor(`ingest of frame ${frameId}`, async () => {
    const [row] = await db.select().from(frames).where(eq(frames.id, frameId));
    return row && row.ingestState !== "received" ? row : undefined;
  }, 60_000);

function fits(planes: number, cards: { key: string; value: string | number }[]): Uint8Array<ArrayBuffer> {
  const plane = () => new Uint16Array(32 * 24).map((_, i) => 400 + (i % 32) * 20);
  return encodeFits({ width: 32, height: 24, planes: Array.from({ length: planes }, plane), cards }) as Uint8Array<ArrayBuffer>;
}

let owner: Actor;
let setId = "";
beforeAll(async () => {
  owner = await createMember(db, "Refusal tester");
  setId = await createSetFor(db, owner, "Refusals");
});

describe("a refused frame", () => {
  it("does not hold its checksum against the same bytes sent again with the right name", async () => {
    const tiff = new Uint8Array(await sharp({ create: { width: 40, height: 30, channels: 3, background: "#405060" } }).tiff().toBuffer());
    const wrong = await ingested((await uploadFile(db, owner, setId, "totality-01.dng", tiff)).id);
    expect(wrong.ingestState).toBe("refused");
    expect(wrong.refusalReason).toMatch(/^totality-01\.dng: /);
    const right = await ingested((await uploadFile(db, owner, setId, "totality-01.tif", tiff)).id);
    expect([right.ingestState, right.refusalReason]).toEqual(["ingested", null]);
    // A third copy is a duplicate of the accepted one, not of the refused one.
    const third = await ingested((await uploadFile(db, owner, setId, "totality-01-copy.tif", tiff)).id);
    expect(third.ingestState).toBe("refused");
    expect(third.refusalReason).toMatch(/as totality-01\.tif, already in this bracket set$/);
    expect(third.flags.duplicateOfFrameId).toBe(right.id);
  });

  it("can be removed by its owner, with its original; an ingested frame cannot", async () => {
    const rows = await db.select().from(frames).where(eq(frames.bracketSetId, setId));
    const refused = rows.find((f) => f.originalFileName === "totality-01.dng")!;
    const kept = rows.find((f) => f.originalFileName === "totality-01.tif")!;
    const other = await createMember(db, "Someone else");
    await expect(removeRefusedFrame(db, other, setId, refused.id)).rejects.toMatchObject({ code: "not_found" });
    await expect(removeRefusedFrame(db, owner, setId, kept.id)).rejects.toMatchObject({ code: "conflict" });
    await removeRefusedFrame(db, owner, setId, refused.id);
    expect(await db.select().from(frames).where(eq(frames.id, refused.id))).toEqual([]);
    expect(await findObjectSize({ bucket: bucketName("originals"), key: refused.originalKey })).toBeNull();
    // What was stored besides stays.
    expect(await findObjectSize({ bucket: bucketName("originals"), key: kept.originalKey })).toBeGreaterThan(0);
    expect((await db.select().from(frames).where(eq(frames.id, kept.id)))[0].ingestState).toBe("ingested");
  });
});

describe("bad input named in the frame's record", () => {
  it("refuses a FITS file of 7 planes at once, naming NAXIS3", async () => {
    const f = await ingested((await uploadFile(db, owner, setId, "seven-planes.fits", fits(7, [{ key: "EXPTIME", value: 0.01 }]))).id);
    expect(f.ingestState).toBe("refused");
    expect(f.refusalReason).toBe("seven-planes.fits: NAXIS3 = 7: a frame has 1 plane (mono) or 3 (red, green, blue), not 7");
  });

  it("refuses a DATE-OBS in month 13, naming the card, instead of rolling it over", async () => {
    const f = await ingested((await uploadFile(db, owner, setId, "month-13.fits", fits(1, [{ key: "EXPTIME", value: 0.01 }, { key: "DATE-OBS", value: "2027-13-02T10:05:30.000" }]))).id);
    expect(f.ingestState).toBe("refused");
    expect(f.refusalReason).toMatch(/^month-13\.fits: card DATE-OBS: "2027-13-02T10:05:30\.000" is not a real date and time/);
    expect(f.captureAt).toBeNull();
  });

  it("does not use an exposure of 1e30 s: the frame is flagged and waits for the photographer, who may not type one either", async () => {
    const f = await ingested((await uploadFile(db, owner, setId, "absurd-exposure.fits", fits(1, [{ key: "EXPTIME", value: 1e30 }]))).id);
    expect([f.ingestState, f.exposureS, f.exposureSource, f.flags.implausibleExposureS]).toEqual(["ingested", null, null, 1e30]);
    await expect(correctFrame(db, owner, setId, f.id, { exposureS: 1e9 })).rejects.toThrow();
    const fixed = await correctFrame(db, owner, setId, f.id, { exposureS: 0.004 });
    expect([fixed.exposureS, fixed.exposureSource, fixed.needsExposure]).toEqual([0.004, "photographer", false]);
  });
});

describe("a frame whose ingest fails with any fault", () => {
  it("stays received for a retry, and ends refused with its reason on the last attempt", async () => {
    const [row] = await db
      .insert(frames)
      .values({ id: crypto.randomUUID(), bracketSetId: setId, originalKey: "originals/none/never-stored.fits", originalFileName: "flaky.fits", sizeBytes: 10 })
      .returning();
    // A fault that is not bad input: the job's own progress report fails (as a database hiccup would).
    const failing = { db, jobId: "test", payload: { frameId: row.id }, report: async () => Promise.reject(new Error("connection reset")) };
    await expect(ingestFrame({ ...failing, attempt: 1, isFinalAttempt: false })).rejects.toThrow("connection reset");
    expect((await db.select().from(frames).where(eq(frames.id, row.id)))[0].ingestState).toBe("received");
    await expect(ingestFrame({ ...failing, attempt: 3, isFinalAttempt: true })).rejects.toThrow(/could not be read after 3 attempts/);
    const [after] = await db.select().from(frames).where(eq(frames.id, row.id));
    expect(after.ingestState).toBe("refused");
    expect(after.refusalReason).toBe(
      "flaky.fits: could not be read after 3 attempts; the file may be damaged or in a form Crownlight cannot read. Remove it and send it again; if it is refused again, tell a curator.",
    );
  });
});
