// The checks every edition function starts with: the editor's permission, an
// edition or item that exists (an id that is not a uuid names nothing), and
// the row lock that keeps two editors from interleaving changes.
import { and, eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { editionItems, editions, type EditionKind, type EditionState, type Rendition } from "@/db/schema";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { AppError, notFound } from "@/lib/errors";
import { findActiveExport } from "./export/active";

export const EDITION = "That edition";
export const ITEM = "That plate in the edition";

export const isUuid = (id: string) => /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(id);

export function requireEditor(actor: Actor | null, what: string): Actor {
  return requirePermission(actor, "editions:use", what);
}

export interface EditionHeadDto {
  id: string;
  title: string;
  kind: EditionKind;
  issueLabel: string;
  embargoDate: string | null;
  state: EditionState;
  createdAt: string;
  updatedAt: string;
}

export async function findEditionRow(db: DbOrTx, editionId: string): Promise<EditionHeadDto> {
  if (!isUuid(editionId)) throw notFound(EDITION);
  const [row] = await db.select().from(editions).where(eq(editions.id, editionId)).limit(1);
  if (!row) throw notFound(EDITION);
  return {
    id: row.id,
    title: row.title,
    kind: row.kind,
    issueLabel: row.issueLabel,
    embargoDate: row.embargoDate,
    state: row.state,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

export interface LockedEdition {
  title: string;
  kind: EditionKind;
  issueLabel: string;
  state: EditionState;
}

/** Locks the edition row until the transaction ends, in any state. */
export async function lockEdition(tx: DbOrTx, editionId: string): Promise<LockedEdition> {
  if (!isUuid(editionId)) throw notFound(EDITION);
  const [row] = await tx
    .select({ title: editions.title, kind: editions.kind, issueLabel: editions.issueLabel, state: editions.state })
    .from(editions)
    .where(eq(editions.id, editionId))
    .for("update");
  if (!row) throw notFound(EDITION);
  return row;
}

/** Locks the edition for a change of its items and refuses one that was exported or is being exported. */
export async function lockDraftEdition(tx: DbOrTx, editionId: string): Promise<LockedEdition> {
  const row = await lockEdition(tx, editionId);
  if (row.state !== "draft") throw new AppError("conflict", `"${row.title}" was exported; its plates are fixed.`);
  // The bundle being made reads these plates: they wait until it is done.
  if (await findActiveExport(tx, editionId)) throw new AppError("conflict", `"${row.title}" is being exported; its plates can change once the bundle is done.`);
  return row;
}

export async function lockItem(tx: DbOrTx, editionId: string, itemId: string): Promise<{ position: number; plateId: string; plateVersion: number; rendition: Rendition }> {
  if (!isUuid(itemId)) throw notFound(ITEM);
  const [item] = await tx
    .select({ position: editionItems.position, plateId: editionItems.plateId, plateVersion: editionItems.plateVersion, rendition: editionItems.rendition })
    .from(editionItems)
    .where(and(eq(editionItems.id, itemId), eq(editionItems.editionId, editionId)))
    .limit(1);
  if (!item) throw notFound(ITEM);
  return item;
}

export async function touch(tx: DbOrTx, editionId: string): Promise<void> {
  await tx.update(editions).set({ updatedAt: sql`now()` }).where(eq(editions.id, editionId));
}
