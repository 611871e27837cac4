// Published plates whose reductions exist only as the files an export reads:
// a 16-bit RGB rendition 1600 x 1200 px (both renditions), and a report.json
// with or without sky geometry. Test data, invented for the tests.
import { eq } from "drizzle-orm";
import sharp from "sharp";
import type { Db } from "@/db/client";
import { kits, plates, plateVersions, reductions, sites, users, type LocationPrecision } from "@/db/schema";
import { DEMO_PEOPLE } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { createBracketSet } from "@/lib/bracket-sets/bracket-sets";
import { bucketName, putObjectBytes } from "@/lib/storage";
import { ECLIPSE_ID } from "./bracket-upload-helpers";

export const person = (role: string) => DEMO_PEOPLE.find((p) => (role === "member" ? p.roles.join() === "member" : p.roles.includes(role as never)))!;

export const SKY = {
  sunCentrePx: { x: 800, y: 600 },
  plateScaleArcsecPerPx: 2.0,
  northAngleDeg: 30,
  moonSilhouetteUtc: "2027-08-02T10:43:00.000Z",
  observer: { latDeg: 25.7, lonDeg: 32.65, elevationM: 80 },
};

/** A 16-bit RGB rendition 1600 x 1200 with a dark disk and a bright surround. */
export async function renditionPng(): Promise<Buffer> {
  const w = 1600;
  const h = 1200;
  const px = new Uint16Array(w * h * 3);
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++) {
      const r = Math.hypot(x - 800, y - 600);
      const v = r < 200 ? 500 : Math.min(65535, Math.round(65535 * (200 / r) ** 2.5));
      const i = (y * w + x) * 3;
      px[i] = v;
      px[i + 1] = Math.round(v * 0.95);
      px[i + 2] = Math.round(v * 0.9);
    }
  return sharp(Buffer.from(px.buffer), { raw: { width: w, height: h, channels: 3 } }).toColourspace("rgb16").png().toBuffer();
}

/** A published plate of the demo member's, numbered n within the tag. */
export async function makeExportablePlate(db: Db, tag: string, n: number, precision: LocationPrecision, withSky: boolean, withKit: boolean): Promise<string> {
  const [owner] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, person("member").email)).limit(1);
  const [site] = await db.insert(sites).values({ ownerId: owner.id, name: `Export site ${tag} ${n}`, kind: "fixed", latDeg: 25.7, lonDeg: 32.65, elevationM: 80, precision }).returning({ id: sites.id });
  const kitId = withKit
    ? (
        await db
          .insert(kits)
          .values({ ownerId: owner.id, name: "Kestrel 500 mm refractor", camera: "Halden M26 mono", sensorWidthMm: 23.5, sensorHeightMm: 15.6, pixelPitchUm: 3.76, focalMm: 500, fNumber: 6.3, mount: "equatorial" })
          .returning({ id: kits.id })
      )[0].id
    : null;
  const ownerActor: Actor = { userId: owner.id, email: person("member").email, name: owner.name, roles: ["member"] };
  const set = await createBracketSet(db, ownerActor, { name: `Export set ${tag} ${n}`, eclipseId: ECLIPSE_ID, siteId: site.id, kitId, notes: "", clockOffsetS: 0 });
  const prefix = `test-exports/${tag}/${n}/`;
  const png = await renditionPng();
  for (const r of ["natural", "structure"]) await putObjectBytes({ bucket: bucketName("derived"), key: `${prefix}${r}.png` }, png, "image/png");
  const report = { overall: { masterSize: { width: 1600, height: 1200 }, ...(withSky ? { sky: SKY } : {}) } };
  await putObjectBytes({ bucket: bucketName("derived"), key: `${prefix}report.json` }, Buffer.from(JSON.stringify(report)), "application/json");
  const [red] = await db
    .insert(reductions)
    .values({ bracketSetId: set.id, params: { registration: "sun", filter: "mgn", recoverResponse: false }, state: "done", progress: 1, outputs: { prefix } })
    .returning({ id: reductions.id });
  const [plate] = await db
    .insert(plates)
    .values({
      slug: `export-${tag}-${n}`,
      bracketSetId: set.id,
      eclipseId: ECLIPSE_ID,
      state: "published",
      title: `Export plate ${n} — Łódź ${tag}`,
      caption: `Inner corona over the west bank, plate ${n}.`,
      altText: `A black disk ringed by pale streamers, plate ${n}.`,
      acquiredBy: owner.name,
      processedBy: "Tomasz Wielgosz",
      licence: "CC-BY-4.0",
      publishedAt: new Date(),
    })
    .returning({ id: plates.id });
  await db.insert(plateVersions).values({
    plateId: plate.id,
    version: 1,
    reductionId: red.id,
    renditions: ["natural", "structure"],
    imageSizes: { natural: { width: 1600, height: 1200 }, structure: { width: 1600, height: 1200 } },
    geometry: {},
    facts: { exposuresS: [0.002, 0.008, 0.5], captureStartUtc: "2027-08-02T10:42:55.000Z", captureEndUtc: "2027-08-02T10:43:10.000Z", moonSilhouetteUtc: null, referenceFrame: null, dynamicRangeStops: null, masterSize: { width: 1600, height: 1200 } },
  });
  return plate.id;
}

