// The scale benchmark's brackets in the app: a bench member of its own ("Scale
// benchmark", an address under .example) with one fixed site and one bracket set
// per bracket ("Benchmark: 81 frames"), in the development database. Frames go
// up through the browser's path (startFrameUpload, presigned part PUTs,
// completeFrameUpload, which queues the ingest), are ingested by worker processes
// the bench starts with its own queue prefix, and get their exposures from the
// bench's known list as a photographer's CSV would give them (giveFrameTimes).
//
// Reused on the next run: the member, site and sets are found by name, and a set
// whose frames are all ingested is not sent again. A set that is not complete
// (a run cut short, a frame refused) is deleted with its originals and sent anew.
import { readFile } from "node:fs/promises";
import { basename } from "node:path";
import { and, eq, inArray, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { findRolesOfUser, insertRole } from "@/db/queries/roles";
import { bracketSets, frames, jobRuns, sites, users } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { completeFrameUpload, createBracketSet, giveFrameTimes, signParts, startFrameUpload } from "@/lib/bracket-sets";
import { createSite } from "@/lib/sites/sites";
import { bucketName, buildDerivedPrefix, deleteObjectsUnder } from "@/lib/storage";
import { DEFAULT_SCALE_SIZE, type ScaleBracket } from "./scale-bracket";

const BENCH_EMAIL = "scale-benchmark@crownlight-bench.example";
const BENCH_NAME = "Scale benchmark";
const BENCH_SITE = "Benchmark site (Luxor, west bank)";
const ECLIPSE_ID = "2027-08-02";
/** Every bench frame is ingested well within this, even with the machine busy. */
const INGEST_TIMEOUT_MS = 20 * 60_000;

/** "Benchmark: 81 frames", with the size when it is not the default one. */
export function benchSetName(bracket: Pick<ScaleBracket, "frames" | "size">): string {
  const { width, height } = bracket.size;
  const sized = width === DEFAULT_SCALE_SIZE.width && height === DEFAULT_SCALE_SIZE.height ? "" : ` of ${width} x ${height}`;
  return `Benchmark: ${bracket.frames} frames${sized}`;
}

export interface BenchSet {
  frames: number;
  setId: string;
}

async function ensureMember(db: Db): Promise<Actor> {
  let [user] = await db.select({ id: users.id }).from(users).where(eq(users.email, BENCH_EMAIL)).limit(1);
  if (!user) [user] = await db.insert(users).values({ id: crypto.randomUUID(), name: BENCH_NAME, email: BENCH_EMAIL, emailVerified: true }).returning({ id: users.id });
  await insertRole(db, user.id, "member", null);
  return { userId: user.id, email: BENCH_EMAIL, name: BENCH_NAME, roles: await findRolesOfUser(db, user.id) };
}

async function ensureSite(db: Db, actor: Actor): Promise<string> {
  const [found] = await db.select({ id: sites.id }).from(sites).where(and(eq(sites.ownerId, actor.userId), eq(sites.name, BENCH_SITE))).limit(1);
  if (found) return found.id;
  const site = await createSite(db, actor, { kind: "fixed", name: BENCH_SITE, publicLabel: "Luxor", latDeg: 25.69, lonDeg: 32.64, elevationM: 80, precision: "hidden" });
  return site.id;
}

/** The bench's set of this bracket when every one of its frames is there and ingested; otherwise null (an incomplete set is deleted). */
async function findCompleteSet(db: Db, actor: Actor, bracket: ScaleBracket): Promise<string | null> {
  const [set] = await db.select({ id: bracketSets.id }).from(bracketSets).where(and(eq(bracketSets.ownerId, actor.userId), eq(bracketSets.name, benchSetName(bracket)))).limit(1);
  if (!set) return null;
  const rows = await db.select({ name: frames.originalFileName, state: frames.ingestState, exposureS: frames.exposureS }).from(frames).where(eq(frames.bracketSetId, set.id));
  const wanted = new Map(bracket.files.map((f, k) => [basename(f), bracket.exposuresS[k]]));
  const complete = rows.length === wanted.size && rows.every((r) => r.state === "ingested" && r.exposureS === wanted.get(r.name));
  if (complete) return set.id;
  await deleteBenchSet(db, actor, set.id);
  return null;
}

/** A bench set with its originals, thumbnails and reduction outputs (the rows go by cascade). */
async function deleteBenchSet(db: Db, actor: Actor, setId: string): Promise<void> {
  // Originals live under originals/{set id}/ (buildOriginalKey), everything derived under buildDerivedPrefix.
  await deleteObjectsUnder({ bucket: bucketName("originals"), prefix: `originals/${setId}/` });
  await deleteObjectsUnder({ bucket: bucketName("derived"), prefix: buildDerivedPrefix(setId) });
  const ids = (await db.select({ id: frames.id }).from(frames).where(eq(frames.bracketSetId, setId))).map((f) => f.id);
  if (ids.length > 0) await db.delete(jobRuns).where(inArray(sql`${jobRuns.payload}->>'frameId'`, ids));
  await db.delete(bracketSets).where(and(eq(bracketSets.id, setId), eq(bracketSets.ownerId, actor.userId)));
}

/** Sends one file the way the browser does: start, sign every part, PUT each with fetch, complete. */
async function uploadFrame(db: Db, actor: Actor, setId: string, file: string): Promise<void> {
  const bytes = new Uint8Array(await readFile(file));
  const fileName = basename(file);
  const upload = await startFrameUpload(db, actor, setId, { fileName, sizeBytes: bytes.length, contentType: "image/tiff" });
  const signed = await signParts(db, actor, setId, upload.id, Array.from({ length: upload.partCount }, (_, i) => i + 1));
  for (const { partNumber, url } of signed.urls) {
    const start = (partNumber - 1) * upload.partSizeBytes;
    const res = await fetch(url, { method: "PUT", body: bytes.subarray(start, Math.min(start + upload.partSizeBytes, bytes.length)) });
    if (!res.ok) throw new Error(`${fileName}: S3 answered ${res.status} to part ${partNumber}: ${(await res.text()).slice(0, 200)}`);
  }
  await completeFrameUpload(db, actor, setId, upload.id);
}

async function waitForIngest(db: Db, setIds: string[], log: (line: string) => void): Promise<void> {
  const deadline = Date.now() + INGEST_TIMEOUT_MS;
  let lastLine = "";
  for (;;) {
    const rows = await db.select({ name: frames.originalFileName, state: frames.ingestState, reason: frames.refusalReason }).from(frames).where(inArray(frames.bracketSetId, setIds));
    const refused = rows.filter((r) => r.state === "refused");
    if (refused.length > 0) throw new Error(`ingest refused ${refused.length} bench frame(s): ${refused.slice(0, 3).map((r) => `${r.name}: ${r.reason}`).join("; ")}`);
    const waiting = rows.filter((r) => r.state === "received").length;
    const line = `ingest: ${rows.length - waiting} of ${rows.length} bench frames read`;
    if (line !== lastLine) log(line);
    lastLine = line;
    if (waiting === 0) return;
    if (Date.now() > deadline) throw new Error(`${waiting} bench frame(s) still waited for ingest after ${INGEST_TIMEOUT_MS / 60_000} min`);
    await new Promise((r) => setTimeout(r, 2000));
  }
}

/**
 * The bench's sets, one per bracket, ready to reduce. `withWorkers` runs the given
 * work with worker processes listening on the bench's queue prefix (they ingest).
 */
export async function prepareBenchSets(db: Db, brackets: readonly ScaleBracket[], withWorkers: <T>(work: () => Promise<T>) => Promise<T>, log: (line: string) => void): Promise<{ actor: Actor; sets: BenchSet[] }> {
  const actor = await ensureMember(db);
  const siteId = await ensureSite(db, actor);
  const sets: BenchSet[] = [];
  const toSend: { bracket: ScaleBracket; setId: string }[] = [];
  for (const bracket of brackets) {
    const found = await findCompleteSet(db, actor, bracket);
    if (found) {
      log(`${benchSetName(bracket)}: reused (every frame ingested)`);
      sets.push({ frames: bracket.frames, setId: found });
      continue;
    }
    const set = await createBracketSet(db, actor, { name: benchSetName(bracket), eclipseId: ECLIPSE_ID, siteId, kitId: null, notes: "Made by npm run bench -- scale; removed or reused by its next run.", clockOffsetS: 0 });
    sets.push({ frames: bracket.frames, setId: set.id });
    toSend.push({ bracket, setId: set.id });
  }
  if (toSend.length === 0) return { actor, sets };
  await withWorkers(async () => {
    for (const { bracket, setId } of toSend) {
      log(`${benchSetName(bracket)}: uploading ${bracket.files.length} frames through presigned multipart uploads`);
      for (const file of bracket.files) await uploadFrame(db, actor, setId, file);
    }
    await waitForIngest(db, toSend.map((s) => s.setId), log);
  });
  for (const { bracket, setId } of toSend) {
    // The exposures as a photographer's CSV gives them; the single-process run takes the same list.
    const text = ["file,exposure_s", ...bracket.files.map((f, k) => `${basename(f)},${bracket.exposuresS[k]}`)].join("\n");
    await giveFrameTimes(db, actor, setId, { method: "csv", fileName: "bench-exposures.csv", text });
  }
  return { actor, sets };
}
