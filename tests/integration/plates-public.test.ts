// What the public sees of plates, against the real database, S3 fake and app:
// drafts and withdrawn plates never reach the gallery queries, a withdrawn
// plate keeps its page without images, positions are never finer than the
// site's precision, and a reduction's tiles are public only while a published
// plate shows it.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { bracketSets, plates, reductions, sites } from "@/db/schema";
import { createPlateFromReduction } from "@/lib/plates/publish";
import { findPublicPlate, listPublishedPlates } from "@/lib/plates/public";
import { bucketName, putObjectBytes, buildReductionPrefix } from "@/lib/storage";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "@/db/seed/people";
import { APP, requireTestDatabase } from "../support/env";
import { Client } from "../support/http";
import { createMember, createSetFor } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(async () => closeDb());

const tag = Date.now().toString(36);
const slugs = { exact: `luxor-exact-${tag}`, rounded: `cadiz-rounded-${tag}`, hidden: `ship-hidden-${tag}`, draft: `draft-${tag}`, withdrawn: `withdrawn-${tag}` };
let draftReductionId = "";
let publicReductionId = "";

/** A finished reduction whose report and pyramid descriptors are in the S3 fake. */
async function finishedReduction(setId: string): Promise<string> {
  const [red] = await db.insert(reductions).values({ bracketSetId: setId, params: { registration: "sun", filter: "mgn", recoverResponse: false } }).returning();
  const prefix = buildReductionPrefix(setId, red.id);
  const put = (key: string, value: unknown) => putObjectBytes({ bucket: bucketName("derived"), key: prefix + key }, Buffer.from(JSON.stringify(value)), "application/json");
  await put("report.json", {
    frames: [{ exposure: { seconds: 0.01 }, captureTimeUtc: "2027-08-02T10:04:40.000Z" }],
    overall: { masterSize: { width: 400, height: 300 }, moonCentrePx: { x: 200, y: 150 }, moonRadiusPx: 40, sky: { sunCentrePx: { x: 199, y: 151 }, sunRadiusPx: 39, solarNorthAngleDeg: 12, plateScaleArcsecPerPx: 24 } },
  });
  for (const r of ["natural", "structure"]) await put(`tiles/${r}-iiif/info.json`, { width: 400, height: 300 });
  await db
    .update(reductions)
    .set({ state: "done", progress: 1, pipelineVersion: "test", outputs: { prefix, report: `${prefix}report.json`, tiles: `${prefix}tiles/` } })
    .where(eq(reductions.id, red.id));
  return red.id;
}

async function plateFor(precision: "exact" | "rounded" | "hidden", slug: string, publish: boolean): Promise<string> {
  const owner = await createMember(db, `Plate owner ${slug}`);
  const setId = await createSetFor(db, owner, `Set ${slug}`);
  const [set] = await db.select({ siteId: bracketSets.siteId }).from(bracketSets).where(eq(bracketSets.id, setId));
  await db.update(sites).set({ latDeg: 25.68734, lonDeg: 32.63921, precision }).where(eq(sites.id, set.siteId));
  const reductionId = await finishedReduction(setId);
  await createPlateFromReduction(db, {
    reductionId,
    slug,
    title: `Plate ${slug}`,
    caption: "Test plate",
    description: "",
    altText: "A test image",
    acquiredBy: owner.name,
    processedBy: "Crownlight pipeline (test)",
    licence: "CC-BY-4.0",
    renditions: ["natural", "structure"],
    publish,
    createdBy: null,
  });
  return reductionId;
}

beforeAll(async () => {
  publicReductionId = await plateFor("exact", slugs.exact, true);
  await plateFor("rounded", slugs.rounded, true);
  await plateFor("hidden", slugs.hidden, true);
  draftReductionId = await plateFor("exact", slugs.draft, false);
  await plateFor("exact", slugs.withdrawn, true);
  await db.update(plates).set({ state: "withdrawn", withdrawnAt: new Date(), withdrawnReason: "Rights question under review" }).where(eq(plates.slug, slugs.withdrawn));
}, 60_000);

describe("public plate queries", () => {
  it("list published plates only", async () => {
    const listed = new Set<string>();
    let cursor: string | undefined;
    do {
      const page = await listPublishedPlates(db, { cursor, limit: 2 });
      page.plates.forEach((p) => listed.add(p.slug));
      cursor = page.nextCursor ?? undefined;
    } while (cursor);
    expect(listed.has(slugs.exact) && listed.has(slugs.rounded) && listed.has(slugs.hidden)).toBe(true);
    expect(listed.has(slugs.draft)).toBe(false);
    expect(listed.has(slugs.withdrawn)).toBe(false);
  });

  it("do not find a draft, and show a withdrawn plate's record without its images", async () => {
    await expect(findPublicPlate(db, slugs.draft)).rejects.toMatchObject({ code: "not_found" });
    const w = await findPublicPlate(db, slugs.withdrawn);
    expect(w.withdrawn).toMatchObject({ reason: "Rights question under review" });
    expect(w.renditionFiles).toEqual([]);
    expect(w.downloads).toEqual([]);
    expect(w.title).toBe(`Plate ${slugs.withdrawn}`);
  });

  it("never give a position finer than the site's precision", async () => {
    expect((await findPublicPlate(db, slugs.exact)).site.position).toMatchObject({ latDeg: 25.68734, lonDeg: 32.63921 });
    const rounded = (await findPublicPlate(db, slugs.rounded)).site.position;
    expect(rounded?.precision).toBe("rounded");
    // Rounded sites snap to 0.1 degree (lib/sites/precision.ts).
    expect(Math.abs((rounded?.latDeg ?? 0) * 10 - Math.round((rounded?.latDeg ?? 0) * 10))).toBeLessThan(1e-9);
    expect(rounded?.latDeg).not.toBe(25.68734);
    expect((await findPublicPlate(db, slugs.hidden)).site.position).toBeNull();
    const cards = (await listPublishedPlates(db, { q: tag, limit: 60 })).plates;
    expect(cards.find((c) => c.slug === slugs.hidden)?.sitePosition).toBeNull();
    // Only the exact site's card carries the full coordinates.
    expect(JSON.stringify(cards.find((c) => c.slug === slugs.exact))).toContain("25.68734");
    const others = JSON.stringify(cards.filter((c) => c.slug !== slugs.exact));
    expect(others).not.toContain("25.68734");
    expect(others).not.toContain("32.63921");
  });

  it("answer the same through the gallery API", async () => {
    const res = await fetch(`${APP}/api/plates?q=${tag}`);
    expect(res.status).toBe(200);
    const body = (await res.json()) as { plates: { slug: string }[] };
    expect(body.plates.map((p) => p.slug).sort()).toEqual([slugs.exact, slugs.hidden, slugs.rounded].sort());
    expect((await fetch(`${APP}/api/plates?rendition=sepia`)).status).toBe(400);
  });

  it("serve a published plate's tiles to anyone, cacheable, and a draft's to no visitor", async () => {
    const pub = await fetch(`${APP}/iiif/reductions/${publicReductionId}/natural-iiif/info.json`);
    expect(pub.status).toBe(200);
    // A withdrawal must leave shared caches within minutes: revalidated after 5 minutes, by entity tag.
    expect(pub.headers.get("cache-control")).toBe("public, max-age=300, must-revalidate");
    const etag = pub.headers.get("etag");
    expect(etag).toBeTruthy();
    const again = await fetch(`${APP}/iiif/reductions/${publicReductionId}/natural-iiif/info.json`, { headers: { "if-none-match": etag! } });
    expect(again.status).toBe(304);
    expect(again.headers.get("cache-control")).toBe("public, max-age=300, must-revalidate");
    expect(pub.headers.get("access-control-allow-origin")).toBe("*");
    expect((await fetch(`${APP}/iiif/reductions/${draftReductionId}/natural-iiif/info.json`)).status).toBe(404);
    expect((await fetch(`${APP}/iiif/reductions/${publicReductionId}/report.json`)).status).toBe(404);
    const manifest = await fetch(`${APP}/iiif/plates/${slugs.exact}/manifest.json`);
    expect(manifest.status).toBe(200);
    expect(((await manifest.json()) as { type: string }).type).toBe("Manifest");
    expect((await fetch(`${APP}/iiif/plates/${slugs.draft}/manifest.json`)).status).toBe(404);
    expect((await fetch(`${APP}/iiif/plates/${slugs.withdrawn}/manifest.json`)).status).toBe(404);
    expect((await fetch(`${APP}/plates/${slugs.withdrawn}`)).status).toBe(200);
    expect((await fetch(`${APP}/plates/${slugs.draft}`)).status).toBe(404);
  });

  it("stop serving a plate's files as soon as it is withdrawn, and serve them again as soon as it is restored", async () => {
    const curator = new Client();
    await curator.signIn(DEMO_PEOPLE.find((p) => p.roles.includes("curator"))!.email, DEMO_PASSWORD);
    const [plate] = await db.select({ id: plates.id }).from(plates).where(eq(plates.slug, slugs.exact));
    const tile = `${APP}/iiif/reductions/${publicReductionId}/natural-iiif/info.json`;
    expect((await fetch(tile)).status).toBe(200);
    expect((await curator.json(`/api/review/plates/${plate.id}/withdraw`, { reason: "Checking the credits", kind: "temporary" })).status).toBe(200);
    const gone = await fetch(tile);
    expect(gone.status).toBe(404);
    // No cache may keep the refusal either.
    expect(gone.headers.get("cache-control")).toBe("no-store");
    expect((await curator.json(`/api/review/plates/${plate.id}/restore`, {})).status).toBe(200);
    // Not after the 5 s the route remembers a reduction's access: at once.
    expect((await fetch(tile)).status).toBe(200);
  });
});
