// A bracket from upload to reduction through the real services: synthetic FITS
// frames (our own generator) go up through presigned multipart uploads, the
// worker ingests them, a reduction is started, and the worker reduces them and
// stores every output under the reduction's prefix, with state and progress in
// PostgreSQL. A second reduction of the same set keeps the first.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { bracketSets, frames, kits, reductions } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { encodeFits } from "@/lib/media/fits-write";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { findReduction, listReductions, startReduction } from "@/lib/reductions/reductions";
import { bucketName, findObjectSize } from "@/lib/storage";
import { requireTestDatabase } from "../support/env";
import { createMember, createSetFor, uploadFile } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(async () => {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

let owner: Actor;
let setId: string;

async function waitFor<T>(what: string, read: () => Promise<T | undefined>, timeoutMs = 90_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const v = await read();
    if (v !== undefined) return v;
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`${what} did not happen within ${timeoutMs} ms`);
}

beforeAll(async () => {
  owner = await createMember(db, "Rhea Reducer");
  setId = await createSetFor(db, owner, "Luxor, long lens");
  // An equatorial kit squared to north: the reduction takes the north angle from the mount.
  const [kit] = await db
    .insert(kits)
    .values({ ownerId: owner.userId, name: "Refractor", camera: "Mono camera", sensorWidthMm: 10, sensorHeightMm: 8, pixelPitchUm: 5, focalMm: 600, fNumber: 7, mount: "equatorial" })
    .returning({ id: kits.id });
  await db.update(bracketSets).set({ kitId: kit.id }).where(eq(bracketSets.id, setId));

  // Mid-totality at Luxor (10:05 UTC), frames 2 s apart.
  const { frames: synth } = synthesizeBracket({
    width: 256,
    height: 224,
    channels: 1,
    exposuresS: [1 / 500, 1 / 125, 1 / 30, 1 / 8],
    sunRadiusPx: 40,
    seed: 11,
    whiteLevel: 16383,
    captureStartMs: Date.UTC(2027, 7, 2, 10, 4, 30),
    frameIntervalS: 2,
  });
  for (const f of synth) {
    const plane = Uint16Array.from(f.planes[0]);
    const fits = encodeFits({
      width: 256,
      height: 224,
      planes: [plane],
      cards: [
        { key: "EXPTIME", value: f.exposureS, comment: "seconds" },
        { key: "DATE-OBS", value: new Date(f.captureTimeMs).toISOString().replace("Z", "") },
        { key: "SATURATE", value: 16383 },
        { key: "INSTRUME", value: "Crownlight synthetic" },
      ],
    });
    const sent = await uploadFile(db, owner, setId, f.name, new Uint8Array(fits));
    await waitFor(`ingest of ${f.name}`, async () => {
      const [row] = await db.select().from(frames).where(eq(frames.id, sent.id));
      return row.ingestState === "received" ? undefined : row;
    });
  }
}, 180_000);

describe("a reduction run by the worker", () => {
  it("refuses a visitor and a stranger, and says when too few frames are usable", async () => {
    const stranger = await createMember(db, "Sid Stranger");
    await expect(startReduction(db, null, setId, { registration: "corona", filter: "mgn", recoverResponse: false })).rejects.toMatchObject({ code: "unauthenticated" });
    await expect(startReduction(db, stranger, setId, { registration: "corona", filter: "mgn", recoverResponse: false })).rejects.toMatchObject({ code: "not_found" });
    const empty = await createSetFor(db, owner, "Empty set");
    await expect(startReduction(db, owner, empty, { registration: "corona", filter: "mgn", recoverResponse: false })).rejects.toThrow(/has 0 usable light frames; a reduction needs at least 2/);
  });

  it("reduces the set on the Sun, mirrors state and progress, and stores every output", async () => {
    const started = await startReduction(db, owner, setId, { registration: "sun", filter: "mgn", recoverResponse: false });
    expect(started.state).toBe("queued");
    const done = await waitFor("the reduction", async () => {
      const r = await findReduction(db, owner, started.id);
      if (r.state === "failed") throw new Error(`the reduction failed: ${r.error}`);
      return r.state === "done" ? r : undefined;
    }, 150_000);
    expect(done.progress).toBe(1);
    expect(done.pipelineVersion).toMatch(/crownlight-imaging/);
    const sky = (done.measurements as { sky?: { northAngleDeg?: number; plateScaleArcsecPerPx?: number } }).sky;
    // The equatorial mount squared to north gives north at image up (lib/astro).
    expect(sky?.northAngleDeg).toBeCloseTo(0, 6);
    expect(sky?.plateScaleArcsecPerPx).toBeGreaterThan(0);

    const [row] = await db.select().from(reductions).where(eq(reductions.id, started.id));
    for (const role of ["master", "natural", "structure", "preview", "report"]) {
      const size = await findObjectSize({ bucket: bucketName("derived"), key: row.outputs![role] });
      expect(size, role).toBeGreaterThan(0);
    }
    for (const key of ["natural.dzi", "structure.dzi", "natural-iiif/info.json", "structure-iiif/info.json"]) {
      expect(await findObjectSize({ bucket: bucketName("derived"), key: row.outputs!.tiles + key }), key).toBeGreaterThan(0);
    }
  }, 200_000);

  it("keeps every reduction of a set: a second one gets its own id and prefix", async () => {
    const second = await startReduction(db, owner, setId, { registration: "corona", filter: "nrgf", recoverResponse: false });
    await waitFor("the second reduction", async () => {
      const r = await findReduction(db, owner, second.id);
      if (r.state === "failed") throw new Error(`the reduction failed: ${r.error}`);
      return r.state === "done" ? r : undefined;
    }, 150_000);
    const list = await listReductions(db, owner, setId);
    expect(list.length).toBeGreaterThanOrEqual(2);
    const prefixes = await db.select({ outputs: reductions.outputs }).from(reductions).where(eq(reductions.bracketSetId, setId));
    const distinct = new Set(prefixes.map((p) => p.outputs?.prefix));
    expect(distinct.size).toBe(prefixes.length);
  }, 200_000);
});
