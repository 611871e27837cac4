// The demo brackets: for each party of the scenario a site, a kit and a bracket
// set, whose synthetic frames go up through the same code the browser uses
// (startFrameUpload, presigned part PUTs, completeFrameUpload, which queues the
// ingest). Once the worker has ingested them, one reduction per set is started;
// the seed does not wait for it (the app shows its progress).
//
// Idempotent: sites, kits and sets are found by owner and name, a frame already
// stored under its file name is not sent again, and a set that has a reduction
// gets no second one. A run cut short resumes where it stopped.
import { and, eq, inArray } from "drizzle-orm";
import type { Db } from "../client";
import { findRolesOfUser } from "../queries/roles";
import { bracketSets, frames, kits, reductions, sites, uploads, users } from "../schema";
import type { Actor } from "@/lib/auth/actor";
import { abortFrameUpload, completeFrameUpload, createBracketSet, signParts, startFrameUpload } from "@/lib/bracket-sets";
import { createKit } from "@/lib/kits/kits";
import { enqueue } from "@/lib/queue/enqueue";
import { startReduction } from "@/lib/reductions/reductions";
import { createSite } from "@/lib/sites/sites";
import { createDemoBracket } from "./demo-geometry";
import { seedDemoComposite } from "./demo-composite";
import { DEMO_CORONA_SEED, DEMO_ECLIPSE_ID, DEMO_EXPOSURES_S, DEMO_PARTIES, toDemoPlace, type DemoParty } from "./demo-scenario";

export type SeedLog = (line: string) => void;

interface PreparedSet {
  party: DemoParty;
  actor: Actor;
  setId: string;
}

/** Generous: five small frames ingest in seconds, but the worker may still be busy with other work. */
const INGEST_TIMEOUT_MS = 5 * 60_000;

async function findActor(db: Db, email: string): Promise<Actor> {
  const [user] = await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.email, email)).limit(1);
  if (!user) throw new Error(`demo brackets: the demo member ${email} is missing; the people seed must run first`);
  return { userId: user.id, email: user.email, name: user.name, roles: await findRolesOfUser(db, user.id) };
}

async function ensureSite(db: Db, actor: Actor, party: DemoParty): Promise<{ id: string; track: NonNullable<typeof sites.$inferSelect.track> | null }> {
  const [found] = await db.select({ id: sites.id, track: sites.track, publicLabel: sites.publicLabel }).from(sites).where(and(eq(sites.ownerId, actor.userId), eq(sites.name, party.site.name))).limit(1);
  if (found) {
    // A site seeded before sites had public labels gets the demo's label once.
    if (!found.publicLabel) await db.update(sites).set({ publicLabel: party.site.publicLabel }).where(and(eq(sites.id, found.id), eq(sites.ownerId, actor.userId)));
    return { id: found.id, track: found.track };
  }
  const created = await createSite(db, actor, party.site);
  const [row] = await db.select({ id: sites.id, track: sites.track }).from(sites).where(eq(sites.id, created.id)).limit(1);
  return row;
}

async function ensureKit(db: Db, actor: Actor, party: DemoParty): Promise<string> {
  const [found] = await db.select({ id: kits.id }).from(kits).where(and(eq(kits.ownerId, actor.userId), eq(kits.name, party.kit.name))).limit(1);
  return found?.id ?? (await createKit(db, actor, party.kit)).id;
}

async function ensureSet(db: Db, actor: Actor, party: DemoParty, siteId: string, kitId: string): Promise<string> {
  const [found] = await db
    .select({ id: bracketSets.id })
    .from(bracketSets)
    .where(and(eq(bracketSets.ownerId, actor.userId), eq(bracketSets.name, party.setName), eq(bracketSets.eclipseId, DEMO_ECLIPSE_ID)))
    .limit(1);
  if (found) return found.id;
  const set = await createBracketSet(db, actor, { name: party.setName, eclipseId: DEMO_ECLIPSE_ID, siteId, kitId, notes: party.setNotes, clockOffsetS: 0 });
  return set.id;
}

/** Sends one file the way the browser does: start, sign every part, PUT each with fetch, complete. */
async function uploadFrame(db: Db, actor: Actor, setId: string, fileName: string, bytes: Uint8Array<ArrayBuffer>): Promise<void> {
  const upload = await startFrameUpload(db, actor, setId, { fileName, sizeBytes: bytes.length, contentType: "application/fits" });
  const partNumbers = Array.from({ length: upload.partCount }, (_, i) => i + 1);
  const signed = await signParts(db, actor, setId, upload.id, partNumbers);
  for (const { partNumber, url } of signed.urls) {
    const start = (partNumber - 1) * upload.partSizeBytes;
    const res = await fetch(url, { method: "PUT", body: bytes.subarray(start, Math.min(start + upload.partSizeBytes, bytes.length)) });
    if (!res.ok) throw new Error(`demo brackets: ${fileName}: S3 answered ${res.status} to part ${partNumber}: ${(await res.text()).slice(0, 200)}`);
  }
  await completeFrameUpload(db, actor, setId, upload.id);
}

/** Frames of the set that are stored (by file name), after closing uploads an earlier run left open. */
async function findStoredNames(db: Db, actor: Actor, setId: string): Promise<Set<string>> {
  const open = await db.select({ id: uploads.id }).from(uploads).where(and(eq(uploads.bracketSetId, setId), eq(uploads.state, "open")));
  for (const u of open) await abortFrameUpload(db, actor, setId, u.id);
  const rows = await db.select({ id: frames.id, name: frames.originalFileName, state: frames.ingestState }).from(frames).where(eq(frames.bracketSetId, setId));
  // A run stopped between storing a frame and queueing its ingest: queue it now (the job id is deterministic, so never twice).
  for (const r of rows) if (r.state === "received") await enqueue(db, "frame.ingest", { frameId: r.id });
  return new Set(rows.map((r) => r.name));
}

async function prepareParty(db: Db, party: DemoParty, log: SeedLog): Promise<PreparedSet> {
  const actor = await findActor(db, party.email);
  const site = await ensureSite(db, actor, party);
  const kitId = await ensureKit(db, actor, party);
  const setId = await ensureSet(db, actor, party, site.id, kitId);
  const stored = await findStoredNames(db, actor, setId);
  const names = DEMO_EXPOSURES_S.map((_, i) => `${party.filePrefix}-${String(i + 1).padStart(2, "0")}.fits`);
  if (names.every((n) => stored.has(n))) {
    log(`${party.setName}: ${names.length} frames already stored`);
    return { party, actor, setId };
  }
  const started = Date.now();
  const bracket = createDemoBracket({
    place: toDemoPlace(party.site, site.track),
    nearUtcMs: Date.UTC(2027, 7, 2, 9, 30),
    pixelPitchUm: party.kit.pixelPitchUm,
    focalMm: party.kit.focalMm,
    mount: party.kit.mount,
    width: party.width,
    height: party.height,
    channels: party.channels,
    exposuresS: DEMO_EXPOSURES_S,
    frameIntervalS: party.frameIntervalS,
    seed: party.seed,
    sceneSeed: DEMO_CORONA_SEED,
    filePrefix: party.filePrefix,
  });
  const totalityS = (bracket.thirdContactMs - bracket.secondContactMs) / 1000;
  log(
    `${party.setName}: rendered ${bracket.frames.length} frames in ${((Date.now() - started) / 1000).toFixed(1)} s ` +
      `(totality ${new Date(bracket.secondContactMs).toISOString().slice(11, 19)} to ${new Date(bracket.thirdContactMs).toISOString().slice(11, 19)} UTC, ${Math.floor(totalityS / 60)} min ${Math.round(totalityS % 60)} s; ` +
      `${bracket.plateScaleArcsecPerPx.toFixed(2)} arcsec/px)`,
  );
  let sent = 0;
  for (const frame of bracket.frames) {
    if (stored.has(frame.fileName)) continue;
    await uploadFrame(db, actor, setId, frame.fileName, frame.bytes);
    sent++;
  }
  log(`${party.setName}: uploaded ${sent} frame(s) through presigned multipart uploads; ingest queued`);
  return { party, actor, setId };
}

/** Waits until no frame of the sets is still waiting for ingest, printing progress as it goes. */
async function waitForIngest(db: Db, prepared: PreparedSet[], log: SeedLog): Promise<void> {
  const setIds = prepared.map((p) => p.setId);
  const deadline = Date.now() + INGEST_TIMEOUT_MS;
  let lastLine = "";
  let lastAt = 0;
  for (;;) {
    const rows = await db.select({ state: frames.ingestState }).from(frames).where(inArray(frames.bracketSetId, setIds));
    const waiting = rows.filter((r) => r.state === "received").length;
    const line = `ingest: ${rows.length - waiting} of ${rows.length} frames read by the worker`;
    if (line !== lastLine || Date.now() - lastAt > 10_000) {
      log(line);
      lastLine = line;
      lastAt = Date.now();
    }
    if (waiting === 0) return;
    if (Date.now() > deadline) {
      throw new Error(`demo brackets: ${waiting} frame(s) were still waiting for ingest after ${INGEST_TIMEOUT_MS / 60_000} min; is the worker running? See .data/logs/worker.log`);
    }
    await new Promise((r) => setTimeout(r, 1000));
  }
}

async function startDemoReduction(db: Db, p: PreparedSet, log: SeedLog): Promise<void> {
  const [existing] = await db.select({ id: reductions.id, state: reductions.state }).from(reductions).where(eq(reductions.bracketSetId, p.setId)).limit(1);
  if (existing) {
    log(`${p.party.setName}: has a reduction already (${existing.state})`);
    return;
  }
  const refused = await db
    .select({ reason: frames.refusalReason })
    .from(frames)
    .where(and(eq(frames.bracketSetId, p.setId), eq(frames.ingestState, "refused")));
  if (refused.length) {
    log(`${p.party.setName}: not reduced, ${refused.length} frame(s) were refused: ${refused.map((r) => r.reason).join("; ")}`);
    return;
  }
  const reduction = await startReduction(db, p.actor, p.setId, { registration: "sun", filter: "mgn" });
  log(`${p.party.setName}: reduction ${reduction.id} queued (the app shows its progress)`);
}

/** The demo step: needs the worker running (it ingests the frames). */
export async function seedDemoBrackets(db: Db, log: SeedLog): Promise<void> {
  const prepared: PreparedSet[] = [];
  for (const party of DEMO_PARTIES) prepared.push(await prepareParty(db, party, log));
  await waitForIngest(db, prepared, log);
  for (const p of prepared) await startDemoReduction(db, p, log);
  await seedDemoComposite(db, log);
}
