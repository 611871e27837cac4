// Editions against the real database and the running app: an editor builds an
// edition from published plates, positions stay 1..n through moves and
// removals, a plate already in another edition is added with a warning, only
// published plates go in, sizes are checked against the rendition, and only
// editors and admins may build (members and curators get 403). Renaming works
// in any state, deleting only for a draft, and an item moves to its plate's
// newer version only while the edition is a draft.
import { and, desc, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { auditLog, editionItems, editions, plates, plateVersions, reductions, type PlateState, type Rendition } from "@/db/schema";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { addEditionItem, createEdition, findEdition, listEditionsOfPlate, listPickablePlates, moveEditionItem, removeEditionItem, setEditionEmbargo, updateEditionItem } from "@/lib/editions/editions";
import { requireTestDatabase } from "../support/env";
import { Client } from "../support/http";
import { createMember, createSetFor, ECLIPSE_ID } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(closeDb);

const tag = Date.now().toString(36);
const NO_ID = "00000000-0000-4000-8000-000000000000";
let editor: Actor;
let admin: Actor;
let curator: Actor;
let member: Actor;
let owner: Actor;
const plateIds: string[] = [];
let draftPlateId = "";

/** A plate written directly: one version whose natural rendition is 1280 x 960 px (like the Luxor demo bracket). */
async function makePlate(n: number, state: PlateState): Promise<string> {
  const setId = await createSetFor(db, owner, `Editions set ${tag} ${n}`);
  const [red] = await db.insert(reductions).values({ bracketSetId: setId, params: { registration: "sun", filter: "mgn", recoverResponse: false }, state: "done", progress: 1 }).returning({ id: reductions.id });
  const [plate] = await db
    .insert(plates)
    .values({
      slug: `editions-${tag}-${n}`,
      bracketSetId: setId,
      eclipseId: ECLIPSE_ID,
      state,
      title: `Editions plate ${tag} ${n}`,
      caption: "Synthetic corona for the editions test.",
      altText: "A dark disk with grey streamers.",
      acquiredBy: owner.name,
      processedBy: "Crownlight pipeline test",
      licence: "CC-BY-4.0",
      publishedAt: state === "published" ? new Date(Date.now() + n) : null,
    })
    .returning({ id: plates.id });
  await db.insert(plateVersions).values({
    plateId: plate.id,
    version: 1,
    reductionId: red.id,
    renditions: ["natural", "structure"],
    imageSizes: { natural: { width: 1280, height: 960 }, structure: { width: 3000, height: 2250 } },
    geometry: {},
    facts: { exposuresS: [0.004], captureStartUtc: null, captureEndUtc: null, moonSilhouetteUtc: null, referenceFrame: null, dynamicRangeStops: null, masterSize: null },
  });
  return plate.id;
}

async function positions(editionId: string): Promise<[string, number][]> {
  const e = await findEdition(db, editor, editionId);
  return e.items.map((i) => [i.plate.id, i.position]);
}

beforeAll(async () => {
  editor = await createMember(db, `Marguerite Ashdown ${tag}`, ["editor"]);
  admin = await createMember(db, `Anselm Corrigan ${tag}`, ["admin"]);
  curator = await createMember(db, `Ines Halloran ${tag}`, ["curator"]);
  member = await createMember(db, `Tobias Wrenfield ${tag}`, ["member"]);
  owner = await createMember(db, `Oskar Lindqvist ${tag}`, ["member"]);
  for (let n = 1; n <= 3; n++) plateIds.push(await makePlate(n, "published"));
  draftPlateId = await makePlate(9, "draft");
}, 60_000);

describe("editions", () => {
  let editionId = "";

  it("lets an editor start an edition and names a bad field", async () => {
    await expect(createEdition(db, editor, { title: " ", kind: "magazine" })).rejects.toMatchObject({
      code: "invalid_input",
      fields: expect.arrayContaining([expect.objectContaining({ field: "title" }), expect.objectContaining({ field: "kind" })]),
    });
    await expect(createEdition(db, editor, { title: "Bulletin", kind: "newsletter", embargoDate: "2027-02-30" })).rejects.toMatchObject({ fields: [expect.objectContaining({ field: "embargoDate" })] });
    ({ id: editionId } = await createEdition(db, editor, { title: `Kestrel Ridge Bulletin ${tag}`, kind: "newsletter", issueLabel: "No. 41" }));
    const e = await findEdition(db, editor, editionId);
    expect(e).toMatchObject({ state: "draft", embargoDate: null, items: [] });
  });

  it("refuses members and curators, and allows admins", async () => {
    await expect(createEdition(db, member, { title: "x", kind: "journal" })).rejects.toMatchObject({ code: "forbidden" });
    await expect(findEdition(db, curator, editionId)).rejects.toMatchObject({ code: "forbidden" });
    await expect(addEditionItem(db, curator, editionId, { plateId: plateIds[0] })).rejects.toMatchObject({ code: "forbidden" });
    await expect(addEditionItem(db, null, editionId, { plateId: plateIds[0] })).rejects.toMatchObject({ code: "unauthenticated" });
    const e = await findEdition(db, admin, editionId);
    expect(e.id).toBe(editionId);
  });

  it("adds only published plates", async () => {
    await expect(addEditionItem(db, editor, editionId, { plateId: draftPlateId })).rejects.toMatchObject({ code: "invalid_input", fields: [expect.objectContaining({ field: "plateId" })] });
    const picker = await listPickablePlates(db, editor, editionId, `Editions plate ${tag}`);
    expect(picker.map((p) => p.id).sort()).toEqual([...plateIds].sort());
  });

  it("builds: order, sizes against the rendition, and positions stay 1..n through moves and removals", async () => {
    for (const plateId of plateIds) expect((await addEditionItem(db, editor, editionId, { plateId })).alsoIn).toEqual([]);
    await expect(addEditionItem(db, editor, editionId, { plateId: plateIds[0] })).rejects.toMatchObject({ code: "conflict" });
    expect(await positions(editionId)).toEqual([
      [plateIds[0], 1],
      [plateIds[1], 2],
      [plateIds[2], 3],
    ]);
    const items = (await findEdition(db, editor, editionId)).items;
    await moveEditionItem(db, editor, editionId, items[2].id, { direction: "up" });
    await moveEditionItem(db, editor, editionId, items[0].id, { direction: "up" }); // already first: no change
    expect(await positions(editionId)).toEqual([
      [plateIds[0], 1],
      [plateIds[2], 2],
      [plateIds[1], 3],
    ]);
    await removeEditionItem(db, editor, editionId, items[0].id);
    expect(await positions(editionId)).toEqual([
      [plateIds[2], 1],
      [plateIds[1], 2],
    ]);
    expect(await db.$count(editionItems, eq(editionItems.editionId, editionId))).toBe(2);
  });

  it("checks the layout: custom mm and dpi, the rendition, and warns when the export would enlarge", async () => {
    const [first] = (await findEdition(db, editor, editionId)).items;
    // REFERENCES.md, "Print sizes": 180 mm at 300 dpi is 2126 px; the natural rendition has 1280 px.
    await updateEditionItem(db, editor, editionId, first.id, { slot: "full-width", rendition: "natural", captionOverride: "  For the autumn bulletin. " });
    let item = (await findEdition(db, editor, editionId)).items[0];
    expect(item.needed).toEqual({ width: 2126, height: 1595 });
    expect(item.available).toEqual({ width: 1280, height: 960 });
    expect(item.enlargement).toBeCloseTo(2126 / 1280, 6);
    expect(item.sizeWarning).toMatch(/enlarge/);
    expect(item.captionOverride).toBe("For the autumn bulletin.");
    // The structure rendition is 3000 px wide: large enough.
    await updateEditionItem(db, editor, editionId, first.id, { slot: "full-width", rendition: "structure", captionOverride: "" });
    item = (await findEdition(db, editor, editionId)).items[0];
    expect(item.sizeWarning).toBeNull();
    expect(item.captionOverride).toBeNull();
    // REFERENCES.md: 88 mm at 300 dpi is 1039 px, through the custom fields (strings, as forms send them).
    await updateEditionItem(db, editor, editionId, first.id, { slot: "custom", customWidthMm: "88", customDpi: "300", rendition: "natural" });
    item = (await findEdition(db, editor, editionId)).items[0];
    expect(item.needed?.width).toBe(1039);
    expect(item.sizeWarning).toBeNull();
    await expect(updateEditionItem(db, editor, editionId, first.id, { slot: "custom", customWidthMm: "5", customDpi: "30.5", rendition: "natural" })).rejects.toMatchObject({
      fields: expect.arrayContaining([expect.objectContaining({ field: "customWidthMm" }), expect.objectContaining({ field: "customDpi" })]),
    });
    await expect(updateEditionItem(db, editor, editionId, first.id, { slot: "web", rendition: "infrared" })).rejects.toMatchObject({ fields: [expect.objectContaining({ field: "rendition" })] });
  });

  it("warns, without refusing, when a plate is already in another edition; the plate page shows the embargo", async () => {
    const { id: other } = await createEdition(db, admin, { title: `Journal ${tag}`, kind: "journal", issueLabel: "Vol. 12" });
    await setEditionEmbargo(db, editor, editionId, { embargoDate: "2027-10-01" });
    const added = await addEditionItem(db, admin, other, { plateId: plateIds[1] });
    expect(added.alsoIn).toEqual([{ id: editionId, title: `Kestrel Ridge Bulletin ${tag}`, issueLabel: "No. 41", embargoDate: "2027-10-01" }]);
    const first = await findEdition(db, editor, editionId);
    expect(first.items.find((i) => i.plate.id === plateIds[1])?.alsoIn.map((e) => e.id)).toEqual([other]);
    const history = await listEditionsOfPlate(db, curator, plateIds[1]);
    expect(history.map((h) => [h.id, h.embargoDate])).toEqual([
      [editionId, "2027-10-01"],
      [other, null],
    ]);
    await expect(listEditionsOfPlate(db, member, plateIds[1])).rejects.toMatchObject({ code: "forbidden" });
  });

  it("answers over HTTP: the editor builds, a member and a curator get 403, an admin is allowed", async () => {
    const who = async (role: string) => {
      const c = new Client();
      await c.signIn(DEMO_PEOPLE.find((p) => p.roles.includes(role as never) && (role !== "member" || p.roles.join() === "member"))!.email, DEMO_PASSWORD);
      return c;
    };
    const ed = await who("editor");
    const made = await ed.json("/api/editions", { title: `HTTP edition ${tag}`, kind: "journal" });
    expect(made.status).toBe(201);
    const id = (made.body as { id: string }).id;
    const add = await ed.json(`/api/editions/${id}/items`, { plateId: plateIds[2] });
    expect(add.status).toBe(201);
    // plateIds[2] is in the bulletin too.
    expect((add.body as { alsoIn: { id: string }[] }).alsoIn.map((e) => e.id)).toEqual([editionId]);
    const draft = await ed.json(`/api/editions/${id}/items`, { plateId: draftPlateId });
    expect(draft.status).toBe(400);
    const bad = await ed.json(`/api/editions/${id}`, { embargoDate: "tomorrow" }, "PATCH");
    expect(bad.status).toBe(400);
    const [problem] = (bad.body as { error: { fields: { field: string; message: string; received?: string }[] } }).error.fields;
    expect(problem.field).toBe("embargoDate");
    // The message is for people; what came is kept apart for API callers (lib/validation.ts).
    expect(problem.message).toMatch(/YYYY-MM-DD/);
    expect(problem.received).toMatch(/"tomorrow"/);
    for (const role of ["member", "curator"]) {
      const c = await who(role);
      expect((await c.json(`/api/editions/${id}`)).status).toBe(403);
      expect((await c.json(`/api/editions/${id}/items`, { plateId: plateIds[0] })).status).toBe(403);
    }
    const ad = await who("admin");
    const read = await ad.json(`/api/editions/${id}`);
    expect(read.status).toBe(200);
    const dto = (read.body as { edition: { items: { plate: { id: string }; position: number }[] } }).edition;
    expect(dto.items.map((i) => [i.plate.id, i.position])).toEqual([[plateIds[2], 1]]);
    const page = await ed.request(`/editions/${id}`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain("Also in");
    // The curator's plate page lists the editions the plate is in, with the embargo date.
    const desk = await (await who("curator")).request(`/review/plates/${plateIds[1]}`);
    expect(desk.status).toBe(200);
    const html = await desk.text();
    expect(html).toContain("Publication history");
    expect(html).toContain(`Kestrel Ridge Bulletin ${tag}`);
    expect(html).toMatch(/embargo until (<!-- -->)?1 Oct 2027/);
  });
});

/** A newer version of a plate, made the current one, publishing only the given renditions. */
async function addVersion(plateId: string, renditions: Rendition[]): Promise<number> {
  const [last] = await db.select({ version: plateVersions.version, reductionId: plateVersions.reductionId, facts: plateVersions.facts }).from(plateVersions).where(eq(plateVersions.plateId, plateId)).orderBy(desc(plateVersions.version)).limit(1);
  const [{ current }] = await db.select({ current: plates.currentVersion }).from(plates).where(eq(plates.id, plateId));
  const version = current + 1;
  await db.insert(plateVersions).values({
    plateId,
    version,
    reductionId: last.reductionId,
    renditions,
    imageSizes: Object.fromEntries(renditions.map((r) => [r, { width: 2400, height: 1800 }])),
    geometry: {},
    facts: last.facts,
  });
  await db.update(plates).set({ currentVersion: version }).where(eq(plates.id, plateId));
  return version;
}

const auditActions = async (editionId: string) =>
  (await db.select({ action: auditLog.action, detail: auditLog.detail }).from(auditLog).where(and(eq(auditLog.subjectType, "edition"), eq(auditLog.subjectId, editionId))).orderBy(auditLog.id));

async function signedIn(role: "editor" | "admin" | "curator" | "member"): Promise<Client> {
  const c = new Client();
  await c.signIn(DEMO_PEOPLE.find((p) => (role === "member" ? p.roles.join() === "member" : p.roles.includes(role)))!.email, DEMO_PASSWORD);
  return c;
}

describe("renaming, deleting and newer plate versions", () => {
  let ed: Client;
  let mem: Client;
  let versionPlates: string[] = [];

  beforeAll(async () => {
    ed = await signedIn("editor");
    mem = await signedIn("member");
    versionPlates = [await makePlate(21, "published"), await makePlate(22, "published"), await makePlate(23, "published")];
  }, 60_000);

  const start = async (title: string) => ((await ed.json("/api/editions", { title, kind: "newsletter", issueLabel: "No. 42" })).body as { id: string }).id;

  it("renames over HTTP: the editor changes title, kind and issue label, in any state; a member is refused; a bad field is named", async () => {
    const id = await start(`Renamed ${tag}`);
    const res = await ed.json(`/api/editions/${id}/name`, { title: `  Kestrel Ridge Journal ${tag} `, kind: "journal", issueLabel: "Vol. 12, issue 3" }, "PATCH");
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ title: `Kestrel Ridge Journal ${tag}`, kind: "journal", issueLabel: "Vol. 12, issue 3", changed: true });
    expect(await findEdition(db, editor, id)).toMatchObject({ title: `Kestrel Ridge Journal ${tag}`, kind: "journal", issueLabel: "Vol. 12, issue 3" });
    // The embargo PATCH still answers on its own path.
    expect((await ed.json(`/api/editions/${id}`, { embargoDate: "2027-11-01" }, "PATCH")).status).toBe(200);

    const bad = await ed.json(`/api/editions/${id}/name`, { title: "   ", kind: "magazine" }, "PATCH");
    expect(bad.status).toBe(400);
    const fields = (bad.body as { error: { fields: { field: string; message: string; received?: string }[] } }).error.fields;
    expect(fields.map((f) => f.field).sort()).toEqual(["kind", "title"]);
    expect(fields.find((f) => f.field === "title")?.message).toMatch(/a title is required/);
    expect(fields.find((f) => f.field === "kind")?.message).toMatch(/newsletter or journal/);
    expect(fields.find((f) => f.field === "kind")?.received).toMatch(/"magazine"/);

    expect((await mem.json(`/api/editions/${id}/name`, { title: "Mine now", kind: "journal" }, "PATCH")).status).toBe(403);
    expect((await new Client().json(`/api/editions/${id}/name`, { title: "Mine now", kind: "journal" }, "PATCH")).status).toBe(401);
    expect((await ed.json(`/api/editions/${NO_ID}/name`, { title: "Nowhere", kind: "journal" }, "PATCH")).status).toBe(404);

    // An exported edition can still be renamed: it is only its name.
    await db.update(editions).set({ state: "exported" }).where(eq(editions.id, id));
    const later = await ed.json(`/api/editions/${id}/name`, { title: `Kestrel Ridge Journal ${tag}`, kind: "journal", issueLabel: "Vol. 12, no. 3" }, "PATCH");
    expect(later.status).toBe(200);
    // The same name again changes nothing and writes no audit entry.
    expect((await ed.json(`/api/editions/${id}/name`, { title: `Kestrel Ridge Journal ${tag}`, kind: "journal", issueLabel: "Vol. 12, no. 3" }, "PATCH")).body).toMatchObject({ changed: false });
    const renames = (await auditActions(id)).filter((a) => a.action === "edition.renamed");
    expect(renames.map((a) => a.detail)).toEqual([
      { from: { title: `Renamed ${tag}`, kind: "newsletter", issueLabel: "No. 42" }, to: { title: `Kestrel Ridge Journal ${tag}`, kind: "journal", issueLabel: "Vol. 12, issue 3" } },
      { from: { title: `Kestrel Ridge Journal ${tag}`, kind: "journal", issueLabel: "Vol. 12, issue 3" }, to: { title: `Kestrel Ridge Journal ${tag}`, kind: "journal", issueLabel: "Vol. 12, no. 3" } },
    ]);
  });

  it("deletes a draft edition with its items but not its plates, refuses an exported one, and audits it", async () => {
    const id = await start(`To delete ${tag}`);
    expect((await ed.json(`/api/editions/${id}/items`, { plateId: versionPlates[0] })).status).toBe(201);
    expect((await mem.json(`/api/editions/${id}`, undefined, "DELETE")).status).toBe(403);
    const gone = await ed.json(`/api/editions/${id}`, undefined, "DELETE");
    expect(gone.status).toBe(200);
    expect((await ed.json(`/api/editions/${id}`)).status).toBe(404);
    expect(await db.$count(editionItems, eq(editionItems.editionId, id))).toBe(0);
    expect(await db.$count(plates, eq(plates.id, versionPlates[0]))).toBe(1);
    const [deleted] = (await auditActions(id)).filter((a) => a.action === "edition.deleted");
    expect(deleted.detail).toMatchObject({ title: `To delete ${tag}`, plates: [{ plateId: versionPlates[0], version: 1 }] });
    // A second delete finds nothing.
    expect((await ed.json(`/api/editions/${id}`, undefined, "DELETE")).status).toBe(404);

    const kept = await start(`Went to print ${tag}`);
    await db.update(editions).set({ state: "exported" }).where(eq(editions.id, kept));
    const refused = await ed.json(`/api/editions/${kept}`, undefined, "DELETE");
    expect(refused.status).toBe(409);
    expect((refused.body as { error: { message: string } }).error.message).toMatch(/was exported; it stays as a record of what went to print/);
    expect((await findEdition(db, editor, kept)).id).toBe(kept);
    expect((await auditActions(kept)).map((a) => a.action)).not.toContain("edition.deleted");
  });

  it("moves an item from its pinned version to the plate's current one, keeping or replacing the rendition, only while a draft", async () => {
    const id = await start(`Versions ${tag}`);
    const [keepsPlate, losesPlate, withdrawnPlate] = versionPlates;
    for (const plateId of versionPlates) expect((await ed.json(`/api/editions/${id}/items`, { plateId })).status).toBe(201);
    let items = (await findEdition(db, editor, id)).items;
    const itemOf = (plateId: string) => items.find((i) => i.plate.id === plateId)!;
    // Lay the second one out in the structure rendition, which its next version will not publish.
    await updateEditionItem(db, editor, id, itemOf(losesPlate).id, { slot: "web", rendition: "structure" });
    expect(itemOf(keepsPlate)).toMatchObject({ version: 1, currentVersion: 1 });
    // Nothing newer yet: refused with the reason.
    const same = await ed.json(`/api/editions/${id}/items/${itemOf(keepsPlate).id}/newest-version`, {});
    expect(same.status).toBe(409);
    expect((same.body as { error: { message: string } }).error.message).toMatch(/already uses version 1/);

    await addVersion(keepsPlate, ["natural", "structure"]);
    await addVersion(losesPlate, ["natural"]);
    await addVersion(withdrawnPlate, ["natural"]);
    await db.update(plates).set({ state: "withdrawn" }).where(eq(plates.id, withdrawnPlate));
    items = (await findEdition(db, editor, id)).items;
    // The pinned version stays until the editor moves it; the newer one is offered.
    expect(itemOf(keepsPlate)).toMatchObject({ version: 1, currentVersion: 2, rendition: "natural" });

    expect((await mem.json(`/api/editions/${id}/items/${itemOf(keepsPlate).id}/newest-version`, {})).status).toBe(403);
    const kept = await ed.json(`/api/editions/${id}/items/${itemOf(keepsPlate).id}/newest-version`, {});
    expect(kept.status).toBe(200);
    expect(kept.body).toEqual({ fromVersion: 1, version: 2, rendition: "natural", renditionNote: null });
    const moved = await ed.json(`/api/editions/${id}/items/${itemOf(losesPlate).id}/newest-version`, {});
    expect(moved.status).toBe(200);
    expect(moved.body).toMatchObject({ fromVersion: 1, version: 2, rendition: "natural" });
    expect((moved.body as { renditionNote: string }).renditionNote).toMatch(/no structure rendition.*natural rendition is used instead/);
    const withdrawn = await ed.json(`/api/editions/${id}/items/${itemOf(withdrawnPlate).id}/newest-version`, {});
    expect(withdrawn.status).toBe(409);
    expect((withdrawn.body as { error: { message: string } }).error.message).toMatch(/is withdrawn/);

    items = (await findEdition(db, editor, id)).items;
    expect(items.map((i) => [i.plate.id, i.version, i.rendition, i.position])).toEqual([
      [keepsPlate, 2, "natural", 1],
      [losesPlate, 2, "natural", 2],
      [withdrawnPlate, 1, "natural", 3],
    ]);
    // The new version's size is what the check reads now.
    expect(itemOf(losesPlate).available).toEqual({ width: 2400, height: 1800 });
    const changes = (await auditActions(id)).filter((a) => a.action === "edition.plate-version-changed").map((a) => a.detail);
    expect(changes).toEqual([
      { plateId: keepsPlate, fromVersion: 1, version: 2, rendition: "natural", fromRendition: "natural" },
      { plateId: losesPlate, fromVersion: 1, version: 2, rendition: "natural", fromRendition: "structure" },
    ]);

    // Exported: the plates are fixed, a newer version included.
    await addVersion(keepsPlate, ["natural"]);
    await db.update(editions).set({ state: "exported" }).where(eq(editions.id, id));
    const late = await ed.json(`/api/editions/${id}/items/${itemOf(keepsPlate).id}/newest-version`, {});
    expect(late.status).toBe(409);
    expect((late.body as { error: { message: string } }).error.message).toMatch(/was exported/);
    expect((await findEdition(db, editor, id)).items.find((i) => i.plate.id === keepsPlate)).toMatchObject({ version: 2, currentVersion: 3 });
  });
});
