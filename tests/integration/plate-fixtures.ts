// A finished reduction as the plate desk reads it: report, pyramid descriptors
// and a small preview in the S3 fake, no real pipeline run.
import { eq } from "drizzle-orm";
import sharp from "sharp";
import type { Db } from "@/db/client";
import { reductions } from "@/db/schema";
import { bucketName, putObjectBytes, buildReductionPrefix } from "@/lib/storage";

export async function makeFinishedReduction(db: Db, forSet: string, shade: number, requestedBy: string | null = null): Promise<string> {
  const [red] = await db.insert(reductions).values({ bracketSetId: forSet, requestedBy, params: { registration: "sun", filter: "mgn", recoverResponse: false } }).returning();
  const prefix = buildReductionPrefix(forSet, red.id);
  const ref = (key: string) => ({ bucket: bucketName("derived"), key: prefix + key });
  const putJson = (key: string, value: unknown) => putObjectBytes(ref(key), Buffer.from(JSON.stringify(value)), "application/json");
  await putJson("report.json", {
    frames: [{ exposure: { seconds: 0.004 }, captureTimeUtc: "2027-08-02T10:05:10.000Z" }],
    overall: { masterSize: { width: 64, height: 48 }, sky: { sunCentrePx: { x: 32, y: 24 }, sunRadiusPx: 10, plateScaleArcsecPerPx: 90 } },
  });
  for (const r of ["natural", "structure"]) await putJson(`tiles/${r}-iiif/info.json`, { width: 64, height: 48 });
  const preview = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: shade, g: shade, b: shade } } })
    .jpeg()
    .toBuffer();
  await putObjectBytes(ref("preview.jpg"), preview, "image/jpeg");
  await db
    .update(reductions)
    .set({ state: "done", progress: 1, pipelineVersion: "0.9.0-test", finishedAt: new Date(), outputs: { prefix, report: `${prefix}report.json`, tiles: `${prefix}tiles/` } })
    .where(eq(reductions.id, red.id));
  return red.id;
}
