// Splitting and merging the groups of a set's frames, or grouping them by the
// time between frames. The owner does it while the set is open; the new
// numbers are written in one transaction, with the set's frames locked so that
// two requests at once cannot interleave.
import { and, eq, inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { frames } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { findOwnOpenSet } from "./access";
import { findBracketSet } from "./bracket-sets";
import type { BracketSetDto } from "./dto";
import { groupByGap, mergeGroup, splitGroup, type GroupedFrame } from "./grouping";
import type { GroupActionInput } from "./schemas";

export async function changeGroups(db: DbOrTx, actor: Actor | null, setId: string, input: GroupActionInput): Promise<BracketSetDto> {
  const { set } = await findOwnOpenSet(db, actor, setId);
  await db.transaction(async (tx) => {
    const rows = await tx
      .select({ id: frames.id, fileName: frames.originalFileName, captureAt: frames.captureAt, givenCaptureAt: frames.givenCaptureAt, groupNumber: frames.groupNumber })
      .from(frames)
      .where(eq(frames.bracketSetId, set.id))
      .for("update");
    const grouped: GroupedFrame[] = rows.map((r) => ({ id: r.id, fileName: r.fileName, captureMs: (r.givenCaptureAt ?? r.captureAt)?.getTime() ?? null, groupNumber: r.groupNumber }));
    const next =
      input.action === "split"
        ? splitGroup(grouped, input.frameId)
        : input.action === "merge"
          ? mergeGroup(grouped, input.groupNumber)
          : groupByGap(grouped, input.gapS);
    // Only rows whose number changes are written; by number, so a set of 500 frames takes a few statements.
    const byNumber = new Map<number, string[]>();
    for (const r of grouped) {
      const g = next.get(r.id)!;
      if (g !== r.groupNumber) byNumber.set(g, [...(byNumber.get(g) ?? []), r.id]);
    }
    for (const [g, ids] of byNumber) {
      await tx
        .update(frames)
        .set({ groupNumber: g, updatedAt: sql`now()` })
        .where(and(eq(frames.bracketSetId, set.id), inArray(frames.id, ids)));
    }
  });
  return findBracketSet(db, actor, set.id);
}
