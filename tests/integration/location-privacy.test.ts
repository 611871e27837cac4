// A site's place reaches the public only at its precision. For a rounded and a
// hidden site, every public answer about a published plate (its page, the
// gallery and its API, the eclipse page, the IIIF manifest and collection, the
// tiles' info, the preview, the web JPEG, the master FITS) is scanned for the
// exact coordinates, the private name and (hidden) the country and the label;
// the public master.fits header is read back with astropy. The exact master
// stays with the owner, on the reduction's private files route.
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { eq } from "drizzle-orm";
import exifr from "exifr";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { bracketSets, reductions, sites, users } from "@/db/schema";
import { encodeFits } from "@/lib/media";
import { createPlateFromReduction } from "@/lib/plates/publish";
import { buildHelioWcsCards, computeObsGeoM } from "@/lib/reduction-runner/helio-wcs";
import { bucketName, putObjectBytes, buildReductionPrefix } from "@/lib/storage";
import { APP, requireTestDatabase } from "../support/env";
import { Client } from "../support/http";
import { runPython } from "../unit/media/python-reference";
import { createSetFor } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
const tag = Date.now().toString(36);
let dir = "";
afterAll(async () => {
  await closeDb();
  if (dir) await rm(dir, { recursive: true, force: true });
});

// Invented test site: a private name that must never be shown, and a place given to 5 decimals.
const EXACT = { latDeg: 25.68734, lonDeg: 32.63921, elevationM: 81 };
const PRIVATE_NAME = `Car park behind the Moonrise guesthouse ${tag}`;
const PUBLIC_LABEL = `Luxor west bank ${tag}`;
const GEO = computeObsGeoM(EXACT);
/** Any text of the exact place: degrees to two decimals or more, and the Earth-centred metres. */
const EXACT_TEXTS = ["25.68", "25.69", "32.63", "32.64", String(Math.round(GEO.x)), String(Math.round(GEO.y)), String(Math.round(GEO.z))];
const MASTER_PIXELS = Float32Array.from({ length: 40 * 30 }, (_, i) => (i % 97) * 0.25);

interface Case {
  precision: "rounded" | "hidden";
  slug: string;
  reductionId: string;
  owner: Client;
}
const cases: Record<"rounded" | "hidden", Case> = {
  rounded: { precision: "rounded", slug: `privacy-rounded-${tag}`, reductionId: "", owner: new Client() },
  hidden: { precision: "hidden", slug: `privacy-hidden-${tag}`, reductionId: "", owner: new Client() },
};

/** The stored outputs of a finished reduction at the exact site, as the worker writes them. */
async function storeReduction(setId: string): Promise<string> {
  const [red] = await db.insert(reductions).values({ bracketSetId: setId, params: { registration: "sun", filter: "mgn", recoverResponse: false } }).returning();
  const prefix = buildReductionPrefix(setId, red.id);
  const put = (key: string, bytes: Uint8Array, type: string) => putObjectBytes({ bucket: bucketName("derived"), key: prefix + key }, Buffer.from(bytes), type);
  const json = (key: string, value: unknown) => put(key, Buffer.from(JSON.stringify(value)), "application/json");
  await json("report.json", {
    frames: [{ exposure: { seconds: 0.01 }, captureTimeUtc: "2027-08-02T10:04:40.000Z" }],
    overall: { masterSize: { width: 40, height: 30 }, sky: { sunCentrePx: { x: 20, y: 15 }, plateScaleArcsecPerPx: 24, northAngleDeg: 0, moonSilhouetteUtc: "2027-08-02T10:04:40.000Z", observer: EXACT } },
  });
  for (const r of ["natural", "structure"]) await json(`tiles/${r}-iiif/info.json`, { width: 40, height: 30 });
  await put("preview.jpg", await sharp({ create: { width: 40, height: 30, channels: 3, background: "#203040" } }).jpeg().toBuffer(), "image/jpeg");
  const wcs = buildHelioWcsCards(
    { sunCentrePx: { x: 20, y: 15 }, plateScaleArcsecPerPx: 24, northAngleDeg: 10, pAngleDeg: 14, rsunObsArcsec: 945.7654, dsunObsM: 151_789_123_456, observer: EXACT, moonSilhouetteMs: Date.UTC(2027, 7, 2, 10, 4, 40) },
    Date.UTC(2027, 7, 2, 10, 4, 40),
  );
  await put("master.fits", encodeFits({ width: 40, height: 30, planes: [MASTER_PIXELS], cards: wcs }), "application/fits");
  await db.update(reductions).set({ state: "done", progress: 1, pipelineVersion: "test", outputs: { prefix, report: `${prefix}report.json`, tiles: `${prefix}tiles/` } }).where(eq(reductions.id, red.id));
  return red.id;
}

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), "crownlight-privacy-"));
  for (const c of Object.values(cases)) {
    // A password account so the owner can sign in and fetch the exact master.
    const name = `Privacy owner ${c.precision} ${tag}`;
    const email = `privacy-${c.precision}-${tag}@kestrel-ridge.example`;
    const signUp = await c.owner.json("/api/auth/sign-up/email", { email, password: `corona-${tag}-streamer`, name });
    expect(signUp.status).toBe(200);
    const [u] = await db.update(users).set({ emailVerified: true }).where(eq(users.email, email)).returning({ id: users.id });
    const setId = await createSetFor(db, { userId: u.id, email, name, roles: ["member"] });
    const [set] = await db.select({ siteId: bracketSets.siteId }).from(bracketSets).where(eq(bracketSets.id, setId));
    await db.update(sites).set({ ...EXACT, name: PRIVATE_NAME, publicLabel: PUBLIC_LABEL, precision: c.precision }).where(eq(sites.id, set.siteId));
    c.reductionId = await storeReduction(setId);
    await createPlateFromReduction(db, {
      reductionId: c.reductionId,
      slug: c.slug,
      title: `Privacy plate ${c.precision} ${tag}`,
      caption: "Test plate",
      description: "",
      altText: "A test image",
      acquiredBy: name,
      processedBy: "Crownlight pipeline (test)",
      licence: "CC-BY-4.0",
      renditions: ["natural", "structure"],
      publish: true,
      createdBy: null,
    });
    await c.owner.signIn(email, `corona-${tag}-streamer`);
  }
}, 120_000);

/** Every public text answer about the plate. */
async function publicTexts(c: Case): Promise<Record<string, string>> {
  const paths = [
    `/plates/${c.slug}`,
    `/plates/${c.slug}/v/1`,
    `/gallery?q=${tag}`,
    `/api/plates?q=${tag}`,
    `/eclipses/2027-08-02`,
    `/iiif/plates/${c.slug}/manifest.json`,
    `/iiif/plates/${c.slug}/v/1/manifest.json`,
    `/iiif/eclipses/2027-08-02/collection.json`,
    `/iiif/reductions/${c.reductionId}/natural-iiif/info.json`,
    `/iiif/reductions/${c.reductionId}/structure-iiif/info.json`,
  ];
  const out: Record<string, string> = {};
  for (const p of paths) {
    const res = await fetch(APP + p);
    expect(res.status, p).toBe(200);
    out[p] = await res.text();
  }
  return out;
}

/** Every public file's bytes read as text (their metadata included), and their EXIF GPS, if any. */
async function publicFiles(c: Case): Promise<{ texts: Record<string, string>; gps: Record<string, unknown> }> {
  const texts: Record<string, string> = {};
  const gps: Record<string, unknown> = {};
  for (const p of [`/iiif/reductions/${c.reductionId}/preview.jpg`, `/api/plates/${c.slug}/web-jpeg`, `/iiif/reductions/${c.reductionId}/master.fits`]) {
    const res = await fetch(APP + p);
    expect(res.status, p).toBe(200);
    const bytes = Buffer.from(await res.arrayBuffer());
    texts[p] = bytes.toString("latin1");
    if (p.endsWith(".jpg") || p.endsWith("web-jpeg")) gps[p] = await exifr.gps(bytes).catch(() => undefined);
  }
  return { texts, gps };
}

const HEADER_SCRIPT = `
import sys, json, warnings
warnings.simplefilter("ignore")
import numpy as np
from astropy.io import fits
from astropy.coordinates import EarthLocation
import astropy.units as u
with fits.open(sys.argv[1]) as hdul:
    hdul.verify("exception")
    h = hdul[0].header
    out = {"keys": list(h.keys()), "comments": [str(c) for c in h.get("COMMENT", [])], "locprec": h.get("LOCPREC"),
           "dsun": h.get("DSUN_OBS"), "rsun": h.get("RSUN_OBS"),
           "wcs": {k: h.get(k) for k in ["CTYPE1", "CTYPE2", "CRPIX1", "CRPIX2", "CDELT1", "CDELT2", "PC1_1", "PC1_2", "PC2_1", "PC2_2", "CRVAL1", "CRVAL2", "DATE-OBS"]},
           "dataSum": float(np.asarray(hdul[0].data, dtype=np.float64).sum())}
    if "OBSGEO-X" in h:
        loc = EarthLocation.from_geocentric(h["OBSGEO-X"], h["OBSGEO-Y"], h["OBSGEO-Z"], unit=u.m)
        g = loc.to_geodetic("WGS84")
        out["geodetic"] = [float(g.lat.deg), float(g.lon.deg), float(g.height.to(u.m).value)]
    print(json.dumps(out))
`;

interface HeaderReading {
  keys: string[];
  comments: string[];
  locprec: string | null;
  dsun: number;
  rsun: number;
  wcs: Record<string, unknown>;
  dataSum: number;
  geodetic?: [number, number, number];
}

async function readHeader(name: string, bytes: ArrayBuffer): Promise<HeaderReading> {
  const path = join(dir, name);
  await writeFile(path, Buffer.from(bytes));
  return JSON.parse(runPython(HEADER_SCRIPT, [path], ["astropy", "numpy"]).trim()) as HeaderReading;
}

describe("a rounded site in public", () => {
  const c = cases.rounded;

  it("shows the public label and the place rounded to 0.1 degree, never the private name or the exact place", async () => {
    const texts = { ...(await publicTexts(c)), ...(await publicFiles(c)).texts };
    for (const [where, text] of Object.entries(texts)) {
      for (const exact of EXACT_TEXTS) expect(text.includes(exact), `${where} holds ${exact}`).toBe(false);
      expect(text.includes(PRIVATE_NAME), `${where} holds the private name`).toBe(false);
    }
    expect(texts[`/plates/${c.slug}`]).toContain(PUBLIC_LABEL);
    expect(texts[`/plates/${c.slug}`]).toMatch(/25\.7(<!-- -->)?°/);
    expect(texts[`/plates/${c.slug}`]).toMatch(/32\.6(<!-- -->)?°/);
    expect(texts[`/iiif/plates/${c.slug}/manifest.json`]).toContain(`${PUBLIC_LABEL}, Egypt (25.7°, 32.6°, rounded to about 10 km)`);
  });

  it("puts no GPS in its JPEGs", async () => {
    const { gps } = await publicFiles(c);
    for (const [where, g] of Object.entries(gps)) expect(g, where).toBeFalsy();
  });

  it("serves a master whose observer astropy finds on the 0.1 degree grid, with the same WCS and pixels as the exact master", async () => {
    const pub = await fetch(`${APP}/iiif/reductions/${c.reductionId}/master.fits`);
    const publicBytes = await pub.arrayBuffer();
    // The length announced is the rewritten file's (the server may compress and drop it instead).
    const announced = pub.headers.get("content-length");
    if (announced !== null && !pub.headers.get("content-encoding")) expect(Number(announced)).toBe(publicBytes.byteLength);
    expect(publicBytes.byteLength % 2880).toBe(0);
    const shown = await readHeader("rounded-public.fits", publicBytes);
    const exact = await c.owner.request(`/api/reductions/${c.reductionId}/files/master.fits`);
    expect(exact.status).toBe(200);
    expect(exact.headers.get("cache-control")).toBe("private, no-store");
    const kept = await readHeader("rounded-exact.fits", await exact.arrayBuffer());
    // The owner's copy: the site as measured (WGS 84 round trip, well under a millimetre).
    expect(kept.geodetic![0]).toBeCloseTo(EXACT.latDeg, 7);
    expect(kept.geodetic![1]).toBeCloseTo(EXACT.lonDeg, 7);
    expect(kept.geodetic![2]).toBeCloseTo(EXACT.elevationM, 2);
    // The public copy: 25.7, 32.6 and 100 m (elevation in 100 m steps); OBSGEO in whole metres keeps it within a metre (about 1e-5 degree).
    expect(shown.geodetic![0]).toBeCloseTo(25.7, 4);
    expect(shown.geodetic![1]).toBeCloseTo(32.6, 4);
    expect(Math.abs(shown.geodetic![2] - 100)).toBeLessThan(2);
    expect(shown.locprec).toBe("rounded");
    expect(shown.comments.join(" ")).toMatch(/rounded to 25\.7 deg, 32\.6 deg/);
    // The distance to the Sun to 10 km only.
    expect(shown.dsun % 10_000).toBe(0);
    expect(shown.wcs).toEqual(kept.wcs);
    expect(shown.dataSum).toBe(kept.dataSum);
  });
});

describe("a hidden site in public", () => {
  const c = cases.hidden;

  it("shows neither the place, nor the private name, nor the label, nor the country", async () => {
    const texts = await publicTexts(c);
    const files = await publicFiles(c);
    const page = texts[`/plates/${c.slug}`];
    expect(page).toContain("The observer keeps the site private.");
    for (const [where, text] of Object.entries({ ...texts, ...files.texts })) {
      for (const exact of EXACT_TEXTS) expect(text.includes(exact), `${where} holds ${exact}`).toBe(false);
      expect(text.includes(PRIVATE_NAME), `${where} holds the private name`).toBe(false);
      // The eclipse page and the gallery list the rounded plate too, with its label and rounded place; the hidden plate's own answers never.
      if (where.includes(c.slug) || where.includes(c.reductionId)) {
        for (const rounded of ["25.7", "32.6"]) expect(text.includes(rounded), `${where} holds ${rounded}`).toBe(false);
        expect(text.includes(PUBLIC_LABEL), `${where} holds the label`).toBe(false);
        expect(text.includes("Egypt"), `${where} holds the country`).toBe(false);
      }
    }
    const api = JSON.parse(texts[`/api/plates?q=${tag}`]) as { plates: { slug: string; siteCountry: string | null; siteLabel: string | null; sitePosition: unknown }[] };
    expect(api.plates.find((p) => p.slug === c.slug)).toMatchObject({ siteCountry: null, siteLabel: null, sitePosition: null });
    for (const g of Object.values(files.gps)) expect(g).toBeFalsy();
  });

  it("is not found by its country in the gallery's filter", async () => {
    const res = (await (await fetch(`${APP}/api/plates?q=${tag}&country=Egypt`)).json()) as { plates: { slug: string }[] };
    expect(res.plates.map((p) => p.slug)).toEqual([cases.rounded.slug]);
  });

  it("serves a master with no observer position and a card that says so", async () => {
    const shown = await readHeader("hidden-public.fits", await (await fetch(`${APP}/iiif/reductions/${c.reductionId}/master.fits`)).arrayBuffer());
    expect(shown.keys.filter((k) => k.startsWith("OBSGEO"))).toEqual([]);
    expect(shown.geodetic).toBeUndefined();
    expect(shown.locprec).toBe("hidden");
    expect(shown.comments.join(" ")).toMatch(/position is withheld/);
    // Coarser than the Earth's diameter: 10 000 km and 0.1 arcsec.
    expect(shown.dsun % 10_000_000).toBe(0);
    expect(shown.rsun).toBe(945.8);
    expect(shown.wcs.CTYPE1).toBe("HPLN-TAN");
    expect(shown.dataSum).toBeCloseTo(MASTER_PIXELS.reduce((s, v) => s + v, 0), 3);
  });

  it("never serves report.json, which holds the exact site, on the public route", async () => {
    expect((await fetch(`${APP}/iiif/reductions/${c.reductionId}/report.json`)).status).toBe(404);
  });
});
