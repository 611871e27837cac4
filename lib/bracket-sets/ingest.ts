// Ingest of one uploaded original: stream it from S3 to a temporary file while
// hashing it (SHA-256), refuse a duplicate of a frame already in the set, decode
// it (format from content, metadata from EXIF or FITS cards), store a JPEG
// thumbnail under derived/, measure what triage shows (clipped fraction,
// histogram, sharpness, limb), and fill in the frame row. A frame already marked
// bias, dark or flat is refused when it cannot serve as one (8-bit, or not the
// size or planes of the set's light frames). Bad input marks the frame
// "refused" with a reason naming the file and the fault and fails at once
// (UnrecoverableError); S3 or database faults throw normally and are retried.
// The original is only ever read. This is the frame.ingest job's whole
// lifecycle: its handler (worker/jobs/frame-ingest.ts) only calls ingestFrameJob.
import { createHash } from "node:crypto";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { UnrecoverableError } from "bullmq";
import { and, eq, ne, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { frames, type Frame, type FrameFlags } from "@/db/schema";
import { decodeFrame, encodeThumbnail, isMediaError } from "@/lib/media";
import { isPlausibleExposure } from "@/lib/media/exposure";
import type { JobContext } from "@/lib/queue/job-context";
import { JOBS } from "@/lib/queue/jobs";
import { bucketName, buildThumbnailKey, downloadObjectToFile, isMissingObject, putObjectBytes } from "@/lib/storage";
import { findCalibrationFaultInSet, isCalibrationKind } from "./calibration-check";
import { analyseFrame } from "./frame-analysis";
import { measureClippedFraction, toThumbnailPlanes } from "./frame-preview";
import { findGroupForNewFrame } from "./grouping";

/** The columns of a frame that ingest reads and names in its refusals. */
const FRAME_TO_INGEST = {
  id: frames.id,
  bracketSetId: frames.bracketSetId,
  originalKey: frames.originalKey,
  originalFileName: frames.originalFileName,
  sizeBytes: frames.sizeBytes,
  exposureSource: frames.exposureSource,
  ingestState: frames.ingestState,
  kind: frames.kind,
};
type FrameToIngest = Pick<Frame, keyof typeof FRAME_TO_INGEST>;

async function findFrameToIngest(db: DbOrTx, frameId: string): Promise<FrameToIngest | undefined> {
  const [frame] = await db.select(FRAME_TO_INGEST).from(frames).where(eq(frames.id, frameId)).limit(1);
  return frame;
}

/** Marks the frame refused (only while it is still "received") and stops the job without retry. */
async function refuse(db: DbOrTx, frame: FrameToIngest, reason: string, flags: FrameFlags = {}): Promise<never> {
  await db
    .update(frames)
    .set({ ingestState: "refused", refusalReason: reason, flags: sql`${frames.flags} || ${JSON.stringify(flags)}::jsonb`, updatedAt: sql`now()` })
    .where(and(eq(frames.id, frame.id), eq(frames.ingestState, "received")));
  throw new UnrecoverableError(reason);
}

/** A frame of the set that holds these bytes; a refused frame holds no claim on them (the same file may come again, renamed). */
async function findDuplicate(db: DbOrTx, frame: FrameToIngest, sha256: string): Promise<{ id: string; originalFileName: string } | undefined> {
  const [first] = await db
    .select({ id: frames.id, originalFileName: frames.originalFileName })
    .from(frames)
    .where(and(eq(frames.bracketSetId, frame.bracketSetId), eq(frames.sha256, sha256), ne(frames.id, frame.id), ne(frames.ingestState, "refused")))
    .limit(1);
  return first;
}

function isUniqueViolation(err: unknown): boolean {
  const e = err as { code?: string; cause?: { code?: string } };
  return e?.code === "23505" || e?.cause?.code === "23505";
}

/** Records the checksum, refusing the frame when the set already holds the same bytes. */
async function claimChecksum(db: DbOrTx, frame: FrameToIngest, sha256: string): Promise<void> {
  const refuseDuplicate = (first: { id: string; originalFileName: string }) =>
    refuse(db, frame, `${frame.originalFileName}: the same file (SHA-256 ${sha256.slice(0, 12)}...) as ${first.originalFileName}, already in this bracket set`, {
      duplicateOfFrameId: first.id,
    });
  const first = await findDuplicate(db, frame, sha256);
  if (first) await refuseDuplicate(first);
  try {
    await db.update(frames).set({ sha256, updatedAt: sql`now()` }).where(eq(frames.id, frame.id));
  } catch (err) {
    // Two copies ingested side by side: the unique index lets one win.
    const winner = isUniqueViolation(err) ? await findDuplicate(db, frame, sha256) : undefined;
    if (winner) await refuseDuplicate(winner);
    throw err;
  }
}

async function findNewFrameGroup(db: DbOrTx, frame: FrameToIngest, captureAt: Date | null): Promise<number | null> {
  if (!captureAt) return null;
  const others = await db
    .select({ captureAt: frames.captureAt, givenCaptureAt: frames.givenCaptureAt, groupNumber: frames.groupNumber })
    .from(frames)
    .where(and(eq(frames.bracketSetId, frame.bracketSetId), ne(frames.id, frame.id)));
  if (!others.some((o) => o.groupNumber !== 1)) return null;
  return findGroupForNewFrame(others.map((o) => ({ captureMs: (o.givenCaptureAt ?? o.captureAt)?.getTime() ?? null, groupNumber: o.groupNumber })), captureAt.getTime());
}

/**
 * The ingest job. Bad input refuses the frame at once; any other fault is
 * retried, and on the last attempt refuses the frame with the fault as its
 * reason, so that no frame stays "received" for ever.
 */
export async function ingestFrameJob(ctx: JobContext<"frame.ingest">): Promise<void> {
  try {
    await ingestFrameOnce(ctx);
  } catch (err) {
    if (err instanceof UnrecoverableError || !ctx.isFinalAttempt) throw err;
    const frame = await findFrameToIngest(ctx.db, ctx.payload.frameId);
    if (!frame) throw err;
    // The detail goes to the log; the photographer reads what to do (an internal message may name our services).
    console.error(`[ingest] ${frame.originalFileName}: failed on its last attempt:`, err);
    await refuse(
      ctx.db,
      frame,
      `${frame.originalFileName}: could not be read after ${JOBS["frame.ingest"].attempts} attempts; the file may be damaged or in a form Crownlight cannot read. Remove it and send it again; if it is refused again, tell a curator.`,
    );
  }
}

async function ingestFrameOnce({ db, payload, report }: JobContext<"frame.ingest">): Promise<void> {
  const frame = await findFrameToIngest(db, payload.frameId);
  if (!frame) throw new UnrecoverableError(`frame ${payload.frameId} does not exist`);
  // A repeated job finds the work done (or refused) and leaves it as it is.
  if (frame.ingestState !== "received") return;
  const name = frame.originalFileName;

  const dir = await mkdtemp(join(tmpdir(), "crownlight-ingest-"));
  try {
    await report("downloading", 0.05);
    const path = join(dir, "original");
    const hash = createHash("sha256");
    let bytes: number;
    try {
      bytes = await downloadObjectToFile({ bucket: bucketName("originals"), key: frame.originalKey }, path, (chunk) => hash.update(chunk));
    } catch (err) {
      if (isMissingObject(err)) await refuse(db, frame, `${name}: the original is missing from storage`);
      throw err;
    }
    if (bytes !== frame.sizeBytes) await refuse(db, frame, `${name}: storage holds ${bytes} bytes, but ${frame.sizeBytes} were received`);
    await claimChecksum(db, frame, hash.digest("hex"));

    await report("decoding", 0.3);
    let decoded: Awaited<ReturnType<typeof decodeFrame>>;
    try {
      decoded = await decodeFrame(path, name);
    } catch (err) {
      if (isMediaError(err)) await refuse(db, frame, err.message);
      throw err;
    }

    // A frame marked bias, dark or flat before its ingest ended: checked now that its size and depth are known.
    const planeCount = decoded.image.planes.length;
    if (isCalibrationKind(frame.kind)) {
      const shape = { originalFileName: name, format: decoded.format, width: decoded.image.width, height: decoded.image.height, bitDepth: decoded.bitDepth, planeCount };
      const fault = await findCalibrationFaultInSet(db, frame.bracketSetId, frame.id, frame.kind, shape);
      if (fault) await refuse(db, frame, fault, { planeCount });
    }

    await report("thumbnail", 0.7);
    const thumbnail = await encodeThumbnail(toThumbnailPlanes(decoded.image, decoded));
    const thumbnailKey = buildThumbnailKey(frame.bracketSetId, frame.id);
    await putObjectBytes({ bucket: bucketName("derived"), key: thumbnailKey }, thumbnail, "image/jpeg");

    await report("analysing", 0.8);
    const m = decoded.metadata;
    const flags: FrameFlags = { clippedFraction: measureClippedFraction(decoded.image, decoded.whiteLevel), planeCount };
    try {
      // Histogram, sharpness and limb help triage; a fault in them must not refuse a sound frame.
      Object.assign(flags, analyseFrame(decoded.image, decoded));
    } catch (err) {
      console.error(`[ingest] ${name}: triage measures failed:`, err);
    }
    if (m.isTimeZoneAssumed) flags.isTimeZoneAssumed = true;
    // A set already split into groups: the newcomer joins the group of the frame nearest in time.
    const captureAt = m.captureTimeMs === undefined ? null : new Date(m.captureTimeMs);
    const groupNumber = await findNewFrameGroup(db, frame, captureAt);
    // An exposure the photographer already gave wins over the file's; one outside
    // the plausible range is not used, and the frame waits for the photographer's.
    const fileExposureS = m.exposureS !== undefined && isPlausibleExposure(m.exposureS) ? m.exposureS : undefined;
    if (m.exposureS !== undefined && fileExposureS === undefined) flags.implausibleExposureS = m.exposureS;
    const exposure = frame.exposureSource === "photographer" ? {} : { exposureS: fileExposureS ?? null, exposureSource: fileExposureS ? ("file" as const) : null };
    await db
      .update(frames)
      .set({
        format: decoded.format,
        width: decoded.image.width,
        height: decoded.image.height,
        bitDepth: decoded.bitDepth,
        ...exposure,
        fNumber: m.fNumber ?? null,
        iso: m.iso ?? null,
        captureAt,
        ...(groupNumber === null ? {} : { groupNumber }),
        make: m.make ?? null,
        model: m.model ?? m.instrument ?? null,
        thumbnailKey,
        flags: sql`${frames.flags} || ${JSON.stringify(flags)}::jsonb`,
        ingestState: "ingested",
        refusalReason: null,
        updatedAt: sql`now()`,
      })
      .where(and(eq(frames.id, frame.id), eq(frames.ingestState, "received")));
    await report("ingested", 1);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
