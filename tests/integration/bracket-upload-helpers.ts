// Shared by the bracket-set integration tests: people and sites made directly
// in the test database, and a file sent the way the browser sends it (start,
// sign part URLs, PUT each part to S3, complete).
import { randomUUID } from "node:crypto";
import { closeDb, type Db } from "@/db/client";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { insertRole } from "@/db/queries/roles";
import { sites, users } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { completeFrameUpload, createBracketSet, signParts, startFrameUpload, type FrameDto, type UploadDto } from "@/lib/bracket-sets";

export const ECLIPSE_ID = "2027-08-02";

/** Closes what an upload test opened: the producer's queues and Redis, then the database. */
export async function closeUploadTest(): Promise<void> {
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
}

export async function createMember(db: Db, name: string, roles: Actor["roles"] = ["member"]): Promise<Actor> {
  const id = randomUUID();
  const email = `${id}@brackets-test.example`;
  await db.insert(users).values({ id, name, email, emailVerified: true });
  for (const role of roles) await insertRole(db, id, role, null);
  return { userId: id, email, name, roles };
}

export async function createSite(db: Db, ownerId: string): Promise<string> {
  const [site] = await db.insert(sites).values({ ownerId, name: "Luxor west bank", kind: "fixed", latDeg: 25.69, lonDeg: 32.64 }).returning({ id: sites.id });
  return site.id;
}

export async function createSetFor(db: Db, actor: Actor, name = "Luxor bracket"): Promise<string> {
  const siteId = await createSite(db, actor.userId);
  const set = await createBracketSet(db, actor, { name, eclipseId: ECLIPSE_ID, siteId, kitId: null, notes: "", clockOffsetS: 0 });
  return set.id;
}

/** PUTs the given parts of `bytes` to presigned URLs, as the browser does. */
export async function putParts(db: Db, actor: Actor, setId: string, upload: UploadDto, bytes: Uint8Array<ArrayBuffer>, partNumbers: number[]): Promise<void> {
  const signed = await signParts(db, actor, setId, upload.id, partNumbers);
  for (const { partNumber, url } of signed.urls) {
    const start = (partNumber - 1) * upload.partSizeBytes;
    const body = bytes.subarray(start, Math.min(start + upload.partSizeBytes, bytes.length));
    const res = await fetch(url, { method: "PUT", body });
    if (res.status !== 200) throw new Error(`PUT part ${partNumber} answered ${res.status}: ${await res.text()}`);
  }
}

export async function uploadFile(db: Db, actor: Actor, setId: string, fileName: string, bytes: Uint8Array<ArrayBuffer>): Promise<FrameDto> {
  const upload = await startFrameUpload(db, actor, setId, { fileName, sizeBytes: bytes.length });
  await putParts(db, actor, setId, upload, bytes, Array.from({ length: upload.partCount }, (_, i) => i + 1));
  return completeFrameUpload(db, actor, setId, upload.id);
}
