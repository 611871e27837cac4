// GET /api/reductions/[id]/files/[...path] through the running app: the owner
// gets the stored bytes with the right type and a long private cache, a download
// name on ?download=1; a curator sees it too; another member and a visitor do
// not; paths outside the outputs are refused before any lookup.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { reductions, users } from "@/db/schema";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { bucketName, putObjectBytes, buildReductionPrefix } from "@/lib/storage";
import { Client } from "../support/http";
import { requireTestDatabase } from "../support/env";
import { createSetFor } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(closeDb);

const person = (pick: (roles: string[]) => boolean) => DEMO_PEOPLE.find((p) => pick(p.roles))!;
const OWNER = person((r) => r.join() === "member");
const CURATOR = person((r) => r.includes("curator"));
const OTHER = person((r) => r.includes("editor"));

const clients = { owner: new Client(), curator: new Client(), other: new Client(), visitor: new Client() };
let doneId = "";
let queuedId = "";
let png: Buffer;
const report = { reportVersion: 1, pipelineVersion: "test", frames: [], overall: {}, timingsMs: {}, outputs: {}, notes: [] };
const files = (id: string, path: string) => `/api/reductions/${id}/files/${path}`;

beforeAll(async () => {
  await clients.owner.signIn(OWNER.email, DEMO_PASSWORD);
  await clients.curator.signIn(CURATOR.email, DEMO_PASSWORD);
  await clients.other.signIn(OTHER.email, DEMO_PASSWORD);
  const [user] = await db.select({ id: users.id }).from(users).where(eq(users.email, OWNER.email));
  const owner: Actor = { userId: user.id, email: OWNER.email, name: OWNER.name, roles: ["member"] };
  const setId = await createSetFor(db, owner, "Cádiz: short lens");

  doneId = randomUUID();
  const prefix = buildReductionPrefix(setId, doneId);
  png = await sharp({ create: { width: 6, height: 4, channels: 3, background: "#304050" } }).png().toBuffer();
  const derived = bucketName("derived");
  await putObjectBytes({ bucket: derived, key: `${prefix}natural.png` }, png, "image/png");
  await putObjectBytes({ bucket: derived, key: `${prefix}report.json` }, Buffer.from(JSON.stringify(report)), "application/json");
  await putObjectBytes({ bucket: derived, key: `${prefix}tiles/natural.dzi` }, Buffer.from("<Image/>"), "application/xml");
  const params = { registration: "sun", filter: "mgn", recoverResponse: false } as const;
  await db.insert(reductions).values({ id: doneId, bracketSetId: setId, requestedBy: owner.userId, params, state: "done", progress: 1, outputs: { prefix, report: `${prefix}report.json` } });
  const [queued] = await db.insert(reductions).values({ bracketSetId: setId, requestedBy: owner.userId, params }).returning({ id: reductions.id });
  queuedId = queued.id;
});

describe("a reduction's files", () => {
  it("gives the owner the stored bytes with their type and a year-long private cache", async () => {
    const res = await clients.owner.request(files(doneId, "natural.png"));
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("image/png");
    expect(res.headers.get("cache-control")).toBe("private, no-store");
    expect(res.headers.get("content-disposition")).toBeNull();
    expect(Buffer.from(await res.arrayBuffer()).equals(png)).toBe(true);

    const json = await clients.owner.request(files(doneId, "report.json"));
    expect(json.headers.get("content-type")).toBe("application/json");
    expect(await json.json()).toEqual(report);
    const dzi = await clients.owner.request(files(doneId, "tiles/natural.dzi"));
    expect([dzi.status, dzi.headers.get("content-type")]).toEqual([200, "application/xml"]);
  });

  it("names a download after the set, the reduction and the file", async () => {
    const res = await clients.owner.request(`${files(doneId, "natural.png")}?download=1`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-disposition")).toBe(`attachment; filename="cadiz-short-lens-${doneId.slice(0, 8)}-natural.png"`);
  });

  it("serves a curator, and hides the reduction from another member exactly like a missing one", async () => {
    expect((await clients.curator.request(files(doneId, "natural.png"))).status).toBe(200);
    const other = await clients.other.json(files(doneId, "natural.png"));
    const missing = await clients.other.json(files(randomUUID(), "natural.png"));
    expect(other.status).toBe(404);
    expect(other.body).toEqual(missing.body);
    expect((await clients.visitor.request(files(doneId, "natural.png"))).status).toBe(401);
  });

  it("refuses paths that are not outputs, naming the path", async () => {
    for (const path of ["%2E%2E%2F%2E%2E%2Foriginals%2Fx.fits", "tiles%2F..%2Freport.json", "secrets.txt", "master.fits.bak", "tiles/natural_files/..%2F..%2Freport.json"]) {
      const res = await clients.owner.json(files(doneId, path));
      expect(res.status, path).toBe(400);
      expect((res.body as { error: { message: string } }).error.message).toMatch(/is not one of a reduction's files/);
    }
  });

  it("answers 404 for an output not stored and for a reduction that is not done", async () => {
    const tile = await clients.owner.json(files(doneId, "tiles/natural_files/0/0_0.jpg"));
    expect(tile.status).toBe(404);
    expect((tile.body as { error: { message: string } }).error.message).toMatch(/tiles\/natural_files\/0\/0_0.jpg/);
    const queued = await clients.owner.json(files(queuedId, "natural.png"));
    expect(queued.status).toBe(404);
    expect((queued.body as { error: { message: string } }).error.message).toMatch(/it is queued/);
  });
});
