// Starting and reading reductions. The owner of a bracket set reduces it;
// curators may re-reduce any set with other parameters. Each start makes a new
// reduction; none overwrites another.
import { and, asc, desc, eq } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { frames, reductions, type Frame, type Reduction, type ReductionParamsRecord } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { can } from "@/lib/auth/permissions";
import { findVisibleSet } from "@/lib/bracket-sets/access";
import { cameraCaptureAt } from "@/lib/bracket-sets/camera-time";
import { AppError, forbidden, notFound } from "@/lib/errors";
import { enqueue } from "@/lib/queue/enqueue";
import { rewordRunnerMessage } from "./failure-text";
import { refuseRunChoice } from "./run-options";

export { reductionParamsSchema, type ReductionParamsInput, type ReductionParamsRequest } from "./schemas";
import { reductionParamsSchema, type ReductionParamsInput, type ReductionParamsRequest } from "./schemas";
import { parseInput } from "@/lib/validation";

/**
 * What a reduction row holds as its parameters: every field of the start form.
 * Rows written before filter strength, output size and groups lack those keys.
 */
export type StoredReductionParams = ReductionParamsRecord & Partial<ReductionParamsInput>;

export interface ReductionDto {
  id: string;
  bracketSetId: string;
  params: StoredReductionParams;
  state: Reduction["state"];
  stage: string | null;
  progress: number;
  /** Frames done of frames to do, for a stage that works frame by frame. */
  stageFrames: { done: number; total: number } | null;
  error: string | null;
  pipelineVersion: string | null;
  measurements: Record<string, unknown> | null;
  createdAt: string;
  finishedAt: string | null;
}

const toDto = (r: Reduction): ReductionDto => ({
  id: r.id,
  bracketSetId: r.bracketSetId,
  params: r.params,
  state: r.state,
  stage: r.stage,
  progress: r.progress,
  stageFrames: r.stageFramesDone !== null && r.stageFramesTotal !== null ? { done: r.stageFramesDone, total: r.stageFramesTotal } : null,
  // Reasons stored before the worker worded them for people may still name the runner's options.
  error: r.error === null ? null : rewordRunnerMessage(r.error),
  pipelineVersion: r.pipelineVersion,
  measurements: r.measurements ?? null,
  createdAt: r.createdAt.toISOString(),
  finishedAt: r.finishedAt?.toISOString() ?? null,
});

/** Light frames that may take part: ingested and included, in every group. */
export async function findReducibleFrames(db: DbOrTx, setId: string): Promise<Frame[]> {
  return db
    .select()
    .from(frames)
    .where(and(eq(frames.bracketSetId, setId), eq(frames.kind, "light"), eq(frames.included, true), eq(frames.ingestState, "ingested")))
    .orderBy(asc(cameraCaptureAt), asc(frames.originalFileName), asc(frames.id));
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/**
 * The frames a reduction takes, for the start form and the worker alike: the
 * usable light frames of the given group, or of the whole set when it holds
 * one group. Refuses, naming the set and the groups, when the group does not
 * exist, when a set of several groups is reduced without choosing one, when
 * fewer than 2 frames are usable, or when a frame has no exposure time.
 */
export async function selectReductionFrames(db: DbOrTx, set: { id: string; name: string }, groupNumber: number | null): Promise<Frame[]> {
  const usable = await findReducibleFrames(db, set.id);
  let chosen = usable;
  if (groupNumber !== null) {
    const rows = await db.selectDistinct({ g: frames.groupNumber }).from(frames).where(eq(frames.bracketSetId, set.id));
    const groups = rows.map((r) => r.g).sort((x, y) => x - y);
    if (!groups.includes(groupNumber)) {
      throw new AppError("invalid_input", `The bracket set "${set.name}" has no group ${groupNumber}; its ${groups.length === 1 ? "group is" : "groups are"} ${groups.join(", ") || "none"}.`, [
        { field: "groupNumber", message: `expected one of ${groups.join(", ")}` },
      ]);
    }
    chosen = usable.filter((f) => f.groupNumber === groupNumber);
    if (chosen.length < 2) {
      throw new AppError("invalid_input", `Group ${groupNumber} of the bracket set "${set.name}" has ${plural(chosen.length, "usable light frame")}; a reduction needs at least 2.`, [
        { field: "groupNumber", message: "fewer than 2 usable light frames" },
      ]);
    }
  } else {
    const groups = [...new Set(usable.map((f) => f.groupNumber))].sort((x, y) => x - y);
    if (groups.length > 1) {
      throw new AppError("invalid_input", `The bracket set "${set.name}" holds ${groups.length} groups of frames (${groups.join(", ")}); choose the group to reduce.`, [
        { field: "groupNumber", message: `choose one of ${groups.join(", ")}` },
      ]);
    }
    if (chosen.length < 2) {
      throw new AppError("invalid_input", `The bracket set "${set.name}" has ${plural(chosen.length, "usable light frame")}; a reduction needs at least 2.`);
    }
  }
  const missing = chosen.filter((f) => f.exposureS === null).map((f) => f.originalFileName);
  if (missing.length) {
    throw new AppError("invalid_input", `Give an exposure time for ${missing.join(", ")}: the file${missing.length > 1 ? "s do" : " does"} not say.`);
  }
  return chosen;
}

export async function startReduction(db: DbOrTx, actor: Actor | null, setId: string, request: ReductionParamsRequest): Promise<ReductionDto> {
  const input = parseInput(reductionParamsSchema, request);
  const { actor: a, set } = await findVisibleSet(db, actor, setId);
  const isOwner = set.ownerId === a.userId;
  if (!isOwner && !can(a.roles, "review:use")) throw forbidden("reducing another photographer's bracket set");
  const chosen = await selectReductionFrames(db, set, input.groupNumber);
  // Offered on the page only when the frames allow it; refused here in the same words.
  const refusal = refuseRunChoice(
    input.registration,
    chosen.map((f) => ({ fileName: f.originalFileName, hasTime: (f.givenCaptureAt ?? f.captureAt) !== null })),
    true,
  );
  if (refusal) throw new AppError("invalid_input", refusal, [{ field: "registration", message: refusal }]);
  // Every parameter is kept with the reduction, the group included, so the worker takes the same frames.
  const params: StoredReductionParams = input;
  const [row] = await db.insert(reductions).values({ bracketSetId: setId, requestedBy: a.userId, params }).returning();
  await enqueue(db, "reduction.run", { reductionId: row.id });
  return toDto(row);
}

export async function findReduction(db: DbOrTx, actor: Actor | null, reductionId: string): Promise<ReductionDto> {
  if (!z.uuid().safeParse(reductionId).success) throw notFound("That reduction");
  const [row] = await db.select().from(reductions).where(eq(reductions.id, reductionId)).limit(1);
  if (!row) throw notFound("That reduction");
  // Visible exactly when its bracket set is.
  await findVisibleSet(db, actor, row.bracketSetId).catch(() => {
    throw notFound("That reduction");
  });
  return toDto(row);
}

export async function listReductions(db: DbOrTx, actor: Actor | null, setId: string): Promise<ReductionDto[]> {
  await findVisibleSet(db, actor, setId);
  const rows = await db.select().from(reductions).where(eq(reductions.bracketSetId, setId)).orderBy(desc(reductions.createdAt));
  return rows.map(toDto);
}
