// Members' kits and sites through the services the forms call: bad input is
// refused with the field named and nothing saved; members see only their own.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { insertRole } from "@/db/queries/roles";
import { kits, sites, users } from "@/db/schema";
import type { Actor } from "@/lib/auth/actor";
import { AppError } from "@/lib/errors";
import { createKit, findKit, kitInputSchema, listKits } from "@/lib/kits/kits";
import { createSite, listSites, siteEditSchema, siteInputSchema, updateSite, type SiteChange } from "@/lib/sites/sites";
import { parseInput } from "@/lib/validation";
import { requireTestDatabase } from "../support/env";

requireTestDatabase();
const db = getDb();
afterAll(closeDb);

async function member(name: string): Promise<Actor> {
  const id = randomUUID();
  await db.insert(users).values({ id, name, email: `${id}@kits-test.example`, emailVerified: true });
  await insertRole(db, id, "member", null);
  return { userId: id, email: `${id}@kits-test.example`, name, roles: ["member"] };
}

let alice: Actor;
let bruno: Actor;
beforeAll(async () => {
  alice = await member("Alice");
  bruno = await member("Bruno");
});

function fieldsOf(fn: () => unknown): string[] {
  try {
    fn();
  } catch (err) {
    expect(err).toBeInstanceOf(AppError);
    return (err as AppError).fields.map((f) => f.field).sort();
  }
  throw new Error("accepted");
}

const KIT_FORM = {
  name: "Long lens",
  camera: "Mirrorless body",
  sensorWidthMm: "35.9",
  sensorHeightMm: "23.9",
  pixelPitchUm: "5.9",
  focalMm: "600",
  teleconverter: "1.4",
  fNumber: "6.3",
  mount: "equatorial",
  flipHorizontal: "on",
};

describe("kits", () => {
  it("refuses a zero focal length and a negative pitch, naming both fields", () => {
    expect(fieldsOf(() => parseInput(kitInputSchema, { ...KIT_FORM, focalMm: "0", pixelPitchUm: "-3" }))).toEqual(["focalMm", "pixelPitchUm"]);
  });

  it("coerces form strings and saves the kit for its owner only", async () => {
    const kit = await createKit(db, alice, parseInput(kitInputSchema, KIT_FORM));
    expect(kit.focalMm).toBe(600);
    expect(kit.flipHorizontal).toBe(true);
    expect(kit.flipVertical).toBe(false);
    expect((await listKits(db, alice)).map((k) => k.id)).toContain(kit.id);
    expect(await listKits(db, bruno)).toHaveLength(0);
    await expect(findKit(db, bruno, kit.id)).rejects.toMatchObject({ code: "not_found" });
    await expect(findKit(db, null, kit.id)).rejects.toMatchObject({ code: "unauthenticated" });
  });

  it("keeps the database's own guard when a caller skips validation", async () => {
    await expect(
      db.insert(kits).values({ ownerId: alice.userId, name: "x", camera: "x", sensorWidthMm: 1, sensorHeightMm: 1, pixelPitchUm: 1, focalMm: 0, fNumber: 1, mount: "alt-az" }),
    ).rejects.toSatisfy((e: unknown) => (e as { cause?: { constraint?: string } }).cause?.constraint === "kits_positive_optics");
  });
});

describe("sites", () => {
  it("refuses an invalid latitude with the field named, and saves nothing", async () => {
    const before = (await listSites(db, alice)).length;
    expect(fieldsOf(() => parseInput(siteInputSchema, { name: "Pole", kind: "fixed", latDeg: "91.5", lonDeg: "10" }))).toEqual(["latDeg"]);
    expect((await listSites(db, alice)).length).toBe(before);
  });

  it("refuses a track file with no timestamps, naming the file and the line, and saves nothing", async () => {
    const csv = "lat,lon\n34.60,11.40\n34.61,11.42\n";
    const input = parseInput(siteInputSchema, { name: "Ship", kind: "moving", trackFileName: "deck.csv", trackText: csv, precision: "rounded" });
    const err = await createSite(db, alice, input).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect(err.message).toMatch(/^deck\.csv: /);
    expect(err.message).toMatch(/time/);
    expect(err.fields[0].field).toBe("trackText");
    const rows = await db.select().from(sites).where(eq(sites.ownerId, alice.userId));
    expect(rows.filter((r) => r.kind === "moving")).toHaveLength(0);
  });

  it("saves a moving site from a GPX track and starts it at the first point", async () => {
    const gpx = `<?xml version="1.0"?><gpx version="1.1"><trk><trkseg>
      <trkpt lat="34.60" lon="11.40"><time>2027-08-02T08:00:00Z</time></trkpt>
      <trkpt lat="34.62" lon="11.45"><time>2027-08-02T10:00:00Z</time></trkpt>
    </trkseg></trk></gpx>`;
    const site = await createSite(db, alice, parseInput(siteInputSchema, { name: "Ship", kind: "moving", trackFileName: "ship.gpx", trackText: gpx }));
    expect(site).toMatchObject({ kind: "moving", trackPoints: 2, latDeg: 34.6, lonDeg: 11.4, precision: "rounded" });
    expect(await listSites(db, bruno)).toHaveLength(0);
  });

  it("lets the owner edit a site's public label and precision, keeping a moving site's track; nobody else", async () => {
    const ship = (await listSites(db, alice)).find((x) => x.name === "Ship")!;
    const edit = parseInput(siteEditSchema, { id: ship.id, name: "Ship, deck 6", publicLabel: "Gulf of Gabes", kind: "moving", precision: "hidden" });
    const { id, ...change } = edit;
    const saved = await updateSite(db, alice, id, change as SiteChange);
    expect(saved).toMatchObject({ name: "Ship, deck 6", publicLabel: "Gulf of Gabes", precision: "hidden", trackPoints: 2, trackFileName: "ship.gpx" });
    await expect(updateSite(db, bruno, id, change as SiteChange)).rejects.toMatchObject({ code: "not_found" });
    // A fixed site cannot become moving without a track.
    const fixed = await createSite(db, alice, parseInput(siteInputSchema, { name: "Roof", kind: "fixed", latDeg: "25.69", lonDeg: "32.64" }));
    const toMoving = parseInput(siteEditSchema, { id: fixed.id, name: "Roof", kind: "moving", precision: "rounded" });
    await expect(updateSite(db, alice, fixed.id, { ...toMoving } as SiteChange)).rejects.toMatchObject({ code: "invalid_input", fields: [{ field: "trackText" }] });
    expect((await listSites(db, alice)).find((x) => x.id === fixed.id)).toMatchObject({ kind: "fixed", latDeg: 25.69 });
    // A public label is plain text of at most 80 characters.
    expect(fieldsOf(() => parseInput(siteEditSchema, { id: fixed.id, name: "Roof", kind: "fixed", latDeg: "25.69", lonDeg: "32.64", publicLabel: "x".repeat(81) }))).toEqual(["publicLabel"]);
  });
});
