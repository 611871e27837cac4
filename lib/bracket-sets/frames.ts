// Corrections the photographer makes to a frame: the exposure when the file had
// none (or a wrong one), the capture time likewise, the kind (light or a calibration frame), and whether
// the frame takes part in reductions.
import { and, eq, sql } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { frames } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { AppError, notFound } from "@/lib/errors";
import { findOwnOpenSet } from "./access";
import { toFrameDto } from "./bracket-sets";
import type { FrameDto } from "./dto";
import { parseCameraTime } from "./frame-times";
import type { CorrectFrameInput } from "./schemas";

export async function correctFrame(db: DbOrTx, actor: Actor | null, setId: string, frameId: string, input: CorrectFrameInput): Promise<FrameDto> {
  const { set } = await findOwnOpenSet(db, actor, setId);
  if (!z.uuid().safeParse(frameId).success) throw notFound("That frame");
  const [frame] = await db.select().from(frames).where(and(eq(frames.id, frameId), eq(frames.bracketSetId, set.id))).limit(1);
  if (!frame) throw notFound("That frame");
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
