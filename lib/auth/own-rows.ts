// A member's own kits and sites: rows with an owner that only the owner sees
// and changes. Another member's row answers "not found", exactly like one that
// does not exist, so ids do not leak.
import { and, asc, eq } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { kits, sites } from "@/db/schema";
import { notFound } from "@/lib/errors";
import { requirePermission, type Actor } from "./actor";

type OwnedTable = typeof kits | typeof sites;

/** The actor's own rows of the table, by name. */
export async function listOwnRows<T extends OwnedTable>(db: DbOrTx, actor: Actor | null, table: T): Promise<T["$inferSelect"][]> {
  const a = requirePermission(actor, "studio:use");
  const owned: OwnedTable = table;
  return (await db.select().from(owned).where(eq(owned.ownerId, a.userId)).orderBy(asc(owned.name))) as T["$inferSelect"][];
}

/** One of the actor's own rows; `what` names it in the "not found" answer ("That kit"). */
export async function findOwnRow<T extends OwnedTable>(db: DbOrTx, actor: Actor | null, table: T, id: string, what: string): Promise<T["$inferSelect"]> {
  const a = requirePermission(actor, "studio:use");
  if (!z.uuid().safeParse(id).success) throw notFound(what);
  const owned: OwnedTable = table;
  const [row] = await db.select().from(owned).where(and(eq(owned.id, id), eq(owned.ownerId, a.userId))).limit(1);
  if (!row) throw notFound(what);
  return row as T["$inferSelect"];
}
