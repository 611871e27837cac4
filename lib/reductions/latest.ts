// The latest reduction of each of several bracket sets, for lists of sets.
import { desc, inArray } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { reductions, type Reduction } from "@/db/schema";

export interface LatestReductionDto {
  id: string;
  state: Reduction["state"];
  progress: number;
  createdAt: string;
}

/**
 * Callers pass only ids of sets the actor may see (from listBracketSets), so the
 * scope is the caller's list.
 */
export async function findLatestReductions(db: DbOrTx, visibleSetIds: string[]): Promise<Map<string, LatestReductionDto>> {
  const out = new Map<string, LatestReductionDto>();
  if (visibleSetIds.length === 0) return out;
  const rows = await db
    .selectDistinctOn([reductions.bracketSetId], { setId: reductions.bracketSetId, id: reductions.id, state: reductions.state, progress: reductions.progress, createdAt: reductions.createdAt })
    .from(reductions)
    .where(inArray(reductions.bracketSetId, visibleSetIds))
    .orderBy(reductions.bracketSetId, desc(reductions.createdAt));
  for (const r of rows) out.set(r.setId, { id: r.id, state: r.state, progress: r.progress, createdAt: r.createdAt.toISOString() });
  return out;
}
