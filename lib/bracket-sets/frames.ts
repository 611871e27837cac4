// Corrections the photographer makes to a frame: the exposure when the file had
// none (or a wrong one), the kind (light or a calibration frame), and whether
// the frame takes part in reductions.
import { and, eq, sql } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { frames } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { AppError, notFound } from "@/lib/errors";
import { findOwnOpenSet } from "./access";
import { findCalibrationFaultInSet, isCalibrationKind, toFrameShape } from "./calibration-check";
import { toFrameDto } from "./bracket-sets";
import type { FrameDto } from "./dto";
import type { CorrectFrameInput } from "./schemas";

export async function correctFrame(db: DbOrTx, actor: Actor | null, setId: string, frameId: string, input: CorrectFrameInput): Promise<FrameDto> {
  const { set } = await findOwnOpenSet(db, actor, setId);
  if (!z.uuid().safeParse(frameId).success) throw notFound("That frame");
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
  const [row] = await db
    .update(frames)
    .set({
      ...(input.exposureS !== undefined ? { exposureS: input.exposureS, exposureSource: "photographer" as const } : {}),
      ...(input.kind !== undefined ? { kind: input.kind } : {}),
      ...(input.included !== undefined ? { included: input.included } : {}),
      updatedAt: sql`now()`,
    })
    .where(and(eq(frames.id, frame.id), eq(frames.bracketSetId, set.id)))
    .returning();
  return toFrameDto(row, set.clockOffsetS);
}
