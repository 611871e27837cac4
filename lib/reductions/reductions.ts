// Starting and reading reductions. The owner of a bracket set reduces it;
// curators may re-reduce any set with other parameters. Each start makes a new
// reduction; none overwrites another.
import { and, desc, eq } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { frames, reductions, type Reduction } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { can } from "@/lib/auth/permissions";
import { findVisibleSet } from "@/lib/bracket-sets/access";
import { AppError, forbidden, notFound } from "@/lib/errors";
import { enqueue } from "@/lib/queue/enqueue";

export { reductionParamsSchema, type ReductionParamsInput, type ReductionParamsRequest } from "./schemas";
import { reductionParamsSchema, type ReductionParamsRequest } from "./schemas";
import { parseInput } from "@/lib/validation";

export interface ReductionDto {
  id: string;
  bracketSetId: string;
  params: Reduction["params"];
  state: Reduction["state"];
  stage: string | null;
  progress: number;
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
  error: r.error,
  pipelineVersion: r.pipelineVersion,
  measurements: r.measurements ?? null,
  createdAt: r.createdAt.toISOString(),
  finishedAt: r.finishedAt?.toISOString() ?? null,
});

/** Light frames that took part: ingested and included. */
export async function findReducibleFrames(db: DbOrTx, setId: string) {
  return db
    .select()
    .from(frames)
    .where(and(eq(frames.bracketSetId, setId), eq(frames.kind, "light"), eq(frames.included, true), eq(frames.ingestState, "ingested")));
}

export async function startReduction(db: DbOrTx, actor: Actor | null, setId: string, request: ReductionParamsRequest): Promise<ReductionDto> {
  const input = parseInput(reductionParamsSchema, request);
  const { actor: a, set } = await findVisibleSet(db, actor, setId);
  const isOwner = set.ownerId === a.userId;
  if (!isOwner && !can(a.roles, "review:use")) throw forbidden("reducing another photographer's bracket set");
  const usable = await findReducibleFrames(db, setId);
  if (usable.length < 2) {
    throw new AppError("invalid_input", `The bracket set "${set.name}" has ${usable.length} usable light frame${usable.length === 1 ? "" : "s"}; a reduction needs at least 2.`);
  }
  const missing = usable.filter((f) => f.exposureS === null).map((f) => f.originalFileName);
  if (missing.length) {
    throw new AppError("invalid_input", `Give an exposure time for ${missing.join(", ")}: the file${missing.length > 1 ? "s do" : " does"} not say.`);
  }
  const [row] = await db.insert(reductions).values({ bracketSetId: setId, requestedBy: a.userId, params: input }).returning();
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
