// The demo's composite: Oskar Lindqvist's two Luxor kits, the 100 mm lens for
// the corona's reach and the 400 mm lens for the inner corona, composed once
// both reductions are finished. The seed waits for them a while (the worker is
// running); if they are not done by then, the next start composes them.
import { and, eq, inArray } from "drizzle-orm";
import type { Db } from "@/db/client";
import { bracketSets, composites, reductions, users } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { findRolesOfUser } from "../queries/roles";
import { startComposite } from "@/lib/composites/composites";
import type { SeedLog } from "./demo-brackets";

export const DEMO_COMPOSITE = {
  email: "oskar.lindqvist@kestrel-ridge.example",
  title: "Luxor, 100 mm and 400 mm lenses",
  setNames: ["Luxor corona bracket", "Luxor inner corona, long lens"],
} as const;

const WAIT_MS = 8 * 60_000;

export async function seedDemoComposite(db: Db, log: SeedLog): Promise<void> {
  const [user] = await db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.email, DEMO_COMPOSITE.email)).limit(1);
  if (!user) return;
  const [existing] = await db.select({ id: composites.id, state: composites.state }).from(composites).where(and(eq(composites.composedBy, user.id), eq(composites.title, DEMO_COMPOSITE.title))).limit(1);
  if (existing) {
    log(`${DEMO_COMPOSITE.title}: composed already (${existing.state})`);
    return;
  }
  const actor: Actor = { userId: user.id, email: user.email, name: user.name, roles: await findRolesOfUser(db, user.id) };
  const deadline = Date.now() + WAIT_MS;
  let said = "";
  for (;;) {
    const rows = await db
      .select({ id: reductions.id, state: reductions.state, setName: bracketSets.name })
      .from(reductions)
      .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
      .where(and(eq(bracketSets.ownerId, user.id), inArray(bracketSets.name, [...DEMO_COMPOSITE.setNames])));
    const done = DEMO_COMPOSITE.setNames.map((name) => rows.find((r) => r.setName === name && r.state === "done"));
    if (done.every(Boolean)) {
      const composite = await startComposite(db, actor, { title: DEMO_COMPOSITE.title, reductionIds: done.map((r) => r!.id) });
      log(`${DEMO_COMPOSITE.title}: composite ${composite.id} queued (the studio shows its progress)`);
      return;
    }
    if (rows.some((r) => r.state === "failed")) {
      log(`${DEMO_COMPOSITE.title}: not composed, a reduction of the two Luxor kits failed`);
      return;
    }
    const line = `${DEMO_COMPOSITE.title}: waiting for ${done.filter((r) => !r).length} of the two Luxor reductions to finish`;
    if (line !== said) log((said = line));
    if (Date.now() > deadline) {
      log(`${DEMO_COMPOSITE.title}: the reductions are still running; the next start composes them`);
      return;
    }
    await new Promise((r) => setTimeout(r, 2000));
  }
}
