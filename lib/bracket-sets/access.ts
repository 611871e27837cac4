// Who may see and change a bracket set. Members see their own; curators see
// all. Only the owner changes a set. A set the actor may not see answers "not
// found", exactly like one that does not exist, so ids do not leak.
import { and, eq } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { bracketSets, frames, type BracketSet, type Frame } from "@/db/schema";
import { requirePermission, requireSignedIn, type Actor } from "@/lib/auth/actor";
import { can } from "@/lib/auth/permissions";
import { AppError, forbidden, notFound } from "@/lib/errors";

export const SET_NOT_FOUND = "That bracket set";
export const FRAME_NOT_FOUND = "That frame";

/** The set states in which frames may still be added or corrected. */
const OPEN_STATES: ReadonlySet<BracketSet["state"]> = new Set(["gathering", "changes-requested"]);

/** True when the actor may read every member's sets. */
export function canReadAll(actor: Actor): boolean {
  return can(actor.roles, "brackets:read-all");
}

/** The actor, when they may read bracket sets at all (their own or everyone's). */
export function requireReader(actor: Actor | null): Actor {
  const a = requireSignedIn(actor);
  if (!canReadAll(a) && !can(a.roles, "brackets:own")) throw forbidden("bracket sets");
  return a;
}

export async function findVisibleSet(db: DbOrTx, actor: Actor | null, setId: string): Promise<{ actor: Actor; set: BracketSet }> {
  const a = requireReader(actor);
  if (!z.uuid().safeParse(setId).success) throw notFound(SET_NOT_FOUND);
  const where = canReadAll(a) ? eq(bracketSets.id, setId) : and(eq(bracketSets.id, setId), eq(bracketSets.ownerId, a.userId));
  const [set] = await db.select().from(bracketSets).where(where).limit(1);
  if (!set) throw notFound(SET_NOT_FOUND);
  return { actor: a, set };
}

/**
 * The set, when the actor owns it and it still takes changes. A curator who may
 * see someone else's set is told it is not theirs to change (403); anyone else
 * gets "not found".
 */
export async function findOwnOpenSet(db: DbOrTx, actor: Actor | null, setId: string): Promise<{ actor: Actor; set: BracketSet }> {
  const { actor: a, set } = await findVisibleSet(db, actor, setId);
  if (set.ownerId !== a.userId) throw forbidden("changes to another photographer's bracket set");
  requirePermission(a, "brackets:own");
  if (!OPEN_STATES.has(set.state)) {
    throw new AppError("conflict", `The bracket set "${set.name}" is ${set.state}; frames can be added or corrected only while it is gathering or has changes requested.`);
  }
  return { actor: a, set };
}

/** A frame of a set the actor owns and may still change, with the set; "not found" for an id that is no frame of that set. */
export async function findFrameOfOwnOpenSet(db: DbOrTx, actor: Actor | null, setId: string, frameId: string): Promise<{ actor: Actor; set: BracketSet; frame: Frame }> {
  const found = await findOwnOpenSet(db, actor, setId);
  if (!z.uuid().safeParse(frameId).success) throw notFound(FRAME_NOT_FOUND);
  const [frame] = await db.select().from(frames).where(and(eq(frames.id, frameId), eq(frames.bracketSetId, found.set.id))).limit(1);
  if (!frame) throw notFound(FRAME_NOT_FOUND);
  return { ...found, frame };
}
