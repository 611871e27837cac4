// A bracket set of synthetic FITS frames (our own generator) on an equatorial kit squared to
// north, uploaded through the presigned path and ingested by whichever worker takes the
// test's queue prefix. Shared by the tests that reduce such a set through workers of their own.
import { eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { bracketSets, frames, kits } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { makeSyntheticFitsBracket, type SyntheticFitsOptions } from "../support/synthetic-fits";
import { waitFor } from "../support/wait";
import { createSetFor, uploadFile } from "./bracket-upload-helpers";

export async function makeSyntheticSet(db: Db, owner: Actor, name: string, bracket: SyntheticFitsOptions): Promise<{ setId: string; frameIds: string[] }> {
  const setId = await createSetFor(db, owner, name);
  // Squared to north on an equatorial mount: the reduction takes the image orientation from the kit.
  const [kit] = await db
    .insert(kits)
    .values({ ownerId: owner.userId, name: `Refractor ${bracket.seed}`, camera: "Mono camera", sensorWidthMm: 10, sensorHeightMm: 8, pixelPitchUm: 5, focalMm: 600, fNumber: 7, mount: "equatorial" })
    .returning({ id: kits.id });
  await db.update(bracketSets).set({ kitId: kit.id }).where(eq(bracketSets.id, setId));
  const frameIds: string[] = [];
  for (const f of makeSyntheticFitsBracket(bracket)) frameIds.push((await uploadFile(db, owner, setId, f.name, f.bytes)).id);
  await waitFor(`ingest of the ${frameIds.length} frames of ${name}`, async () => {
    const rows = await db.select({ state: frames.ingestState, reason: frames.refusalReason }).from(frames).where(eq(frames.bracketSetId, setId));
    const refused = rows.find((r) => r.state === "refused");
    if (refused) throw new Error(`a frame was refused: ${refused.reason}`);
    return rows.length === frameIds.length && rows.every((r) => r.state === "ingested") ? true : undefined;
  }, 120_000);
  return { setId, frameIds };
}
