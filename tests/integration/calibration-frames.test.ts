// Calibration frames that cannot serve are refused with a reason naming the file:
// when the photographer marks a frame bias, dark or flat (another size than the
// set's light frames, other colour planes, an 8-bit JPEG), and at ingest of a frame
// already marked. Real services and the worker.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { frames, type Frame } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { correctFrame } from "@/lib/bracket-sets";
import { createSensorModel, synthesizeDarkFrames } from "@/lib/imaging/synth-calibration";
import { encodeFits } from "@/lib/media/fits-write";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues, enqueue } from "@/lib/queue/enqueue";
import { findCalibrationFrames, findCalibrationMismatch } from "@/lib/reductions/calibration-frames";
import { bucketName, buildOriginalKey, putObjectBytes } from "@/lib/storage";
import { requireTestDatabase } from "../support/env";
import { createMember, createSetFor, uploadFile } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(async () => {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

const W = 128;
const H = 96;

async function waitForIngest(frameId: string): Promise<Frame> {
  const deadline = Date.now() + 120_000;
  while (Date.now() < deadline) {
    const [row] = await db.select().from(frames).where(eq(frames.id, frameId));
    if (row && row.ingestState !== "received") return row;
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`ingest of ${frameId} did not end within 120 s`);
}

/** A 16-bit FITS frame from the synthetic sensor: a dark of the given size and planes. */
function makeFits(width: number, height: number, planes: 1 | 3, exposureS: number, seed: number): Uint8Array<ArrayBuffer> {
  const sensor = createSensorModel({ width, height, channels: planes, seed });
  const [frame] = synthesizeDarkFrames(sensor, [exposureS], seed + 1);
  const fits = encodeFits({
    width, height,
    planes: frame.image.planes.map((p) => Uint16Array.from(p)),
    cards: [{ key: "EXPTIME", value: exposureS }, { key: "INSTRUME", value: "Crownlight synthetic" }],
  });
  return new Uint8Array(fits);
}

let owner: Actor;
let setId: string;
const ids: Record<string, string> = {};

beforeAll(async () => {
  owner = await createMember(db, "Tamsin Achterberg");
  setId = await createSetFor(db, owner, "Luxor, with calibration frames");
  const files: [string, Uint8Array<ArrayBuffer>][] = [
    ["light-1.fits", makeFits(W, H, 1, 0.01, 1)],
    ["light-2.fits", makeFits(W, H, 1, 0.04, 2)],
    ["dark-good.fits", makeFits(W, H, 1, 2, 3)],
    ["dark-cropped.fits", makeFits(96, 64, 1, 2, 4)],
    ["dark-colour.fits", makeFits(W, H, 3, 2, 5)],
    ["flat-phone.jpg", new Uint8Array(await sharp({ create: { width: W, height: H, channels: 3, background: "#c0c0c0" } }).jpeg().toBuffer())],
  ];
  for (const [name, bytes] of files) ids[name] = (await uploadFile(db, owner, setId, name, bytes)).id;
  for (const id of Object.values(ids)) {
    const row = await waitForIngest(id);
    expect(row.ingestState, row.refusalReason ?? "").toBe("ingested");
  }
}, 240_000);

async function refusal(name: string, kind: "bias" | "dark" | "flat"): Promise<string> {
  const error = await correctFrame(db, owner, setId, ids[name], { kind }).then(() => undefined, (e: unknown) => e);
  expect(error).toBeInstanceOf(Error);
  const [row] = await db.select({ kind: frames.kind }).from(frames).where(eq(frames.id, ids[name]));
  expect(row.kind).toBe("light"); // nothing changed
  return (error as Error).message;
}

describe("marking a frame as a calibration frame", () => {
  it("records the planes of every frame at ingest", async () => {
    const [row] = await db.select().from(frames).where(eq(frames.id, ids["dark-colour.fits"]));
    expect(row.flags.planeCount).toBe(3);
  });

  it("refuses a frame of another size, naming the file and both sizes", async () => {
    expect(await refusal("dark-cropped.fits", "dark")).toBe(
      "dark-cropped.fits: 96 x 64 pixels, but the light frames of this set are 128 x 96; a dark frame must come from the same camera at the same size, uncropped.",
    );
  });

  it("refuses a frame with other colour planes than the lights", async () => {
    expect(await refusal("dark-colour.fits", "dark")).toMatch(/^dark-colour\.fits: 3 colour planes, but the light frames of this set have one grey plane/);
  });

  it("refuses an 8-bit JPEG as a flat", async () => {
    expect(await refusal("flat-phone.jpg", "flat")).toMatch(/^flat-phone\.jpg: an 8-bit JPEG cannot serve as a flat frame; calibration needs the sensor's own linear data/);
  });

  it("takes a frame that fits, and a reduction then finds it", async () => {
    const dto = await correctFrame(db, owner, setId, ids["dark-good.fits"], { kind: "dark" });
    expect(dto.kind).toBe("dark");
    const calibration = await findCalibrationFrames(db, setId);
    expect(calibration.map((c) => [c.originalFileName, c.kind])).toEqual([["dark-good.fits", "dark"]]);
    const lights = await db.select().from(frames).where(eq(frames.bracketSetId, setId));
    const chosen = lights.filter((f) => f.originalFileName.startsWith("light-"));
    expect(findCalibrationMismatch(chosen, calibration)).toBeNull();
  });
});

describe("ingest of a frame already marked as a calibration frame", () => {
  it("refuses it with the reason on its row when it does not fit the lights", async () => {
    // A frame marked "bias" before its ingest ran (the photographer was quicker than the worker):
    // the row and its original are put in place by hand, so the order is certain.
    const id = randomUUID();
    const name = "bias-other-camera.fits";
    const bytes = makeFits(64, 48, 1, 0.0001, 9);
    const key = buildOriginalKey(setId, id, name);
    await putObjectBytes({ bucket: bucketName("originals"), key }, Buffer.from(bytes), "application/fits");
    await db.insert(frames).values({ id, bracketSetId: setId, originalKey: key, originalFileName: name, sizeBytes: bytes.length, kind: "bias" });
    await enqueue(db, "frame.ingest", { frameId: id });
    const row = await waitForIngest(id);
    expect(row.ingestState).toBe("refused");
    expect(row.refusalReason).toBe(
      "bias-other-camera.fits: 64 x 48 pixels, but the light frames of this set are 128 x 96; a bias frame must come from the same camera at the same size, uncropped.",
    );
    expect((await findCalibrationFrames(db, setId)).map((c) => c.originalFileName)).not.toContain(name);
  });

  it("names a calibration frame that no longer fits when the lights changed after it was taken", async () => {
    const calibration = await findCalibrationFrames(db, setId);
    const lights = [{ originalFileName: "light-9.fits", format: "fits", width: 256, height: 192, bitDepth: 16, flags: { planeCount: 1 } }];
    expect(findCalibrationMismatch(lights, calibration)).toMatch(/^dark-good\.fits: 128 x 96 pixels, but the light frames of this set are 256 x 192/);
  });
});
