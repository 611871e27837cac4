// The demo's composite: Oskar Lindqvist's two Luxor kits, the 100 mm lens for
// the corona's reach and the 400 mm lens for the inner corona, composed once
// both reductions are finished. The seed waits for them a while (the worker is
// running); if they are not done by then, the next start composes them. Once
// the composite has finished, publish-demo.ts puts it in the gallery as a plate.
import { and, eq, inArray } from "drizzle-orm";
import type { Db } from "@/db/client";
import { bracketSets, composites, reductions, users } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { findRolesOfUser } from "../queries/roles";
import { startComposite } from "@/lib/composites/composites";
import { createPlateFromComposite, findPlateOfSource } from "@/lib/plates/publish";
import { demoPlateTexts, finishDemoPlate } from "./demo-plates";
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

const PLATE_TEXT = {
  title: "Luxor through two lenses (demo)",
  caption: "One corona from two cameras at the same site: the long lens gives the inner corona its detail, the short lens the streamers far out. Synthetic demo data.",
  altText: "A black lunar disk ringed by a finely detailed inner corona, with long pale streamers spreading east and west; solar north is up.",
  description: "Composed from two reductions of the same totality: a 400 mm lens for the inner corona and a 100 mm lens for its reach. The viewer's map layer shows which lens gives the light where.",
};

/** Waits (up to `timeoutMs`) for the demo composite and publishes it as a featured plate, once. */
export async function publishDemoComposite(db: Db, log: SeedLog, timeoutMs = 10 * 60_000): Promise<void> {
  const [user] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, DEMO_COMPOSITE.email)).limit(1);
  if (!user) return;
  const find = async () =>
    (await db.select().from(composites).where(and(eq(composites.composedBy, user.id), eq(composites.title, DEMO_COMPOSITE.title))).limit(1))[0];
  const deadline = Date.now() + timeoutMs;
  let composite = await find();
  let said = "";
  while (composite && (composite.state === "queued" || composite.state === "running") && Date.now() < deadline) {
    const line = `${DEMO_COMPOSITE.title}: composite ${composite.state}${composite.stage ? `, ${composite.stage}` : ""} ${Math.round(composite.progress * 100)} %`;
    if (line !== said) log((said = line));
    await new Promise((r) => setTimeout(r, 2000));
    composite = await find();
  }
  if (!composite || composite.state !== "done") {
    log(`${DEMO_COMPOSITE.title}: composite ${composite?.state ?? "not started"}; no plate published (the next start tries again)`);
    return;
  }
  const existing = await findPlateOfSource(db, composite.id);
  if (existing) {
    log(`${DEMO_COMPOSITE.title}: plate /plates/${existing.slug} already published`);
    return;
  }
  const texts = demoPlateTexts(PLATE_TEXT, user.name, `${user.name} (composite), Crownlight pipeline (${composite.pipelineVersion ?? "unknown version"})`);
  const plate = await createPlateFromComposite(db, { compositeId: composite.id, ...texts });
  await finishDemoPlate(db, plate, DEMO_COMPOSITE.title, log);
}
