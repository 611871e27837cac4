// Print bundles end to end on the server side: an editor starts an export over
// HTTP, the test worker makes it, and the ZIP is downloaded and taken apart.
// Checked: only editors and admins may export or download; the ZIP holds
// exactly the files its metadata JSON lists; every image file carries the
// metadata that was written (read back with ExifTool), AVM included, with the
// spatial fields only for the plate whose reduction has a WCS and GPS only for
// the site whose precision is exact; pixel sizes follow the slots (88 mm at
// 300 dpi is 1039 px, shared/REFERENCES.md) and never enlarge; the PDF proof has
// one page per plate whose image box is the printed size (read with pdf-lib);
// the AVM spatial fields, read by Debian's pyavm and astropy, put the Sun where
// astropy's own ephemeris has it and celestial north where the reduction said;
// the editor is e-mailed; a plate withdrawn before export fails the export
// with a reason naming it and leaves the edition unchanged.
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { eq } from "drizzle-orm";
import { PDFDocument } from "pdf-lib";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { editionExports, editions, jobRuns, plates, plateVersions, reductions, users } from "@/db/schema";
import { DEMO_PASSWORD } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { addEditionItem, createEdition, findEdition, updateEditionItem } from "@/lib/editions/editions";
import { exportJobId, STALE_EXPORT_REASON } from "@/lib/editions/export/active";
import { closeExportExifTool, readTags } from "@/lib/editions/export/embed";
import { PT_PER_MM } from "@/lib/editions/export/proof";
import { DeleteObjectCommand } from "@aws-sdk/client-s3";
import { bucketName, getS3 } from "@/lib/storage";
import { runPython } from "../unit/media/python-reference";
import { requireTestDatabase } from "../support/env";
import { Client } from "../support/http";
import { waitForMail } from "../support/mailbox";
import { waitFor } from "../support/wait";
import { readZipEntries } from "../support/zip";
import { makeExportablePlate, person, SKY } from "./edition-fixtures";

requireTestDatabase();
const db = getDb();
const tag = Date.now().toString(36);
let dir = "";
afterAll(async () => {
  await closeExportExifTool();
  await closeDb();
  if (dir) await rm(dir, { recursive: true, force: true });
});

const editorPerson = person("editor");
let editor: Actor;

let editionId = "";
const plateIds: string[] = [];

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), "crownlight-export-test-"));
  const [u] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, editorPerson.email)).limit(1);
  editor = { userId: u.id, email: editorPerson.email, name: u.name, roles: ["editor"] };
  plateIds.push(await makeExportablePlate(db, tag, 1, "exact", true, true));
  plateIds.push(await makeExportablePlate(db, tag, 2, "rounded", false, false));
  ({ id: editionId } = await createEdition(db, editor, { title: `Corona Notes ${tag}`, kind: "newsletter", issueLabel: "No. 41", embargoDate: "2027-09-01" }));
  const a = await addEditionItem(db, editor, editionId, { plateId: plateIds[0], rendition: "natural" });
  const b = await addEditionItem(db, editor, editionId, { plateId: plateIds[1], rendition: "structure" });
  await updateEditionItem(db, editor, editionId, a.itemId, { slot: "single-column", rendition: "natural", captionOverride: "" });
  await updateEditionItem(db, editor, editionId, b.itemId, { slot: "full-width", rendition: "structure", captionOverride: "The structure rendition, printed across the page." });
}, 120_000);

describe("edition export", () => {
  const files = new Map<string, Buffer>();
  let metadata: {
    files: { name: string; bytes: number; kind: string; position: number | null }[];
    options: { cmykProfile: string | null };
    plates: { position: number; pixels: { width: number; height: number; dpi: number | null }; notes: string[]; metadata: Record<string, unknown> & { avm: Record<string, unknown> } }[];
  };

  it("refuses members and curators and names a bad template field", async () => {
    for (const role of ["member", "curator"]) {
      const c = new Client();
      await c.signIn(person(role).email, DEMO_PASSWORD);
      expect((await c.json(`/api/editions/${editionId}/exports`, { cmyk: true })).status).toBe(403);
      expect((await c.json(`/api/editions/${editionId}/exports`)).status).toBe(403);
    }
    const c = new Client();
    await c.signIn(editorPerson.email, DEMO_PASSWORD);
    const bad = await c.json(`/api/editions/${editionId}/exports`, { fileNameTemplate: "{date}_{camera}" });
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).toMatch(/fileNameTemplate.*unknown field \{camera\}/);
  });

  it("makes the bundle with progress and lets the editor download it", async () => {
    const c = new Client();
    await c.signIn(editorPerson.email, DEMO_PASSWORD);
    const started = await c.json(`/api/editions/${editionId}/exports`, { cmyk: true, greyscale: true });
    expect(started.status).toBe(202);
    const exportId = (started.body as { export: { id: string } }).export.id;
    // A second export while this one runs is refused.
    expect((await c.json(`/api/editions/${editionId}/exports`, {})).status).toBe(409);
    const seen = new Set<string>();
    const done = await waitFor(
      "the export to finish",
      async () => {
        const { body } = await c.json(`/api/editions/${editionId}/exports/${exportId}`);
        const e = (body as { export: { state: string; stage: string | null; downloadUrl: string | null; error: string | null } }).export;
        if (e.stage) seen.add(e.stage);
        if (e.state === "failed") throw new Error(`export failed: ${e.error}`);
        return e.state === "done" ? e : undefined;
      },
      180_000,
      250,
    );
    expect(seen.size).toBeGreaterThan(1);
    const [ed] = await db.select({ state: editions.state }).from(editions).where(eq(editions.id, editionId));
    expect(ed.state).toBe("exported");
    // Others cannot download it.
    const member = new Client();
    await member.signIn(person("member").email, DEMO_PASSWORD);
    expect((await member.request(done.downloadUrl!)).status).toBe(403);
    const res = await c.request(done.downloadUrl!);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/zip");
    expect(res.headers.get("content-disposition")).toMatch(/attachment; filename="Corona-Notes-.*_No.-41_print-bundle\.zip"/);
    for (const [k, v] of await readZipEntries(Buffer.from(await res.arrayBuffer()))) files.set(k, v);
    metadata = JSON.parse(files.get("metadata.json")!.toString("utf8"));
    const mail = await waitForMail(editorPerson.email, (m) => m.subject.includes(`Corona Notes ${tag}`));
    expect(mail.subject).toMatch(/^Print bundle ready/);
  }, 240_000);

  it("holds exactly the files its metadata JSON lists, with their sizes", () => {
    const listed = metadata.files.map((f) => f.name).sort();
    expect([...files.keys()].filter((n) => n !== "metadata.json").sort()).toEqual(listed);
    for (const f of metadata.files) expect(files.get(f.name)!.length).toBe(f.bytes);
    // Per plate: sRGB TIFF, JPEG, CMYK TIFF, grey TIFF; then captions, credits, proof.
    expect(metadata.files.filter((f) => f.position === 1).map((f) => f.kind)).toEqual(["tiff-srgb", "jpeg", "tiff-cmyk", "tiff-grey"]);
    expect(listed).toEqual(expect.arrayContaining(["captions.txt", "credits.txt", "proof.pdf"]));
    for (const name of listed) expect(name).toMatch(/^[A-Za-z0-9_-][A-Za-z0-9._-]{0,99}$/);
    // Default template {date}_{time}_{observer}_v{version}_{slot}.
    expect(listed[0]).toMatch(/^2027-08-02_104255_.+_v1_(single-column|full-width)/);
  });

  it("sizes every file for its slot and never enlarges", async () => {
    const [a, b] = metadata.plates;
    // 88 mm at 300 dpi is 1039 px (shared/REFERENCES.md, print sizes).
    expect(a.pixels).toMatchObject({ width: 1039, height: Math.round((1039 * 1200) / 1600), dpi: 300 });
    // Full width (180 mm at 300 dpi = 2126 px, REFERENCES.md) exceeds the 1600 px rendition: kept at 1600 px, 225.8 dpi.
    expect(b.pixels).toMatchObject({ width: 1600, height: 1200, dpi: 225.8 });
    expect(b.notes[0]).toMatch(/asks for 2126 px at 300 dpi but the rendition has 1600 px/);
    for (const f of metadata.files.filter((x) => x.position !== null)) {
      const m = await sharp(files.get(f.name)!).metadata();
      const want = f.position === 1 ? a.pixels : b.pixels;
      expect([m.width, m.height], f.name).toEqual([want.width, want.height]);
      if (f.kind === "tiff-srgb") expect([m.depth, m.channels, m.compression ?? "lzw", !!m.icc]).toEqual(["ushort", 3, "lzw", true]);
      if (f.kind === "tiff-grey") expect([m.depth, m.channels]).toEqual(["ushort", 1]);
      if (f.kind === "tiff-cmyk") expect([m.space, m.channels]).toEqual(["cmyk", 4]);
      if (f.kind === "jpeg") expect([m.chromaSubsampling, !!m.icc]).toEqual(["4:4:4", true]);
    }
  });

  it("embeds the metadata in every image file, AVM included, GPS only for an exact site", async () => {
    for (const f of metadata.files.filter((x) => x.position !== null)) {
      const path = join(dir, f.name);
      await writeFile(path, files.get(f.name)!);
      const t = await readTags(path);
      const plate = metadata.plates[f.position! - 1];
      const m = plate.metadata as Record<string, unknown> & { avm: Record<string, unknown> & { spatial: Record<string, unknown> | null }; gps: unknown };
      const list = (v: unknown) => (Array.isArray(v) ? v : [v]);
      expect(t["XMP-dc:Title"], f.name).toBe(m.title);
      expect(t["XMP-dc:Description"]).toBe(m.caption);
      expect(list(t["XMP-dc:Creator"])).toEqual(m.creators);
      expect(t["XMP-dc:Rights"]).toBe(m.copyright);
      expect(t["XMP-photoshop:Credit"]).toBe(m.creditLine);
      expect(t["XMP-xmpRights:WebStatement"]).toBe("http://creativecommons.org/licenses/by/4.0/");
      expect(t["XMP-iptcCore:AltTextAccessibility"]).toBe(m.altText);
      expect(t["XMP-avm:SubjectCategory"]).toBe("A.3");
      expect(String(t["XMP-avm:MetadataVersion"])).toBe("1.2");
      expect(list(t["XMP-avm:SubjectName"])).toEqual(["Sun", "Solar corona"]);
      expect(t["XMP-avm:TemporalStartTime"]).toBe("2027-08-02T10:42:55.000Z");
      expect(t["XMP-avm:TemporalIntegrationTime"]).toBeCloseTo(0.51, 6);
      expect(t["IFD0:XResolution"] ?? t["JFIF:XResolution"]).toBe(plate.pixels.dpi);
      if (f.position === 1) {
        expect(t["XMP-avm:Facility"]).toBe("Kestrel 500 mm refractor");
        expect(t["XMP-avm:Instrument"]).toBe("Halden M26 mono");
        const s = m.avm.spatial!;
        expect(t["XMP-avm:SpatialCoordinateFrame"]).toBe("ICRS");
        expect(t["XMP-avm:SpatialReferenceValue"]).toEqual(s.referenceValue);
        expect(t["XMP-avm:SpatialReferencePixel"]).toEqual(s.referencePixel);
        expect(t["XMP-avm:SpatialScale"]).toEqual(s.scale);
        expect(t["XMP-avm:SpatialRotation"]).toBe(30);
        expect(t["GPS:GPSLatitude"]).toBeCloseTo(25.7, 6);
        expect(t["GPS:GPSLongitude"]).toBeCloseTo(32.65, 6);
      } else {
        expect(m.avm.spatial).toBeNull();
        expect(Object.keys(t).filter((k) => k.startsWith("XMP-avm:Spatial"))).toEqual([]);
        expect(Object.keys(t).filter((k) => k.startsWith("GPS:"))).toEqual([]);
        expect(t["XMP-avm:Facility"]).toBeUndefined();
      }
      if (f.kind === "tiff-cmyk") expect(t["ICC_Profile:ProfileDescription"]).toBe(metadata.options.cmykProfile);
      if (f.kind === "tiff-srgb" || f.kind === "jpeg") expect(t["ICC_Profile:ProfileDescription"]).toBe("sRGB");
    }
  });

  it("puts the Sun and celestial north where astropy finds them from the AVM fields (pyavm)", () => {
    const jpeg = metadata.files.find((f) => f.position === 1 && f.kind === "jpeg")!.name;
    const out = runPython(
      `
import sys, json, warnings
warnings.simplefilter("ignore")
from pyavm import AVM
from astropy.coordinates import SkyCoord, get_sun
from astropy.time import Time
import astropy.units as u
w = AVM.from_image(sys.argv[1]).to_wcs()
h = int(sys.argv[2]); cx = float(sys.argv[3]); cy = float(sys.argv[4]); ang = float(sys.argv[5])
import math
def world(x, y):  # 0-based pixel, y down -> FITS 1-based, y up
    ra, dec = w.wcs_pix2world([[x + 1, h - y]], 1)[0]
    return SkyCoord(ra * u.deg, dec * u.deg, frame="icrs")
sun = world(cx, cy)
d = 100.0
north = world(cx - d * math.sin(math.radians(ang)), cy - d * math.cos(math.radians(ang)))
g = get_sun(Time(sys.argv[6]))
# Directions only: converting GCRS to ICRS with a distance moves the origin to the barycentre.
ref = SkyCoord(g.ra, g.dec, frame="icrs")
print(json.dumps({"pa": sun.position_angle(north).deg, "sep": sun.separation(north).arcsec, "off": sun.separation(ref).arcsec}))
`,
      [join(dir, jpeg), "779", String((800 + 0.5) * (1039 / 1600) - 0.5), String((600 + 0.5) * (1039 / 1600) - 0.5), "30", SKY.moonSilhouetteUtc],
      ["pyavm", "astropy"],
    );
    // pyavm 0.9.4 prints the XMP packet it found before our line.
    const r = JSON.parse(out.trim().split("\n").at(-1)!) as { pa: number; sep: number; off: number };
    // North is where the reduction put it: position angle 0 (or 360).
    expect(Math.min(r.pa, 360 - r.pa)).toBeLessThan(0.05);
    // 100 px at 2.0 arcsec/px of the master, scaled by 1600/1039.
    expect(r.sep).toBeCloseTo((100 * 2.0 * 1600) / 1039, 0);
    // The Sun's topocentric place (astronomy-engine) differs from astropy's geocentric one by about the solar parallax, 8.8 arcsec at most (from memory).
    expect(r.off).toBeLessThan(15);
  });

  it("has a proof with one page per plate at the printed size", async () => {
    const pdf = await PDFDocument.load(files.get("proof.pdf")!);
    expect(pdf.getPageCount()).toBe(2);
    const [p1, p2] = pdf.getPages();
    expect(p1.getArtBox().width / PT_PER_MM).toBeCloseTo(88, 2);
    expect(p1.getArtBox().height / PT_PER_MM).toBeCloseTo((88 * 779) / 1039, 1);
    expect(p2.getArtBox().width / PT_PER_MM).toBeCloseTo(180, 2);
    // A4 at least, and wide enough for the image and its margins.
    expect(p2.getWidth() / PT_PER_MM).toBeGreaterThanOrEqual(210);
  });

  it("writes the captions and credits files in house style", () => {
    const captions = files.get("captions.txt")!.toString("utf8");
    expect(captions).toContain(`Corona Notes ${tag}, No. 41`);
    expect(captions).toContain("Embargoed until 2027-09-01");
    expect(captions).toMatch(/Plate 2 \(Full width, 180 mm at 300 dpi\)\nExport plate 2 — Łódź .*\. The structure rendition, printed across the page\. \(.+\)/);
    const credits = files.get("credits.txt")!.toString("utf8");
    expect(credits).toContain("Processing: Tomasz Wielgosz.");
    expect(credits).toContain("Licence: Creative Commons Attribution 4.0 International (http://creativecommons.org/licenses/by/4.0/).");
  });

  it("refuses to export an edition whose plate was withdrawn, naming it, and leaves the edition as it was", async () => {
    const c = new Client();
    await c.signIn(editorPerson.email, DEMO_PASSWORD);
    expect((await c.json(`/api/editions/${editionId}/reopen`, {})).status).toBe(200);
    await db.update(plates).set({ state: "withdrawn", withdrawnReason: "test", withdrawnKind: "temporary" }).where(eq(plates.id, plateIds[1]));
    const started = await c.json(`/api/editions/${editionId}/exports`, {});
    expect(started.status).toBe(409);
    expect(JSON.stringify(started.body)).toMatch(/Plate 2 \(.*Export plate 2.*\) is withdrawn now/);
    const [ed] = await db.select({ state: editions.state }).from(editions).where(eq(editions.id, editionId));
    expect(ed.state).toBe("draft");
    await db.update(plates).set({ state: "published", withdrawnReason: null, withdrawnKind: null }).where(eq(plates.id, plateIds[1]));
  });

  it("keeps the earlier bundle listed after a reopen", async () => {
    const c = new Client();
    await c.signIn(editorPerson.email, DEMO_PASSWORD);
    const { status, body } = await c.json(`/api/editions/${editionId}/exports`);
    expect(status).toBe(200);
    const list = (body as { exports: { state: string; downloadUrl: string | null; fileCount: number }[] }).exports;
    expect(list.filter((e) => e.state === "done")).toHaveLength(1);
    expect(list[0].fileCount).toBe(metadata.files.length + 1);
    // A draft again, but its bundle is the record of what went to print: it cannot be deleted.
    const del = await c.json(`/api/editions/${editionId}`, undefined, "DELETE");
    expect(del.status).toBe(409);
    expect(JSON.stringify(del.body)).toContain("has print bundles");
    await readFile(join(dir, metadata.files[0].name));
  });

  it("fails an export whose rendition went missing from storage, with the reason, and mails the editor", async () => {
    const [row] = await db.select({ outputs: reductions.outputs }).from(reductions).innerJoin(plateVersions, eq(plateVersions.reductionId, reductions.id)).where(eq(plateVersions.plateId, plateIds[0]));
    await getS3().send(new DeleteObjectCommand({ Bucket: bucketName("derived"), Key: `${row.outputs!.prefix}natural.png` }));
    const c = new Client();
    await c.signIn(editorPerson.email, DEMO_PASSWORD);
    const started = await c.json(`/api/editions/${editionId}/exports`, {});
    expect(started.status).toBe(202);
    const exportId = (started.body as { export: { id: string } }).export.id;
    const failed = await waitFor("the export to fail", async () => {
      const { body } = await c.json(`/api/editions/${editionId}/exports/${exportId}`);
      const e = (body as { export: { state: string; error: string | null; downloadUrl: string | null } }).export;
      return e.state === "failed" ? e : undefined;
    });
    expect(failed.error).toMatch(/The natural rendition of plate 1 \("Export plate 1 .*"\) is missing from storage/);
    expect(failed.downloadUrl).toBeNull();
    const [ed] = await db.select({ state: editions.state }).from(editions).where(eq(editions.id, editionId));
    expect(ed.state).toBe("draft");
    const mail = await waitForMail(editorPerson.email, (m) => m.subject === `Print bundle failed: Corona Notes ${tag}`);
    expect(mail.text).toContain("missing from storage");
    expect((await c.request(`/api/editions/${editionId}/exports/${exportId}/download`)).status).toBe(409);
  }, 120_000);

  it("names a malformed option", async () => {
    const c = new Client();
    await c.signIn(editorPerson.email, DEMO_PASSWORD);
    const bad = await c.json(`/api/editions/${editionId}/exports`, { cmyk: "yes" });
    expect(bad.status).toBe(400);
    expect(JSON.stringify(bad.body)).toMatch(/cmyk.*expected true or false/);
  });

  it("holds the plates while a bundle is made, and frees an edition whose export job the queue gave up on", async () => {
    const c = new Client();
    await c.signIn(editorPerson.email, DEMO_PASSWORD);
    const [row] = await db.insert(editionExports).values({ editionId, state: "running", options: { cmyk: false, greyscale: false, fileNameTemplate: "{date}" }, requestedBy: editor.userId }).returning({ id: editionExports.id });
    await db.insert(jobRuns).values({ id: exportJobId(row.id), name: "edition.export", payload: { exportId: row.id }, state: "running" });
    const { items } = await findEdition(db, editor, editionId);
    const change = await c.json(`/api/editions/${editionId}/items/${items[0].id}`, { slot: "web", rendition: "natural", captionOverride: "" }, "PATCH");
    expect(change.status).toBe(409);
    expect(JSON.stringify(change.body)).toContain("is being exported");
    expect((await c.json(`/api/editions/${editionId}`, undefined, "DELETE")).status).toBe(409);
    expect((await c.json(`/api/editions/${editionId}/exports`, {})).status).toBe(409);
    // The queue fails the job (a worker killed twice mid-bundle): the export is settled as failed where it is next looked at.
    await db.update(jobRuns).set({ state: "failed" }).where(eq(jobRuns.id, exportJobId(row.id)));
    const { body } = await c.json(`/api/editions/${editionId}/exports`);
    const settled = (body as { exports: { id: string; state: string; error: string | null }[] }).exports.find((e) => e.id === row.id)!;
    expect(settled).toMatchObject({ state: "failed", error: STALE_EXPORT_REASON });
    expect((await c.json(`/api/editions/${editionId}/items/${items[0].id}`, { slot: "web", rendition: "natural", captionOverride: "" }, "PATCH")).status).toBe(200);
  });
});
