// What the desk and the photographer read of a set's review. Curators see the
// whole history and their private notes; the photographer's read takes only
// the decision columns meant for them and never touches curator_notes.
import { and, desc, eq } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { curatorNotes, reviewDecisions, users } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { findVisibleSet } from "@/lib/bracket-sets/access";
import { forbidden } from "@/lib/errors";
import type { ReviewAction, ReviewState } from "./state-machine";

export interface DecisionHistoryDto {
  id: string;
  action: ReviewAction;
  fromState: ReviewState;
  toState: ReviewState;
  reasonLabel: string | null;
  messageToPhotographer: string | null;
  byName: string | null;
  pipelineVersion: string | null;
  decidedAt: string;
}

export interface CuratorNoteDto {
  id: string;
  body: string;
  authorName: string | null;
  decisionId: string | null;
  createdAt: string;
}

/** Every move of the set, newest first: submissions by the photographer and curators' decisions. Curators only. */
export async function listDecisionHistory(db: DbOrTx, actor: Actor | null, setId: string): Promise<DecisionHistoryDto[]> {
  const curator = requirePermission(actor, "review:use", "the review history");
  const { set } = await findVisibleSet(db, curator, setId);
  const rows = await db
    .select({
      id: reviewDecisions.id,
      action: reviewDecisions.action,
      fromState: reviewDecisions.fromState,
      toState: reviewDecisions.toState,
      reasonLabel: reviewDecisions.reasonLabel,
      messageToPhotographer: reviewDecisions.messageToPhotographer,
      byName: users.name,
      pipelineVersion: reviewDecisions.pipelineVersion,
      createdAt: reviewDecisions.createdAt,
    })
    .from(reviewDecisions)
    .leftJoin(users, eq(users.id, reviewDecisions.decidedBy))
    .where(eq(reviewDecisions.bracketSetId, set.id))
    .orderBy(desc(reviewDecisions.createdAt), desc(reviewDecisions.id));
  return rows.map(({ createdAt, ...r }) => ({ ...r, decidedAt: createdAt.toISOString() }));
}

/** The curators' private notes on a set, newest first. */
export async function listCuratorNotes(db: DbOrTx, actor: Actor | null, setId: string): Promise<CuratorNoteDto[]> {
  const curator = requirePermission(actor, "review:use", "curators' notes");
  const { set } = await findVisibleSet(db, curator, setId);
  const rows = await db
    .select({ id: curatorNotes.id, body: curatorNotes.body, authorName: users.name, decisionId: curatorNotes.decisionId, createdAt: curatorNotes.createdAt })
    .from(curatorNotes)
    .leftJoin(users, eq(users.id, curatorNotes.authorId))
    .where(eq(curatorNotes.bracketSetId, set.id))
    .orderBy(desc(curatorNotes.createdAt), desc(curatorNotes.id));
  return rows.map(({ createdAt, ...r }) => ({ ...r, createdAt: createdAt.toISOString() }));
}

export const noteSchema = z.object({
  body: z.string().trim().min(1, { error: "must not be empty" }).max(4000, { error: "must be at most 4000 characters" }),
});

/** A private note without a decision, e.g. what a curator checked. Not on one's own set. */
export async function addCuratorNote(db: DbOrTx, actor: Actor | null, setId: string, input: z.infer<typeof noteSchema>): Promise<CuratorNoteDto> {
  const curator = requirePermission(actor, "review:use", "curators' notes");
  const { set } = await findVisibleSet(db, curator, setId);
  if (set.ownerId === curator.userId) throw forbidden("notes on your own bracket set");
  const [row] = await db.insert(curatorNotes).values({ bracketSetId: set.id, authorId: curator.userId, body: input.body }).returning();
  await recordAudit(db, { actorId: curator.userId, action: "review.note", subjectType: "bracket-set", subjectId: set.id, detail: { noteId: row.id } });
  return { id: row.id, body: row.body, authorName: curator.name, decisionId: null, createdAt: row.createdAt.toISOString() };
}

export interface MessageToPhotographerDto {
  reasonLabel: string | null;
  message: string;
  decidedAt: string;
}

/**
 * The latest message the curators sent with a request for changes, while the
 * set still has changes requested. For the owner (and curators, who see the
 * owner's page); reads no private note.
 */
export async function findLatestMessageToPhotographer(db: DbOrTx, actor: Actor | null, setId: string): Promise<MessageToPhotographerDto | null> {
  const { set } = await findVisibleSet(db, actor, setId);
  if (set.state !== "changes-requested") return null;
  const [row] = await db
    .select({ reasonLabel: reviewDecisions.reasonLabel, message: reviewDecisions.messageToPhotographer, createdAt: reviewDecisions.createdAt })
    .from(reviewDecisions)
    .where(and(eq(reviewDecisions.bracketSetId, set.id), eq(reviewDecisions.action, "request-changes")))
    .orderBy(desc(reviewDecisions.createdAt))
    .limit(1);
  if (!row?.message) return null;
  return { reasonLabel: row.reasonLabel, message: row.message, decidedAt: row.createdAt.toISOString() };
}
