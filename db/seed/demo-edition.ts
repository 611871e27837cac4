// The demo's draft edition: once the demo plates are published, the editor of
// the Kestrel Ridge scenario has an autumn newsletter with them laid out in
// three slots, ready to export. Made once; an edition of that title is left alone.
import { and, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { findRolesOfUser } from "@/db/queries/roles";
import { editions, plates, users } from "@/db/schema";
import { addEditionItem, createEdition, updateEditionItem } from "@/lib/editions/editions";
import { DEMO_PEOPLE } from "./people";

export const DEMO_EDITION_TITLE = "Corona Notes";
const SLOTS = ["wide-column", "single-column", "web"] as const;

export async function seedDemoEdition(db: Db, log: (line: string) => void): Promise<void> {
  const editorPerson = DEMO_PEOPLE.find((p) => p.roles.includes("editor"));
  if (!editorPerson) return;
  const [user] = await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.email, editorPerson.email)).limit(1);
  if (!user) return;
  const [existing] = await db.select({ id: editions.id }).from(editions).where(and(eq(editions.title, DEMO_EDITION_TITLE), eq(editions.createdBy, user.id))).limit(1);
  if (existing) return log(`edition "${DEMO_EDITION_TITLE}" already there: /editions/${existing.id}`);
  const demo = await db
    .select({ id: plates.id, title: plates.title })
    .from(plates)
    .where(and(eq(plates.state, "published"), eq(plates.featured, true)))
    .orderBy(plates.publishedAt)
    .limit(3);
  if (demo.length === 0) return log("no published demo plate, no demo edition");
  const actor = { userId: user.id, name: user.name, email: user.email, roles: await findRolesOfUser(db, user.id) };
  const { id } = await createEdition(db, actor, { title: DEMO_EDITION_TITLE, kind: "newsletter", issueLabel: "No. 41, autumn 2027", embargoDate: "" });
  for (const [i, p] of demo.entries()) {
    const { itemId } = await addEditionItem(db, actor, id, { plateId: p.id, rendition: i === 1 ? "structure" : "natural" });
    await updateEditionItem(db, actor, id, itemId, { slot: SLOTS[i % SLOTS.length], rendition: i === 1 ? "structure" : "natural", captionOverride: "" });
  }
  log(`draft edition "${DEMO_EDITION_TITLE}" with ${demo.length} plates: /editions/${id}`);
}
