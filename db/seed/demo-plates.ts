// The demo scenario's plates: once the three demo reductions have finished, each
// is published as a plate (until the review desk publishes plates, the seed does
// it), so that a new visitor finds the gallery filled. The frames are synthetic
// and every text says so. Idempotent: a reduction already on a plate is skipped.
import { and, desc, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { bracketSets, reductions, users } from "@/db/schema";
import { createPlateFromReduction, findPlateOfReduction, slugify, type NewPlateTexts } from "@/lib/plates/publish";
import { makeWebJpeg } from "@/lib/plates/web-jpeg";
import { DEMO_PARTIES, SYNTHETIC_NOTE } from "./demo-scenario";

type SeedLog = (line: string) => void;

export interface DemoPlateText {
  title: string;
  caption: string;
  altText: string;
  description: string;
}

/** By the bracket set's name in the scenario. */
const TEXTS: Record<string, DemoPlateText> = {
  "Luxor corona bracket": {
    title: "The corona over Luxor (demo)",
    caption: "Six minutes of totality from the west bank of the Nile: streamers reaching past three solar radii. Synthetic demo data.",
    altText: "A black lunar disk ringed by a bright inner corona, with long pale streamers spreading east and west.",
    description: "Five exposures from 1/1000 s to 1/4 s, aligned on the Sun's centre and merged into one image of the corona's light.",
  },
  "Cadiz corona bracket": {
    title: "Inner corona from Cadiz (demo)",
    caption: "A short totality seen from the Atlantic coast of Spain, low in the afternoon sky. Synthetic demo data.",
    altText: "The dark Moon covering the Sun, surrounded by a pearly corona brighter near the limb and fading outward.",
    description: "A tripod-mounted camera with a 120 mm lens; the image is turned so that solar north is known from the site and time.",
  },
  "Gulf of Gabes corona bracket, from the ship": {
    title: "Corona from a ship off Sfax (demo)",
    caption: "Totality from a moving deck in the Gulf of Gabes, the ship's track used to place the Sun. Synthetic demo data.",
    altText: "A round black Moon with a soft white corona and a few streamers, on a dark sky.",
    description: "Taken from the deck of a ship under way; the site is the ship's time-stamped track, so the Sun's position is computed for where the ship was at each frame.",
  },
};

/** A demo plate's texts: the synthetic-data note under the description, CC BY, both renditions, featured, published. */
export function demoPlateTexts(text: DemoPlateText, acquiredBy: string, processedBy: string): NewPlateTexts {
  return {
    slug: slugify(`${text.title.replace(/\(demo\)/, "")} 2027`),
    ...text,
    description: `${text.description}\n\n${SYNTHETIC_NOTE}`,
    acquiredBy,
    processedBy,
    licence: "CC-BY-4.0",
    renditions: ["natural", "structure"],
    featured: true,
    publish: true,
    createdBy: null,
  };
}

/** The web JPEG with the credits in its metadata, as publishing on the desk makes it; then the log line. */
export async function finishDemoPlate(db: Db, plate: { id: string; slug: string }, what: string, log: SeedLog): Promise<void> {
  await makeWebJpeg(db, plate.id, 1);
  log(`${what}: published as /plates/${plate.slug}`);
}

async function latestReductionOf(db: Db, setId: string) {
  const [r] = await db.select().from(reductions).where(eq(reductions.bracketSetId, setId)).orderBy(desc(reductions.createdAt)).limit(1);
  return r;
}

/** Waits (up to `timeoutMs`) for the demo reductions and publishes each finished one. */
export async function publishDemoPlates(db: Db, log: SeedLog, timeoutMs = 10 * 60_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (const party of DEMO_PARTIES) {
    const text = TEXTS[party.setName];
    const [owner] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, party.email)).limit(1);
    if (!owner || !text) continue;
    const [set] = await db
      .select({ id: bracketSets.id })
      .from(bracketSets)
      .where(and(eq(bracketSets.ownerId, owner.id), eq(bracketSets.name, party.setName)))
      .limit(1);
    if (!set) {
      log(`${party.setName}: no demo bracket set (SEED_DEMO_BRACKETS=0?), no plate`);
      continue;
    }
    let red = await latestReductionOf(db, set.id);
    let lastNote = "";
    while (red && (red.state === "queued" || red.state === "running") && Date.now() < deadline) {
      const note = `${party.setName}: reduction ${red.state}${red.stage ? `, ${red.stage}` : ""} ${Math.round(red.progress * 100)} %`;
      if (note !== lastNote) log(note);
      lastNote = note;
      await new Promise((r) => setTimeout(r, 2000));
      red = await latestReductionOf(db, set.id);
    }
    if (!red || red.state !== "done") {
      log(`${party.setName}: reduction ${red?.state ?? "missing"}${red?.error ? ` (${red.error})` : ""}; no plate published`);
      continue;
    }
    const existing = await findPlateOfReduction(db, red.id);
    if (existing) {
      log(`${party.setName}: plate /plates/${existing.slug} already published`);
      continue;
    }
    const texts = demoPlateTexts(text, owner.name, `Crownlight pipeline (${red.pipelineVersion ?? "unknown version"})`);
    const plate = await createPlateFromReduction(db, { reductionId: red.id, ...texts });
    await finishDemoPlate(db, plate, party.setName, log);
  }
}
