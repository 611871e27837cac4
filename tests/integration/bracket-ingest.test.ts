// Originals sent through presigned multipart uploads, then ingested by the
// worker that the test command runs: sound files get their checksum, format,
// metadata, thumbnail and clipped fraction; bad files are refused with a reason
// naming the file and the fault, once, without retry; duplicates name the first
// file; every original stays in S3.
import { createHash } from "node:crypto";
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { frames, jobRuns, type Frame } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { correctFrame, findBracketSet, setClockOffset } from "@/lib/bracket-sets";
import { encodeFits } from "@/lib/media/fits-write";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues, jobIdFor } from "@/lib/queue/enqueue";
import { bucketName, findObjectSize, readObjectRange } from "@/lib/storage";
import { requireTestDatabase } from "../support/env";
import { createMember, createSetFor, uploadFile } from "./bracket-upload-helpers";
import { makeClaimingPng } from "../support/bad-files";

requireTestDatabase();
const db = getDb();
afterAll(async () => {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

async function waitForIngest(frameId: string, timeoutMs = 45_000): Promise<Frame> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const [row] = await db.select().from(frames).where(eq(frames.id, frameId));
    if (row && row.ingestState !== "received") return row;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`frame ${frameId} was not ingested within ${timeoutMs} ms`);
}



const W = 2100;
const H = 2100;
const CLIPPED_ROWS = 210; // the top tenth of the frame is saturated

/** 16-bit grey TIFF, larger than one 8 MiB part, without EXIF (so no exposure). */
async function makeTiff16(): Promise<Buffer> {
  const pixels = new Uint16Array(W * H);
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) pixels[y * W + x] = y < CLIPPED_ROWS ? 65535 : 1000 + ((x * 13 + y * 7) % 20000);
  // A Uint16Array (not a Buffer) tells sharp the samples are 16-bit.
  return sharp(pixels, { raw: { width: W, height: H, channels: 1 } })
    .toColourspace("grey16")
    .tiff({ compression: "none" })
    .toBuffer();
}

function makeFits(): Uint8Array {
  const plane = new Uint16Array(64 * 48).map((_, i) => 500 + (i % 64) * 10);
  return encodeFits({
    width: 64,
    height: 48,
    planes: [plane],
    cards: [
      { key: "EXPTIME", value: 0.004, comment: "seconds" },
      { key: "DATE-OBS", value: "2027-08-02T10:05:12.250" },
      { key: "INSTRUME", value: "Cooled mono camera" },
    ],
  });
}

let alice: Actor;
let setId: string;
const sent = new Map<string, Uint8Array<ArrayBuffer>>();
const ids: Record<string, string> = {};

beforeAll(async () => {
  alice = await createMember(db, "Alice Ingest");
  setId = await createSetFor(db, alice, "Ingest bracket");
  const jpeg = await sharp(Uint8Array.from({ length: 256 * 256 * 3 }, (_, i) => (i * 7919) % 251), { raw: { width: 256, height: 256, channels: 3 } })
    .jpeg({ quality: 90 })
    .toBuffer();
  const fits = makeFits();
  const brokenFits = Buffer.from(Buffer.from(fits).toString("latin1").replace(/END {77}/, " ".repeat(80)), "latin1");
  const files: [string, Uint8Array][] = [
    ["corona-16bit.tif", await makeTiff16()],
    ["corona-0004.fits", fits],
    ["copy-of-0004.fits", fits],
    ["cut-short.jpg", jpeg.subarray(0, Math.floor(jpeg.length / 2))],
    ["no-end-card.fits", brokenFits],
    ["bomb.png", makeClaimingPng(50_000, 50_000)],
  ];
  for (const [name, original] of files) {
    // A copy in an ArrayBuffer of its own, as fetch wants for a body.
    const bytes = new Uint8Array(original);
    sent.set(name, bytes);
    const frame = await uploadFile(db, alice, setId, name, bytes);
    expect(frame.ingestState).toBe("received");
    ids[name] = frame.id;
    // The duplicate must arrive after the first copy has its checksum.
    if (name === "corona-0004.fits") await waitForIngest(frame.id);
  }
});

describe("frame ingest by the worker", () => {
  it("ingests a two-part 16-bit TIFF: checksum, geometry, no exposure (ask the photographer), clipped fraction, thumbnail", async () => {
    const f = await waitForIngest(ids["corona-16bit.tif"]);
    expect(f.refusalReason).toBeNull();
    expect(f.ingestState).toBe("ingested");
    expect(f.sha256).toBe(createHash("sha256").update(sent.get("corona-16bit.tif")!).digest("hex"));
    expect([f.format, f.width, f.height, f.bitDepth]).toEqual(["tiff", W, H, 16]);
    expect(f.exposureS).toBeNull();
    expect(f.exposureSource).toBeNull();
    expect(f.flags.clippedFraction).toBeCloseTo(CLIPPED_ROWS / H, 3);
    const thumb = await readObjectRange({ bucket: bucketName("derived"), key: f.thumbnailKey! }, 0, 1_000_000);
    const meta = await sharp(thumb).metadata();
    expect([meta.format, meta.width, meta.height]).toEqual(["jpeg", 320, 320]);
    const dto = (await findBracketSet(db, alice, setId)).frames.find((x) => x.id === f.id)!;
    expect(dto.needsExposure).toBe(true);
  });

  it("reads exposure and capture time from FITS cards, and applies the set's clock offset on reading", async () => {
    const f = await waitForIngest(ids["corona-0004.fits"]);
    expect(f.ingestState).toBe("ingested");
    expect([f.format, f.width, f.height, f.bitDepth]).toEqual(["fits", 64, 48, 16]);
    expect(f.exposureS).toBe(0.004);
    expect(f.exposureSource).toBe("file");
    expect(f.model).toBe("Cooled mono camera");
    expect(f.captureAt?.toISOString()).toBe("2027-08-02T10:05:12.250Z");
    // The camera clock ran 2.5 s fast.
    await setClockOffset(db, alice, setId, 2.5);
    const dto = (await findBracketSet(db, alice, setId)).frames.find((x) => x.id === f.id)!;
    expect(dto.captureAt).toBe("2027-08-02T10:05:12.250Z");
    expect(dto.correctedCaptureAt).toBe("2027-08-02T10:05:09.750Z");
    await setClockOffset(db, alice, setId, 0);
  });

  it("refuses a duplicate, naming the first file, and stores no second checksum", async () => {
    const f = await waitForIngest(ids["copy-of-0004.fits"]);
    expect(f.ingestState).toBe("refused");
    expect(f.refusalReason).toMatch(/^copy-of-0004\.fits: the same file .* as corona-0004\.fits, already in this bracket set$/);
    expect(f.flags.duplicateOfFrameId).toBe(ids["corona-0004.fits"]);
    expect(f.sha256).toBeNull();
  });

  it("refuses a truncated JPEG, a FITS without END and a decompression bomb, each naming the file and the fault", async () => {
    const cut = await waitForIngest(ids["cut-short.jpg"]);
    expect(cut.ingestState).toBe("refused");
    expect(cut.refusalReason).toMatch(/^cut-short\.jpg: the image (is cut short|cannot be decoded)/);
    const fits = await waitForIngest(ids["no-end-card.fits"]);
    expect(fits.refusalReason).toMatch(/^no-end-card\.fits: the header has no END card/);
    const bomb = await waitForIngest(ids["bomb.png"]);
    expect(bomb.refusalReason).toBe("bomb.png: the image has more pixels than the 200-megapixel limit (a decompression bomb or an absurd size)");
    for (const f of [cut, fits, bomb]) expect(f.thumbnailKey).toBeNull();
  });

  it("fails refused jobs at once, without retry", async () => {
    for (const name of ["cut-short.jpg", "bomb.png", "copy-of-0004.fits"]) {
      const id = jobIdFor("frame.ingest", { frameId: ids[name] });
      const deadline = Date.now() + 10_000;
      let run = (await db.select().from(jobRuns).where(eq(jobRuns.id, id)))[0];
      while (run?.state !== "failed" && Date.now() < deadline) {
        await new Promise((r) => setTimeout(r, 200));
        run = (await db.select().from(jobRuns).where(eq(jobRuns.id, id)))[0];
      }
      expect(run.state).toBe("failed");
      expect(run.attempts).toBeLessThanOrEqual(1);
      expect(run.error).toMatch(new RegExp(`^${name.replace(/\./g, "\\.")}: `));
    }
  });

  it("keeps every original in S3, byte for byte in size", async () => {
    const rows = await db.select().from(frames).where(eq(frames.bracketSetId, setId));
    expect(rows).toHaveLength(sent.size);
    for (const r of rows) expect(await findObjectSize({ bucket: bucketName("originals"), key: r.originalKey })).toBe(sent.get(r.originalFileName)!.length);
  });

  it("lets the photographer give the missing exposure and exclude a frame; refuses a dark frame of another size; never includes a refused one", async () => {
    const tiffId = ids["corona-16bit.tif"];
    // Marking it a dark frame is refused as a whole: it is not the size of the set's other light frame
    // (tests/integration/calibration-frames.test.ts has a dark frame that fits).
    await expect(correctFrame(db, alice, setId, tiffId, { exposureS: 0.5, kind: "dark" })).rejects.toThrow(/^corona-16bit\.tif: 2100 x 2100 pixels, but the light frames of this set are 64 x 48/);
    const fixed = await correctFrame(db, alice, setId, tiffId, { exposureS: 0.5 });
    expect([fixed.exposureS, fixed.exposureSource, fixed.kind, fixed.needsExposure]).toEqual([0.5, "photographer", "light", false]);
    expect((await correctFrame(db, alice, setId, tiffId, { included: false })).included).toBe(false);
    await expect(correctFrame(db, alice, setId, ids["bomb.png"], { included: true })).rejects.toMatchObject({ code: "conflict" });
  });
});
