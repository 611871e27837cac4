// A composite on a plate, through the real services: two observers' finished
// reductions (our synthetic corona through two kits, in the S3 fake) are
// composed by the worker; a curator makes a plate of the composite once both
// sets are approved, credits both photographers, publishes it, and the public
// reads each input's figures and the composite's files (tiles, preview,
// contribution map) at /iiif/composites/{id}, which stop answering once the
// plate is withdrawn.
import { eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { bracketSets, outboxMessages, sites } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { findComposite, startComposite } from "@/lib/composites/composites";
import { addPlateVersion, createDraftPlate, publishPlate, updatePlate, withdrawPlate } from "@/lib/plates/desk";
import { findDeskPlate } from "@/lib/plates/desk-view";
import { buildPlateManifest } from "@/lib/plates/iiif";
import { findPublicPlate, listPublishedPlates } from "@/lib/plates/public";
import { serveOutputFile } from "@/lib/reductions/files/serve";
import { closeWebJpegWriter } from "@/lib/plates/web-jpeg";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { makeComposableReduction, TEST_KITS } from "../support/composite-fixtures";
import { requireTestDatabase } from "../support/env";
import { waitFor } from "../support/wait";
import { createMember, createSetFor } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(async () => {
  await closeWebJpegWriter();
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

const tag = Date.now().toString(36);
let longOwner: Actor, shortOwner: Actor, curator: Actor, stranger: Actor;
let longSet: string, shortSet: string, longRed: string;
let compositeId = "";
let plateId = "";
let slug = "";
const source = () => ({ kind: "composite" as const, id: compositeId });

beforeAll(async () => {
  longOwner = await createMember(db, `Ines Okonkwo-Lund ${tag}`);
  shortOwner = await createMember(db, `Pavel Strand ${tag}`);
  stranger = await createMember(db, `Someone else ${tag}`);
  curator = await createMember(db, `Curator of plates ${tag}`, ["member", "curator"]);
  longSet = await createSetFor(db, longOwner, `Long lens ${tag}`);
  shortSet = await createSetFor(db, shortOwner, `Short lens ${tag}`);
  // Pavel keeps his site hidden: the plate must not show it, nor a country for the plate.
  const [short] = await db.select({ siteId: bracketSets.siteId }).from(bracketSets).where(eq(bracketSets.id, shortSet));
  await db.update(sites).set({ precision: "hidden" }).where(eq(sites.id, short.siteId));
  longRed = await makeComposableReduction(db, longSet, TEST_KITS[0]);
  const shortRed = await makeComposableReduction(db, shortSet, TEST_KITS[1]);
  const started = await startComposite(db, curator, { title: `Two observers ${tag}`, reductionIds: [longRed, shortRed] });
  compositeId = started.id;
  await waitFor("the composite", async () => {
    const c = await findComposite(db, curator, compositeId);
    if (c.state === "failed") throw new Error(`the composite failed: ${c.error}`);
    return c.state === "done" ? c : undefined;
  }, 120_000);
}, 180_000);

describe("a composite's plate", () => {
  it("is made only once every input's set is approved, crediting both photographers and whoever composed it", async () => {
    await expect(createDraftPlate(db, curator, { compositeId, renditions: ["natural"] })).rejects.toThrow(new RegExp(`must be approved on the review desk .*not yet: "Long lens ${tag}" \\(\\w+\\), "Short lens ${tag}" \\(\\w+\\)`));
    await expect(createDraftPlate(db, longOwner, { compositeId, renditions: ["natural"] })).rejects.toMatchObject({ code: "forbidden" });
    await expect(createDraftPlate(db, curator, { renditions: ["natural"] })).rejects.toMatchObject({ code: "invalid_input" });
    await db.update(bracketSets).set({ state: "approved" }).where(inArray(bracketSets.id, [longSet, shortSet]));
    const draft = await createDraftPlate(db, curator, { compositeId, renditions: ["natural", "structure"] });
    plateId = draft.id;
    slug = draft.slug;
    const desk = await findDeskPlate(db, curator, plateId);
    expect(desk.acquiredBy).toBe(`${longOwner.name} and ${shortOwner.name}`);
    expect(desk.processedBy).toMatch(new RegExp(`^${curator.name} \\(composite\\), Crownlight pipeline`));
    expect(desk.sourceKind).toBe("composite");
    expect(desk.composite?.sets.map((s) => s.name)).toEqual([`Long lens ${tag}`, `Short lens ${tag}`]);
    expect(desk.locations.map((l) => l.precision)).toEqual(["rounded", "hidden"]);
    expect(desk.image.renditions[0].tileSource).toBe(`/iiif/composites/${compositeId}/natural-iiif/info.json`);
    // The desk's viewer has the contribution map too, its legend naming each input's photographer in the composite's order.
    expect(desk.image.mapLayer?.url).toBe(`/iiif/composites/${compositeId}/contribution.jpg`);
    expect(desk.image.mapLayer?.legend.map((l) => l.label.split(":")[0])).toEqual([longOwner.name, shortOwner.name]);
    // A version of another kind is refused, naming what to choose.
    await expect(addPlateVersion(db, curator, plateId, { reductionId: longRed, renditions: ["natural"], changeNote: "A single reduction instead" })).rejects.toMatchObject({
      code: "invalid_input",
      fields: [expect.objectContaining({ field: "compositeId" })],
    });
  });

  it("keeps its files private while a draft: the composer and the photographers only", async () => {
    await expect(serveOutputFile(db, null, source(), "natural-iiif/info.json", { route: "public", download: false })).rejects.toMatchObject({ code: "not_found" });
    await expect(serveOutputFile(db, stranger, source(), "preview.jpg", { route: "public", download: false })).rejects.toMatchObject({ code: "not_found" });
    const own = await serveOutputFile(db, shortOwner, source(), "preview.jpg", { route: "public", download: false });
    expect(own.status).toBe(200);
    expect(own.headers.get("cache-control")).toMatch(/no-store/);
    await own.body?.cancel();
  });

  it("publishes with both photographers told, and shows each input to the public", async () => {
    await updatePlate(db, curator, plateId, {
      title: `Two observers ${tag}`,
      caption: "One corona from a long and a short lens at two sites; synthetic test data.",
      description: "",
      altText: "A dark Moon ringed by the corona, solar north up.",
      acquiredBy: `${longOwner.name} and ${shortOwner.name}`,
      processedBy: `${curator.name} (composite), Crownlight pipeline`,
      licence: "CC-BY-4.0",
      slug,
    });
    await publishPlate(db, curator, plateId);
    const told = await db.select({ to: outboxMessages.to }).from(outboxMessages).where(inArray(outboxMessages.to, [longOwner.email, shortOwner.email]));
    expect(told.map((m) => m.to).sort()).toEqual([longOwner.email, shortOwner.email].sort());

    const plate = await findPublicPlate(db, slug);
    expect(plate.source).toEqual(source());
    expect(plate.site.position).toBeNull();
    expect(plate.siteCountry).toBeNull();
    expect(plate.kit).toBeNull();
    expect(plate.renditionFiles.map((r) => r.iiifInfoUrl)).toEqual([`/iiif/composites/${compositeId}/natural-iiif/info.json`, `/iiif/composites/${compositeId}/structure-iiif/info.json`]);
    // North up, about the Sun: the grid's own geometry.
    expect(plate.geometry.solarNorthAngleDeg).toBe(0);
    expect(plate.geometry.plateScaleArcsecPerPx).toBeCloseTo(TEST_KITS[0].scaleArcsecPerPx, 6);
    const c = plate.composite!;
    expect(c.composedBy).toBe(curator.name);
    expect(c.contributionUrl).toBe(`/iiif/composites/${compositeId}/contribution.jpg`);
    expect(c.inputs.map((i) => i.photographer)).toEqual([longOwner.name, shortOwner.name]);
    expect(c.inputs[0].site.position).not.toBeNull();
    expect(c.inputs[1].site.position).toBeNull();
    expect(c.inputs.map((i) => i.plateScaleArcsecPerPx)).toEqual([16, 40]);
    // The long lens is the brightness reference; the short one's camera had 0.6 of its gain (composite-fixtures.ts).
    expect(c.inputs[0].isReference).toBe(true);
    expect(Math.abs(c.inputs[1].factors[0] * 0.6 - 1)).toBeLessThan(0.03);
    const shares = c.inputs.map((i) => i.weightShare ?? 0);
    expect(shares.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 3);
    expect(c.inputs.every((i) => /^#[0-9a-f]{6}$/i.test(i.colour ?? ""))).toBe(true);

    const cards = await listPublishedPlates(db, { q: tag });
    expect(cards.plates.find((p) => p.slug === slug)?.previewUrl).toBe(`/iiif/composites/${compositeId}/preview.jpg`);
    const manifest = JSON.stringify(buildPlateManifest(plate, "https://crownlight.example", "credit"));
    expect(manifest).toContain(`https://crownlight.example/iiif/composites/${compositeId}/natural-iiif`);
    expect(manifest).toContain(`"Composed from"]},"value":{"en":["${longOwner.name}; ${shortOwner.name}"]}`);
  });

  it("serves the published composite's tiles, preview and map to anyone, and nothing else", async () => {
    const info = await serveOutputFile(db, null, source(), "natural-iiif/info.json", { route: "public", download: false });
    expect(info.status).toBe(200);
    expect(info.headers.get("cache-control")).toMatch(/public/);
    // The pyramid names the public route, so that any IIIF viewer fetches its tiles there.
    const body = (await info.json()) as { id?: string; "@id"?: string };
    expect(body.id ?? body["@id"]).toMatch(new RegExp(`/iiif/composites/${compositeId}/natural-iiif$`));
    const map = await serveOutputFile(db, null, source(), "contribution.jpg", { route: "public", download: false });
    expect(map.headers.get("content-type")).toBe("image/jpeg");
    expect(Buffer.from(await map.arrayBuffer()).subarray(0, 2)).toEqual(Buffer.from([0xff, 0xd8]));
    await expect(serveOutputFile(db, null, source(), "report.json", { route: "public", download: false })).rejects.toMatchObject({ code: "not_found" });
    // The contribution map is a composite's alone.
    await expect(serveOutputFile(db, null, { kind: "reduction", id: longRed }, "contribution.jpg", { route: "public", download: false })).rejects.toMatchObject({ code: "not_found" });
  });

  it("stops serving the files to the public once withdrawn", async () => {
    await withdrawPlate(db, curator, plateId, { reason: "A question about the data", kind: "temporary" });
    await expect(serveOutputFile(db, null, source(), "natural-iiif/info.json", { route: "public", download: false })).rejects.toMatchObject({ code: "not_found" });
    const plate = await findPublicPlate(db, slug);
    expect(plate.renditionFiles).toEqual([]);
    expect(plate.composite?.inputs).toHaveLength(2);
  });
});
