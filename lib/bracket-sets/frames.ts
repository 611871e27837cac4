// Corrections the photographer makes to a frame: the exposure when the file had
// none (or a wrong one), the capture time likewise, the kind (light or a calibration frame), and whether
// the frame takes part in reductions.
import { and, eq, sql } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { frames } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { AppError, notFound } from "@/lib/errors";
import { isPlausibleExposure, MAX_EXPOSURE_S, MIN_EXPOSURE_S } from "@/lib/media/exposure";
import { bucketName, deleteObject } from "@/lib/storage";
import { findFrameOfOwnOpenSet, findOwnOpenSet } from "./access";
import { findCalibrationFaultInSet, isCalibrationKind, toFrameShape } from "./calibration-check";
import { toFrameDto } from "./bracket-sets";
import type { FrameDto } from "./dto";
import { parseCameraTime } from "./frame-times";
import type { CorrectFrameInput } from "./schemas";

export async function correctFrame(db: DbOrTx, actor: Actor | null, setId: string, frameId: string, input: CorrectFrameInput): Promise<FrameDto> {
  const { set } = await findOwnOpenSet(db, actor, setId);
  if (!z.uuid().safeParse(frameId).success) throw notFound("That frame");
  // The route's schema checks this too; every caller of this function gets the same rule.
  if (input.exposureS !== undefined && !isPlausibleExposure(input.exposureS)) {
    const message = `must be between ${MIN_EXPOSURE_S} and ${MAX_EXPOSURE_S} s (received ${input.exposureS})`;
    throw new AppError("invalid_input", `The exposure of a frame ${message}.`, [{ field: "exposureS", message }]);
  }
  const [frame] = await db.select().from(frames).where(and(eq(frames.id, frameId), eq(frames.bracketSetId, set.id))).limit(1);
  if (!frame) throw notFound("That frame");
  if (input.kind !== undefined && isCalibrationKind(input.kind) && frame.ingestState === "ingested") {
    // A frame still being ingested: the ingest makes the same check once it is decoded.
    const fault = await findCalibrationFaultInSet(db, set.id, frame.id, input.kind, toFrameShape(frame));
    if (fault) throw new AppError("invalid_input", fault, [{ field: "kind", message: fault }]);
  }
  if (frame.ingestState === "refused" && input.included === true) {
    throw new AppError("conflict", `${frame.originalFileName} was refused (${frame.refusalReason ?? "no reason recorded"}) and cannot be included.`);
  }
  let given: { givenCaptureAt: Date | null; givenCaptureSource: "table" | null } | Record<string, never> = {};
  if (input.captureAt === null) given = { givenCaptureAt: null, givenCaptureSource: null };
  else if (input.captureAt !== undefined) {
    // A bare time of day is UTC on the eclipse's date, as the camera's clock showed it.
    const parsed = parseCameraTime(input.captureAt, set.eclipseId);
    if ("problem" in parsed) throw new AppError("invalid_input", `${frame.originalFileName}: the capture time ${parsed.problem}.`, [{ field: "captureAt", message: parsed.problem }]);
    given = { givenCaptureAt: new Date(parsed.ms), givenCaptureSource: "table" };
  }
  const [row] = await db
    .update(frames)
    .set({
      ...(input.exposureS !== undefined ? { exposureS: input.exposureS, exposureSource: "photographer" as const } : {}),
      ...(input.kind !== undefined ? { kind: input.kind } : {}),
      ...(input.included !== undefined ? { included: input.included } : {}),
      ...given,
      updatedAt: sql`now()`,
    })
    .where(and(eq(frames.id, frame.id), eq(frames.bracketSetId, set.id)))
    .returning();
  return toFrameDto(row, set.clockOffsetS);
}

/**
 * Removes a refused frame from the owner's open set: its row, its original and
 * any thumbnail. Only a refused frame: an ingested one is excluded instead, so
 * that nothing a reduction used ever disappears. Its bytes can then be sent again.
 */
export async function removeRefusedFrame(db: DbOrTx, actor: Actor | null, setId: string, frameId: string): Promise<void> {
  const { set, frame } = await findFrameOfOwnOpenSet(db, actor, setId, frameId);
  if (frame.ingestState !== "refused") {
    throw new AppError("conflict", `${frame.originalFileName} was not refused, so it stays; leave it out of reductions by excluding it instead.`);
  }
  const removed = await db
    .delete(frames)
    .where(and(eq(frames.id, frame.id), eq(frames.bracketSetId, set.id), eq(frames.ingestState, "refused")))
    .returning({ id: frames.id });
  if (!removed.length) throw notFound("That frame");
  // The row is gone first: a failure below leaves only an unreferenced object, never a frame without its original.
  await deleteObject({ bucket: bucketName("originals"), key: frame.originalKey }).catch((err: unknown) => console.error(`[frames] original of removed frame ${frame.id} stays in storage:`, err));
  if (frame.thumbnailKey) await deleteObject({ bucket: bucketName("derived"), key: frame.thumbnailKey }).catch(() => undefined);
}
