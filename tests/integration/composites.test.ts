// Composites through the real services: finished reductions whose masters (our
// synthetic corona through two kits) sit in the S3 fake are chosen, the worker
// composes them and stores every output under the composite's prefix, with state
// and progress in PostgreSQL. Who may compose what, and who may see the result,
// is checked on the server.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { composites, reductions } from "@/db/schema";
import { makeComposableReduction, TEST_KITS } from "../support/composite-fixtures";
import type { Actor } from "@/lib/auth/actor";
import { findComposite, listComposableReductions, listComposites, startComposite } from "@/lib/composites/composites";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { bucketName, buildCompositePrefix, findObjectSize, readSmallObject } from "@/lib/storage";
import { requireTestDatabase } from "../support/env";
import { waitFor } from "../support/wait";
import { createMember, createSetFor } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(async () => {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

const finishedReduction = (setId: string, kit: (typeof TEST_KITS)[number] | null) => makeComposableReduction(db, setId, kit);
const KITS = TEST_KITS;

let owner: Actor, other: Actor, curator: Actor;
let longId: string, shortId: string, othersId: string, noSkyId: string, runningId: string;

beforeAll(async () => {
  owner = await createMember(db, "Ines Okonkwo-Lund");
  other = await createMember(db, "Pavel Strand");
  curator = await createMember(db, "Curator of composites", ["member", "curator"]);
  longId = await finishedReduction(await createSetFor(db, owner, "Long lens, Luxor"), KITS[0]);
  shortId = await finishedReduction(await createSetFor(db, owner, "Short lens, Luxor"), KITS[1]);
  othersId = await finishedReduction(await createSetFor(db, other, "Pavel's short lens"), KITS[1]);
  noSkyId = await finishedReduction(await createSetFor(db, owner, "Registered on the Moon"), null);
  const [running] = await db.insert(reductions).values({ bracketSetId: await createSetFor(db, owner, "Still running"), params: { registration: "sun", filter: "mgn", recoverResponse: false }, state: "running" }).returning();
  runningId = running.id;
}, 60_000);

describe("composites", () => {
  it("offers a member their own finished reductions with sky coordinates, a curator everyone's", async () => {
    const mine = (await listComposableReductions(db, owner)).map((r) => r.reductionId);
    expect(mine).toEqual(expect.arrayContaining([longId, shortId]));
    expect(mine).not.toContain(othersId);
    expect(mine).not.toContain(noSkyId);
    expect(mine).not.toContain(runningId);
    const all = await listComposableReductions(db, curator);
    expect(all.map((r) => r.reductionId)).toEqual(expect.arrayContaining([longId, shortId, othersId]));
    const long = all.find((r) => r.reductionId === longId)!;
    // 280 x 210 px at 16 arcsec/px about the centre: 105 px to the nearest edge, 175 to the corners, over 60 px of solar radius.
    expect(long.plateScaleArcsecPerPx).toBe(16);
    expect(long.fieldR.inner).toBeCloseTo(105 / 60, 1);
    expect(long.fieldR.outer).toBeCloseTo(Math.hypot(140, 105) / 60, 1);
    await expect(listComposableReductions(db, null)).rejects.toMatchObject({ code: "unauthenticated" });
  });

  it("refuses what cannot be composed, saying why", async () => {
    await expect(startComposite(db, owner, { title: "Mine and his", reductionIds: [longId, othersId] })).rejects.toMatchObject({ code: "not_found" });
    await expect(startComposite(db, owner, { title: "Twice", reductionIds: [longId, longId] })).rejects.toThrow(/chosen twice/);
    await expect(startComposite(db, owner, { title: "No sky", reductionIds: [longId, noSkyId] })).rejects.toThrow(/registered on the Sun, with its site and the frames' capture times/);
    await expect(startComposite(db, owner, { title: "Not yet", reductionIds: [longId, runningId] })).rejects.toThrow(/has not finished/);
    await expect(startComposite(db, owner, { title: "One", reductionIds: [longId] })).rejects.toMatchObject({ code: "invalid_input" });
  });

  it("composes a member's two kits in the worker and stores the outputs; only those concerned see it", async () => {
    const started = await startComposite(db, owner, { title: "Luxor, both lenses", reductionIds: [shortId, longId] });
    // A worker may take the job before the answer is read.
    expect(["queued", "running"]).toContain(started.state);
    expect(started.inputs.map((i) => i.setName)).toEqual(["Short lens, Luxor", "Long lens, Luxor"]);
    const done = await waitFor("the composite", async () => {
      const c = await findComposite(db, owner, started.id);
      if (c.state === "failed") throw new Error(`the composite failed: ${c.error}`);
      return c.state === "done" ? c : undefined;
    }, 120_000);
    const prefix = buildCompositePrefix(started.id);
    for (const file of ["master.fits", "natural.png", "structure.png", "contribution.jpg", "report.json", "tiles/natural.dzi"]) {
      expect(await findObjectSize({ bucket: bucketName("derived"), key: prefix + file }), file).toBeGreaterThan(0);
    }
    const report = JSON.parse((await readSmallObject({ bucket: bucketName("derived"), key: `${prefix}report.json` })).toString("utf8"));
    // The long lens is the reference wherever it was listed; the short one's camera had 0.6 of its gain.
    expect(report.inputs[1].isReference).toBe(true);
    expect(Math.abs(report.inputs[0].factors[0] * 0.6 - 1)).toBeLessThan(0.03);
    expect(done.measurements).toMatchObject({ kind: "composite" });
    expect(done.composedBy).toBe(owner.name);
    // The composer and a curator see it; another member does not learn it exists.
    await expect(findComposite(db, curator, started.id)).resolves.toMatchObject({ id: started.id });
    await expect(findComposite(db, other, started.id)).rejects.toMatchObject({ code: "not_found" });
    expect((await listComposites(db, owner)).map((c) => c.id)).toContain(started.id);
    expect((await listComposites(db, other)).map((c) => c.id)).not.toContain(started.id);
  }, 180_000);

  it("lets a curator compose two observers' reductions; each photographer sees the result", async () => {
    const started = await startComposite(db, curator, { title: "Two observers", reductionIds: [longId, othersId] });
    await expect(findComposite(db, other, started.id)).resolves.toMatchObject({ id: started.id });
    await expect(findComposite(db, owner, started.id)).resolves.toMatchObject({ id: started.id });
    const [row] = await db.select({ composedBy: composites.composedBy }).from(composites).where(eq(composites.id, started.id));
    expect(row.composedBy).toBe(curator.userId);
  });
});
