// Faults at the edges of an upload, through the real services and the suite's
// worker. An upload interrupted half-way resumes from what S3 holds after the
// client has lost all its state, and the ingested frame's SHA-256 is the file's.
// Bad files in one bracket set (a corrupt frame, a file of the wrong type, a frame
// without an exposure, an oversized file, a decompression bomb) each end with a
// reason naming the file and the fault, while the good frames beside them stay
// as they were and every original stays downloadable, byte for byte. (The single
// refusals are in bracket-ingest and bracket-storage; this file checks what they
// leave around them.)
import { createHash } from "node:crypto";
import { mkdtemp, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { frames, reductions, uploads, type Frame } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { completeFrameUpload, findBracketSet, listParts, startFrameUpload } from "@/lib/bracket-sets";
import { encodeFits } from "@/lib/media/fits-write";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { startReduction } from "@/lib/reductions/reductions";
import { bucketName, downloadObjectToFile, findObjectSize, PART_SIZE_BYTES } from "@/lib/storage";
import { makeClaimingPng } from "../support/bad-files";
import { requireTestDatabase } from "../support/env";
import { makePatternFits } from "../support/synthetic-fits";
import { waitFor } from "../support/wait";
import { createMember, createSetFor, putParts, uploadFile } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
let workDir: string;
afterAll(async () => {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
  if (workDir) await rm(workDir, { recursive: true, force: true });
});

const sha = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");

async function waitForIngest(frameId: string): Promise<Frame> {
  return waitFor(`ingest of frame ${frameId}`, async () => {
    const [row] = await db.select().from(frames).where(eq(frames.id, frameId));
    return row && row.ingestState !== "received" ? row : undefined;
  }, 120_000);
}

/** The stored original, downloaded whole, hashed. */
async function hashStoredOriginal(key: string): Promise<string> {
  const path = join(workDir, `${sha(new TextEncoder().encode(key))}.bin`);
  await downloadObjectToFile({ bucket: bucketName("originals"), key }, path);
  return sha(await readFile(path));
}

let owner: Actor;
beforeAll(async () => {
  workDir = await mkdtemp(join(tmpdir(), "crownlight-faults-"));
  owner = await createMember(db, "Uma Uploader");
});

describe("an upload interrupted half-way", () => {
  it("resumes from the parts S3 holds after the client lost its state, and ingests the file's exact bytes", async () => {
    const setId = await createSetFor(db, owner, "Resumed upload");
    // 2900 x 2900 16-bit pixels: a FITS file of three 8 MiB parts.
    const bytes = makePatternFits(2900, 2900, 5, 0.02);
    const partCount = Math.ceil(bytes.length / PART_SIZE_BYTES);
    expect(partCount).toBe(3);
    const started = await startFrameUpload(db, owner, setId, { fileName: "long-exposure.fits", sizeBytes: bytes.length });
    // Half of it goes up, out of order, before the connection drops.
    await putParts(db, owner, setId, started, bytes, [3, 1]);

    // A reloaded page knows only the set: it finds the open upload and asks S3 what arrived.
    const set = await findBracketSet(db, owner, setId);
    const open = set.openUploads.find((u) => u.fileName === "long-exposure.fits");
    expect(open?.id).toBe(started.id);
    const held = await listParts(db, owner, setId, open!.id);
    expect(held.missingPartNumbers).toEqual([2]);
    expect(held.parts.map((p) => [p.partNumber, p.sizeBytes])).toEqual([
      [1, PART_SIZE_BYTES],
      [3, bytes.length - 2 * PART_SIZE_BYTES],
    ]);
    await putParts(db, owner, setId, open!, bytes, held.missingPartNumbers);
    const frame = await completeFrameUpload(db, owner, setId, open!.id);

    const ingested = await waitForIngest(frame.id);
    expect([ingested.ingestState, ingested.refusalReason, ingested.width, ingested.height, ingested.exposureS]).toEqual(["ingested", null, 2900, 2900, 0.02]);
    expect(ingested.sha256).toBe(sha(bytes));
    expect(await hashStoredOriginal(ingested.originalKey)).toBe(sha(bytes));
    const [upload] = await db.select().from(uploads).where(eq(uploads.id, started.id));
    expect(upload.state).toBe("completed");
  }, 240_000);
});

describe("bad files beside good ones in one bracket set", () => {
  let setId: string;
  const sent = new Map<string, Uint8Array<ArrayBuffer>>();
  const ids: Record<string, string> = {};
  const good = ["good-01.fits", "good-02.fits", "good-03.fits"];
  let goodBefore: Frame[];
  const completionErrors: Record<string, { code?: string; message?: string }> = {};

  beforeAll(async () => {
    setId = await createSetFor(db, owner, "Mixed bracket");
    for (const [i, name] of good.entries()) {
      const bytes = makePatternFits(320, 240, 100 + i, [0.001, 0.01, 0.1][i]);
      sent.set(name, bytes);
      ids[name] = (await uploadFile(db, owner, setId, name, bytes)).id;
    }
    goodBefore = await Promise.all(good.map((n) => waitForIngest(ids[n])));

    const whole = makePatternFits(320, 240, 200);
    const noExposure = new Uint8Array(encodeFits({ width: 64, height: 48, planes: [new Uint16Array(64 * 48).fill(900)], cards: [{ key: "DATE-OBS", value: "2027-08-02T10:05:30.000" }] }));
    // A ZIP archive (local file header "PK\x03\x04") named as a FITS frame.
    const zip = new Uint8Array(Buffer.concat([Buffer.from("PK\x03\x04", "latin1"), Buffer.alloc(2000, 7)]));
    const bad: [string, Uint8Array<ArrayBuffer>][] = [
      ["cut-short.fits", whole.slice(0, 2880 + 40_000)],
      ["archive.fits", zip],
      ["no-exposure.fits", noExposure],
      ["bomb.png", new Uint8Array(makeClaimingPng(50_000, 50_000))],
    ];
    for (const [name, bytes] of bad) {
      sent.set(name, bytes);
      try {
        ids[name] = (await uploadFile(db, owner, setId, name, bytes)).id;
      } catch (err) {
        if (!(err as { code?: string }).code) throw err;
        completionErrors[name] = err as { code?: string; message?: string };
        const [row] = await db.select({ frameId: uploads.frameId }).from(uploads).where(and(eq(uploads.bracketSetId, setId), eq(uploads.fileName, name)));
        ids[name] = row.frameId;
      }
    }
  }, 240_000);

  it("ends each bad file with a reason naming the file and the fault", async () => {
    const cut = await waitForIngest(ids["cut-short.fits"]);
    expect(cut.ingestState).toBe("refused");
    expect(cut.refusalReason).toMatch(/^cut-short\.fits: the data unit is cut short/);

    // The wrong type is caught when the upload completes, before any job runs.
    expect(completionErrors["archive.fits"]).toMatchObject({ code: "unsupported_media", message: expect.stringMatching(/^archive\.fits: the content is not an image format we read/) });
    const [archive] = await db.select().from(frames).where(eq(frames.id, ids["archive.fits"]));
    expect(archive.ingestState).toBe("refused");
    expect(archive.refusalReason).toMatch(/^archive\.fits: /);

    const bomb = await waitForIngest(ids["bomb.png"]);
    expect(bomb.refusalReason).toBe("bomb.png: the image has more pixels than the 200-megapixel limit (a decompression bomb or an absurd size)");

    // A frame without an exposure is kept and asks for one; a reduction names it.
    const noExposure = await waitForIngest(ids["no-exposure.fits"]);
    expect([noExposure.ingestState, noExposure.exposureS]).toEqual(["ingested", null]);
    const dto = (await findBracketSet(db, owner, setId)).frames.find((f) => f.id === noExposure.id)!;
    expect(dto.needsExposure).toBe(true);
    await expect(startReduction(db, owner, setId, { registration: "corona" })).rejects.toMatchObject({
      code: "invalid_input",
      message: "Give an exposure time for no-exposure.fits: the file does not say.",
    });
    expect(await db.select().from(reductions).where(eq(reductions.bracketSetId, setId))).toEqual([]);

    // Too large: refused from the declared size, before any byte is stored.
    await expect(startFrameUpload(db, owner, setId, { fileName: "huge-raw.cr3", sizeBytes: 2 * 1024 ** 3 + 1 })).rejects.toMatchObject({
      code: "too_large",
      // One byte over: both sizes are spelled out, since rounded they would both read "2.0 GB".
      message: "huge-raw.cr3: 2,147,483,649 bytes is more than the 2,147,483,648 bytes a frame may have.",
    });
    expect(await db.select().from(uploads).where(eq(uploads.fileName, "huge-raw.cr3"))).toEqual([]);
  });

  it("leaves the good frames exactly as they were", async () => {
    for (const before of goodBefore) {
      const [after] = await db.select().from(frames).where(eq(frames.id, before.id));
      expect(after).toEqual(before);
      expect(after.sha256).toBe(sha(sent.get(after.originalFileName)!));
      expect(after.ingestState).toBe("ingested");
      expect(await findObjectSize({ bucket: bucketName("derived"), key: after.thumbnailKey! })).toBeGreaterThan(0);
    }
    const rows = await db.select().from(frames).where(eq(frames.bracketSetId, setId));
    expect(rows.map((r) => r.originalFileName).sort()).toEqual([...sent.keys()].sort());
  });

  it("keeps every original, good or bad, downloadable byte for byte", async () => {
    const rows = await db.select().from(frames).where(eq(frames.bracketSetId, setId));
    for (const r of rows) expect([r.originalFileName, await hashStoredOriginal(r.originalKey)]).toEqual([r.originalFileName, sha(sent.get(r.originalFileName)!)]);
    for (const r of rows.filter((x) => x.ingestState === "refused")) expect([r.originalFileName, r.thumbnailKey]).toEqual([r.originalFileName, null]);
  });
});
