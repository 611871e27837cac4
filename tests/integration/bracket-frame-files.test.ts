// A frame's thumbnail and original through the running app: the owner and
// curators get them (the thumbnail cacheable in the browser only, the original
// as a download under its own name, byte for byte, a refused frame's too);
// another member is told they do not exist.
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { findRolesOfUser } from "@/db/queries/roles";
import { frames, users } from "@/db/schema";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { encodeFits } from "@/lib/media/fits-write";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { requireTestDatabase } from "../support/env";
import { Client } from "../support/http";
import { createSetFor, uploadFile } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(async () => {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

const person = (pick: (roles: string[]) => boolean, skip = 0) => DEMO_PEOPLE.filter((p) => pick(p.roles))[skip];
const OWNER = person((r) => r.join() === "member", 0);
const OTHER = person((r) => r.join() === "member", 1);
const CURATOR = person((r) => r.includes("curator"));

async function actorFor(email: string): Promise<Actor> {
  const [u] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, email));
  return { userId: u.id, email, name: u.name, roles: await findRolesOfUser(db, u.id) };
}

const clients: Record<"owner" | "other" | "curator", Client> = { owner: new Client(), other: new Client(), curator: new Client() };
let setId = "";
let frameId = "";
let refusedId = "";
// A FITS frame with a name that needs care in a Content-Disposition header.
const FILE_NAME = "Kestrel \"ridge\" Cádiz 1.fits";
const fits = new Uint8Array(
  encodeFits({
    width: 64,
    height: 48,
    planes: [new Uint16Array(64 * 48).map((_, i) => 400 + (i % 64) * 40)],
    cards: [
      { key: "EXPTIME", value: 0.002, comment: "seconds" },
      { key: "DATE-OBS", value: "2027-08-02T10:05:01.000" },
    ],
  }),
);
const corrupt = new Uint8Array(Buffer.from("SIMPLE  =                    T / but nothing after it".padEnd(200, " ")));

beforeAll(async () => {
  await clients.owner.signIn(OWNER.email, DEMO_PASSWORD);
  await clients.other.signIn(OTHER.email, DEMO_PASSWORD);
  await clients.curator.signIn(CURATOR.email, DEMO_PASSWORD);
  const owner = await actorFor(OWNER.email);
  setId = await createSetFor(db, owner, "Cadiz harbour wall");
  frameId = (await uploadFile(db, owner, setId, FILE_NAME, fits)).id;
  await uploadFile(db, owner, setId, "broken.fits", corrupt).catch(() => undefined);
  const deadline = Date.now() + 60_000;
  for (;;) {
    const [f] = await db.select({ state: frames.ingestState }).from(frames).where(eq(frames.id, frameId));
    if (f.state !== "received" || Date.now() > deadline) break;
    await new Promise((r) => setTimeout(r, 200));
  }
  const [refused] = await db
    .select({ id: frames.id })
    .from(frames)
    .where(and(eq(frames.bracketSetId, setId), eq(frames.originalFileName, "broken.fits")));
  refusedId = refused.id;
}, 120_000);

const base = () => `/api/bracket-sets/${setId}/frames`;

describe("frame thumbnail", () => {
  it("is served to the owner as a JPEG that no cache keeps", async () => {
    const res = await clients.owner.request(`${base()}/${frameId}/thumbnail`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("image/jpeg");
    // No cache keeps a member's files (a shared computer included).
    expect(res.headers.get("cache-control")).toBe("private, no-store");
    const bytes = new Uint8Array(await res.arrayBuffer());
    // JPEG's start-of-image marker.
    expect([bytes[0], bytes[1]]).toEqual([0xff, 0xd8]);
  });

  it("is served to a curator and hidden from another member", async () => {
    expect((await clients.curator.request(`${base()}/${frameId}/thumbnail`)).status).toBe(200);
    const other = await clients.other.json(`${base()}/${frameId}/thumbnail`);
    expect(other.status).toBe(404);
    expect(JSON.stringify(other.body)).not.toContain(FILE_NAME);
  });

  it("is not found for a refused frame, which has none", async () => {
    const res = await clients.owner.json(`${base()}/${refusedId}/thumbnail`);
    expect(res.status).toBe(404);
    expect((res.body as { error: { message: string } }).error.message).toContain("broken.fits");
  });
});

describe("frame original", () => {
  it("downloads byte for byte under its own name", async () => {
    const res = await clients.owner.request(`${base()}/${frameId}/original`);
    expect(res.status).toBe(200);
    const disposition = res.headers.get("content-disposition") ?? "";
    expect(disposition).toMatch(/^attachment; /);
    // RFC 6266 / RFC 5987: the exact name percent-encoded in UTF-8, an ASCII stand-in beside it.
    expect(disposition).toContain(`filename*=UTF-8''${encodeURIComponent(FILE_NAME)}`);
    expect(disposition).toContain('filename="Kestrel _ridge_ C_diz 1.fits"');
    expect(res.headers.get("content-type")).toBe("application/octet-stream");
    expect(new Uint8Array(await res.arrayBuffer())).toEqual(fits);
  });

  it("gives a refused frame's original back to its owner", async () => {
    const res = await clients.owner.request(`${base()}/${refusedId}/original`);
    expect(res.status).toBe(200);
    expect(new Uint8Array(await res.arrayBuffer())).toEqual(corrupt);
  });

  it("is served to a curator and hidden from another member", async () => {
    expect((await clients.curator.request(`${base()}/${frameId}/original`)).status).toBe(200);
    expect((await clients.other.request(`${base()}/${frameId}/original`)).status).toBe(404);
    expect((await clients.other.request(`${base()}/00000000-0000-4000-8000-000000000000/original`)).status).toBe(404);
  });
});
