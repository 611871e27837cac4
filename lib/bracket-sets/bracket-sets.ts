// Bracket sets: create, list, read, and set the camera clock offset. Every
// function takes the actor and scopes its queries to what that actor may see.
import { and, asc, count, desc, eq, inArray, sql } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { bracketSets, eclipses, frames, kits, sites, uploads, users, type BracketSet, type Frame, type Upload } from "@/db/schema";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { AppError, notFound } from "@/lib/errors";
import { countParts } from "@/lib/storage/limits";
import { canReadAll, findOwnOpenSet, findVisibleSet, requireReader } from "./access";
import { cameraCaptureAt } from "./camera-time";
import { clockOffsetFromFrame } from "./clock";
import type { BracketSetDto, BracketSetSummaryDto, FrameDto, UploadDto } from "./dto";
import { markBlurred } from "./frame-analysis";
import type { CreateBracketSetInput, UpdateBracketSetInput } from "./schemas";

export function toSummary(set: BracketSet, actor: Actor, ownerName: string, frameCount: number): BracketSetSummaryDto {
  return {
    id: set.id,
    name: set.name,
    eclipseId: set.eclipseId,
    siteId: set.siteId,
    kitId: set.kitId,
    ownerName,
    isOwn: set.ownerId === actor.userId,
    state: set.state,
    clockOffsetS: set.clockOffsetS,
    northAngleDeg: set.northAngleDeg,
    frameCount,
    createdAt: set.createdAt.toISOString(),
    updatedAt: set.updatedAt.toISOString(),
  };
}

/** `isBlurred` is decided against the set's other frames (markBlurred); without it the stored flags stand. */
export function toFrameDto(f: Frame, clockOffsetS: number, isBlurred?: boolean): FrameDto {
  // A time the photographer gave wins over the file's; both are camera clock.
  const camera = f.givenCaptureAt ?? f.captureAt;
  return {
    id: f.id,
    fileName: f.originalFileName,
    sizeBytes: f.sizeBytes,
    sha256: f.sha256,
    format: f.format,
    width: f.width,
    height: f.height,
    bitDepth: f.bitDepth,
    exposureS: f.exposureS,
    exposureSource: f.exposureSource,
    needsExposure: f.ingestState === "ingested" && f.exposureS === null,
    fNumber: f.fNumber,
    iso: f.iso,
    captureAt: camera?.toISOString() ?? null,
    correctedCaptureAt: camera ? new Date(camera.getTime() - clockOffsetS * 1000).toISOString() : null,
    fileCaptureAt: f.captureAt?.toISOString() ?? null,
    captureTimeSource: f.givenCaptureSource ?? (f.captureAt ? "file" : null),
    needsTime: f.kind === "light" && f.ingestState === "ingested" && camera === null,
    make: f.make,
    model: f.model,
    kind: f.kind,
    included: f.included,
    groupNumber: f.groupNumber,
    ingestState: f.ingestState,
    refusalReason: f.refusalReason,
    hasThumbnail: f.thumbnailKey !== null,
    flags: isBlurred === undefined ? f.flags : { ...f.flags, isBlurred },
  };
}

export function toUploadDto(u: Upload): UploadDto {
  return {
    id: u.id,
    frameId: u.frameId,
    fileName: u.fileName,
    sizeBytes: u.sizeBytes,
    partSizeBytes: u.partSizeBytes,
    partCount: countParts(u.sizeBytes, u.partSizeBytes),
    state: u.state,
    createdAt: u.createdAt.toISOString(),
  };
}

async function requireOwnReference(db: DbOrTx, table: typeof sites | typeof kits, id: string, ownerId: string, field: string, what: string): Promise<void> {
  const [row] = await db.select({ id: table.id }).from(table).where(and(eq(table.id, id), eq(table.ownerId, ownerId))).limit(1);
  if (!row) throw new AppError("invalid_input", `${what} was not found among yours.`, [{ field, message: `${what} was not found among yours` }]);
}

export async function createBracketSet(db: DbOrTx, actor: Actor | null, input: CreateBracketSetInput): Promise<BracketSetSummaryDto> {
  const a = requirePermission(actor, "brackets:own");
  const [eclipse] = await db.select({ id: eclipses.id }).from(eclipses).where(eq(eclipses.id, input.eclipseId)).limit(1);
  if (!eclipse) throw new AppError("invalid_input", `No eclipse on ${input.eclipseId} is in the catalogue.`, [{ field: "eclipseId", message: "no such eclipse in the catalogue" }]);
  await requireOwnReference(db, sites, input.siteId, a.userId, "siteId", "That site");
  if (input.kitId) await requireOwnReference(db, kits, input.kitId, a.userId, "kitId", "That kit");
  const [set] = await db
    .insert(bracketSets)
    .values({ ownerId: a.userId, eclipseId: input.eclipseId, siteId: input.siteId, kitId: input.kitId, name: input.name, notes: input.notes, clockOffsetS: input.clockOffsetS })
    .returning();
  return toSummary(set, a, a.name, 0);
}

export async function listBracketSets(db: DbOrTx, actor: Actor | null): Promise<BracketSetSummaryDto[]> {
  const a = requireReader(actor);
  const query = db
    .select({ set: bracketSets, ownerName: users.name })
    .from(bracketSets)
    .innerJoin(users, eq(users.id, bracketSets.ownerId))
    .orderBy(desc(bracketSets.createdAt));
  const rows = canReadAll(a) ? await query : await query.where(eq(bracketSets.ownerId, a.userId));
  if (rows.length === 0) return [];
  const counts = await db
    .select({ setId: frames.bracketSetId, n: count() })
    .from(frames)
    .where(inArray(frames.bracketSetId, rows.map((r) => r.set.id)))
    .groupBy(frames.bracketSetId);
  const bySet = new Map(counts.map((c) => [c.setId, c.n]));
  return rows.map((r) => toSummary(r.set, a, r.ownerName, bySet.get(r.set.id) ?? 0));
}

export async function findBracketSet(db: DbOrTx, actor: Actor | null, setId: string): Promise<BracketSetDto> {
  const { actor: a, set } = await findVisibleSet(db, actor, setId);
  const [owner] = await db.select({ name: users.name }).from(users).where(eq(users.id, set.ownerId)).limit(1);
  const frameRows = await db
    .select()
    .from(frames)
    .where(eq(frames.bracketSetId, set.id))
    .orderBy(asc(frames.groupNumber), asc(cameraCaptureAt), asc(frames.originalFileName), asc(frames.id));
  const blurred = markBlurred(frameRows.map((f) => ({ sharpness: f.flags.sharpness, isLight: f.kind === "light" && f.ingestState === "ingested", exposureS: f.exposureS })));
  const openRows = await db.select().from(uploads).where(and(eq(uploads.bracketSetId, set.id), eq(uploads.state, "open"))).orderBy(asc(uploads.createdAt));
  return {
    ...toSummary(set, a, owner?.name ?? "", frameRows.length),
    notes: set.notes,
    frames: frameRows.map((f, i) => toFrameDto(f, set.clockOffsetS, blurred[i])),
    openUploads: openRows.map(toUploadDto),
  };
}

/** Changes fields of a set the actor owns and may still change; `values` may check them first. Returns the set's summary. */
async function changeOwnOpenSet(
  db: DbOrTx,
  actor: Actor | null,
  setId: string,
  values: (a: Actor) => Promise<Partial<typeof bracketSets.$inferInsert>>,
): Promise<BracketSetSummaryDto> {
  const { actor: a, set } = await findOwnOpenSet(db, actor, setId);
  const [updated] = await db
    .update(bracketSets)
    .set({ ...(await values(a)), updatedAt: sql`now()` })
    .where(and(eq(bracketSets.id, set.id), eq(bracketSets.ownerId, a.userId)))
    .returning();
  const [{ n }] = await db.select({ n: count() }).from(frames).where(eq(frames.bracketSetId, set.id));
  return toSummary(updated, a, a.name, n);
}

/** Seconds the camera clock ran ahead of UTC (negative: behind); applied when times are read. */
export async function setClockOffset(db: DbOrTx, actor: Actor | null, setId: string, clockOffsetS: number): Promise<BracketSetSummaryDto> {
  return changeOwnOpenSet(db, actor, setId, async () => ({ clockOffsetS }));
}

/** The kit (camera and mount) of an open set: it gives the plate scale and the image orientation. */
async function setKit(db: DbOrTx, actor: Actor | null, setId: string, kitId: string | null): Promise<BracketSetSummaryDto> {
  return changeOwnOpenSet(db, actor, setId, async (a) => {
    if (kitId) await requireOwnReference(db, kits, kitId, a.userId, "kitId", "That kit");
    return { kitId };
  });
}

/** North in the image as the photographer knows it (degrees counter-clockwise from up); wins over the kit's mount; null forgets it. */
async function setNorthAngle(db: DbOrTx, actor: Actor | null, setId: string, northAngleDeg: number | null): Promise<BracketSetSummaryDto> {
  // Kept in -180..180 so the page shows one value for one direction.
  const normalised = northAngleDeg === null ? null : ((((northAngleDeg + 180) % 360) + 360) % 360) - 180;
  return changeOwnOpenSet(db, actor, setId, async () => ({ northAngleDeg: normalised }));
}

/**
 * One change of an open set: its north angle, its kit, or its clock offset,
 * typed in seconds or taken from a frame that photographed a trusted clock
 * (offset = the frame's camera capture time - the true time shown).
 */
export async function updateBracketSet(db: DbOrTx, actor: Actor | null, setId: string, input: UpdateBracketSetInput): Promise<BracketSetSummaryDto> {
  if (input.northAngleDeg !== undefined) return setNorthAngle(db, actor, setId, input.northAngleDeg);
  if (input.kitId !== undefined) return setKit(db, actor, setId, input.kitId);
  if (input.clockOffsetS !== undefined) return setClockOffset(db, actor, setId, input.clockOffsetS);
  const { set } = await findOwnOpenSet(db, actor, setId);
  const frameId = input.clockFrameId;
  if (!frameId || !z.uuid().safeParse(frameId).success) throw notFound("That frame");
  const [frame] = await db
    .select({ fileName: frames.originalFileName, captureAt: frames.captureAt, givenCaptureAt: frames.givenCaptureAt })
    .from(frames)
    .where(and(eq(frames.id, frameId), eq(frames.bracketSetId, set.id)))
    .limit(1);
  if (!frame) throw notFound("That frame");
  const offsetS = clockOffsetFromFrame({ fileName: frame.fileName, captureMs: (frame.givenCaptureAt ?? frame.captureAt)?.getTime() ?? null }, input.clockShownAt ?? "");
  return setClockOffset(db, actor, setId, offsetS);
}
