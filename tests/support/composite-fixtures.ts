// Finished reductions whose masters are kits' views of one synthetic corona
// (lib/imaging/synth-composite.ts), stored in the S3 fake with the figures the
// composite's chooser reads: composites can be made of them without running a
// reduction. Invented data for tests.
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { reductions } from "@/db/schema";
import { createSky, renderMaster, type KitSpec } from "@/lib/imaging/synth-composite";
import { bucketName, buildReductionPrefix, putObjectBytes } from "@/lib/storage";
import { encodeSyntheticMaster } from "@/scripts/lib-synth/write-master";

/** A long lens and one of 0.4 its focal length turned 25 deg, the second camera at 0.6 the gain. */
export const TEST_KITS: KitSpec[] = [
  { name: "long", width: 280, height: 210, scaleArcsecPerPx: 16, solarNorthDeg: 0, gain: 1, moonArcsec: { lon: 12, lat: -6 }, noiseScale: 4, seed: 1 },
  { name: "short", width: 240, height: 180, scaleArcsecPerPx: 40, solarNorthDeg: 25, gain: 0.6, moonArcsec: { lon: 12, lat: -6 }, noiseScale: 40, seed: 2 },
];

const sky = createSky(5);

/** A finished reduction of the set whose master is `kit`'s (or, without a kit, one with no sky coordinates). */
export async function makeComposableReduction(db: DbOrTx, setId: string, kit: KitSpec | null): Promise<string> {
  const [red] = await db.insert(reductions).values({ bracketSetId: setId, params: { registration: "sun", filter: "mgn", recoverResponse: false } }).returning();
  const prefix = buildReductionPrefix(setId, red.id);
  let measurements: Record<string, unknown> = { masterSize: { width: 100, height: 80 } };
  if (kit) {
    const { input } = renderMaster(sky, kit);
    await putObjectBytes({ bucket: bucketName("derived"), key: `${prefix}master.fits` }, Buffer.from(encodeSyntheticMaster(input, "2027-08-02T10:07:30.000")), "application/fits");
    measurements = { masterSize: { width: kit.width, height: kit.height }, sky: { sunCentrePx: { x: input.grid.sunX, y: input.grid.sunY }, sunRadiusPx: input.rsunArcsec / kit.scaleArcsecPerPx, plateScaleArcsecPerPx: kit.scaleArcsecPerPx } };
  }
  await db
    .update(reductions)
    .set({ state: "done", progress: 1, pipelineVersion: "test", finishedAt: new Date(), outputs: { prefix, master: `${prefix}master.fits` }, measurements })
    .where(eq(reductions.id, red.id));
  return red.id;
}
