// The plate desk: curators turn an approved set's finished reduction, or a
// finished composite of approved sets, into a plate, write what the public
// reads, publish, withdraw, restore and add versions. Every function takes the actor and requires review:use; every
// change writes the audit log in the same transaction as the change.
import { and, asc, eq, sql } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { bracketSets, compositeInputs, composites, type BracketSetState, PLATE_LICENCES, plates, plateVersions, reductions, users, type Plate, type PlateLicence, type Rendition, type WithdrawalKind } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { appLink } from "@/lib/email/app-link";
import { sendStagedMail, stageMail } from "@/lib/email/outbox";
import { plateStateMail } from "@/lib/email/templates";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { AppError, notFound } from "@/lib/errors";
import { parseInput } from "@/lib/validation";
import { draftPlateSchema, newVersionSchema, plateEditSchema, withdrawSchema, type PlateEditInput } from "./desk-input";
import { createPlateFromComposite, createPlateFromReduction, readCompositeForPlate, readReductionForPlate, slugify, versionSource, type NewPlateTexts, type PreparedSource } from "./publish";
import { makeWebJpeg } from "./web-jpeg";
import { forgetPublicAccess } from "@/lib/reductions/files/serve";

export { countWords, CAPTION_MAX_WORDS } from "./desk-input";

export const PLATE_NOT_FOUND = "That plate";

/** The plate desk's one permission: curators (review:use) do everything on it. */
export function requireCurator(actor: Actor | null, what: string): Actor {
  return requirePermission(actor, "review:use", what);
}

export async function findPlateRow(db: Db, plateId: string): Promise<Plate> {
  if (!/^[0-9a-f-]{36}$/i.test(plateId)) throw notFound(PLATE_NOT_FOUND);
  const [plate] = await db.select().from(plates).where(eq(plates.id, plateId)).limit(1);
  if (!plate) throw notFound(PLATE_NOT_FOUND);
  return plate;
}

async function requireApprovedSet(db: Db, setId: string, doing: string): Promise<{ name: string; ownerName: string }> {
  const [set] = await db
    .select({ name: bracketSets.name, state: bracketSets.state, ownerName: users.name })
    .from(bracketSets)
    .innerJoin(users, eq(users.id, bracketSets.ownerId))
    .where(eq(bracketSets.id, setId))
    .limit(1);
  if (!set) throw notFound("That bracket set");
  if (set.state !== "approved") {
    throw new AppError("conflict", `The bracket set "${set.name}" is ${set.state}; it must be approved on the review desk before ${doing}.`);
  }
  return set;
}

export interface CompositeSetRow {
  id: string;
  name: string;
  state: BracketSetState;
  ownerName: string;
  ownerEmail: string;
  siteId: string;
}

/** The bracket sets a composite is made of, each with its photographer and site, in the composite's order. */
export async function findCompositeSets(db: DbOrTx, compositeId: string): Promise<CompositeSetRow[]> {
  return db
    .select({ id: bracketSets.id, name: bracketSets.name, state: bracketSets.state, ownerName: users.name, ownerEmail: users.email, siteId: bracketSets.siteId })
    .from(compositeInputs)
    .innerJoin(reductions, eq(reductions.id, compositeInputs.reductionId))
    .innerJoin(bracketSets, eq(bracketSets.id, reductions.bracketSetId))
    .innerJoin(users, eq(users.id, bracketSets.ownerId))
    .where(eq(compositeInputs.compositeId, compositeId))
    .orderBy(asc(compositeInputs.position));
}

/** Every input's set approved: a composite's plate publishes nobody's data before the curators have seen it. */
async function requireApprovedInputs(db: DbOrTx, compositeId: string, doing: string): Promise<{ name: string; ownerName: string }[]> {
  const sets = await findCompositeSets(db, compositeId);
  if (sets.length === 0) throw notFound("That composite");
  const waiting = sets.filter((s) => s.state !== "approved");
  if (waiting.length) {
    const list = waiting.map((s) => `"${s.name}" (${s.state})`).join(", ");
    throw new AppError("conflict", `Every bracket set in the composite must be approved on the review desk before ${doing}; not yet: ${list}.`);
  }
  return sets;
}

/** The composite shown by a plate's current version, or null for a reduction's plate. */
async function findCurrentComposite(db: DbOrTx, plate: Plate): Promise<string | null> {
  const [v] = await db
    .select({ compositeId: plateVersions.compositeId })
    .from(plateVersions)
    .where(and(eq(plateVersions.plateId, plate.id), eq(plateVersions.version, plate.currentVersion)))
    .limit(1);
  return v?.compositeId ?? null;
}

/** "A", "A and B", "A, B and C": the data credit of several photographers. */
export function joinNames(names: string[]): string {
  const unique = [...new Set(names)];
  return unique.length <= 1 ? (unique[0] ?? "") : `${unique.slice(0, -1).join(", ")} and ${unique.at(-1)}`;
}

/** True for PostgreSQL's unique violation on the slug index, however the driver wraps it. */
function isSlugTaken(err: unknown): boolean {
  for (let e = err as { code?: string; constraint?: string; cause?: unknown } | undefined; e; e = e.cause as typeof e) {
    if (e.code === "23505" && e.constraint === "plates_slug_key") return true;
  }
  return false;
}

const slugTaken = (slug: string) => new AppError("invalid_input", `The link name "${slug}" is taken by another plate.`, [{ field: "slug", message: "already taken" }]);

async function uniqueSlug(db: Db, base: string): Promise<string> {
  for (let i = 1; i < 50; i++) {
    const candidate = i === 1 ? base : `${base.slice(0, 76)}-${i}`;
    const [taken] = await db.select({ id: plates.id }).from(plates).where(eq(plates.slug, candidate)).limit(1);
    if (!taken) return candidate;
  }
  return `${base.slice(0, 70)}-${Date.now().toString(36)}`;
}

/** The society's default licence, when it is one a plate may carry; CC BY 4.0 otherwise. */
export function toPlateLicence(id: string): PlateLicence {
  return (PLATE_LICENCES as readonly string[]).includes(id) ? (id as PlateLicence) : "CC-BY-4.0";
}

/** The processing credit the editor offers first: the pipeline and its version. */
export function pipelineCredit(pipelineVersion: string | null): string {
  return pipelineVersion ? `Crownlight pipeline ${pipelineVersion}` : "Crownlight pipeline";
}

/**
 * A draft plate from a finished reduction of an approved set, prefilled: the
 * set's name as title, the photographer as data acquisition credit, the
 * pipeline and its version as processing credit, the society's default licence.
 */
export async function createDraftPlate(db: Db, actor: Actor | null, input: unknown): Promise<{ id: string; slug: string }> {
  const curator = requireCurator(actor, "making plates");
  const { reductionId, compositeId, renditions } = parseInput(draftPlateSchema, input);
  if (compositeId) return createDraftCompositePlate(db, curator, compositeId, renditions);
  if (!reductionId) throw notFound("That reduction");
  const [red] = await db
    .select({ setId: reductions.bracketSetId, state: reductions.state, pipelineVersion: reductions.pipelineVersion })
    .from(reductions)
    .where(eq(reductions.id, reductionId))
    .limit(1);
  if (!red) throw notFound("That reduction");
  const set = await requireApprovedSet(db, red.setId, "a plate can be made from it");
  const settings = await findSocietySettings(db);
  const slug = await uniqueSlug(db, slugify(set.name));
  const texts = draftTexts({ slug, title: set.name, acquiredBy: set.ownerName, processedBy: pipelineCredit(red.pipelineVersion), renditions, curator, licence: settings.defaultLicence });
  return writeDraft(db, curator, { reductionId, renditions, slug }, (tx) => createPlateFromReduction(tx, { reductionId, ...texts }));
}

/**
 * A draft plate from a finished composite whose inputs' sets are all approved:
 * the composite's title, every input's photographer as data credit, whoever
 * composed it (with the pipeline) as processing credit.
 */
async function createDraftCompositePlate(db: Db, curator: Actor, compositeId: string, renditions: Rendition[]): Promise<{ id: string; slug: string }> {
  const [row] = await db
    .select({ title: composites.title, state: composites.state, pipelineVersion: composites.pipelineVersion, composer: users.name })
    .from(composites)
    .leftJoin(users, eq(users.id, composites.composedBy))
    .where(eq(composites.id, compositeId))
    .limit(1);
  if (!row) throw notFound("That composite");
  if (row.state !== "done") throw new AppError("conflict", `The composite "${row.title}" is ${row.state}; a plate can be made once it has finished.`);
  const sets = await requireApprovedInputs(db, compositeId, "a plate can be made from it");
  const settings = await findSocietySettings(db);
  const slug = await uniqueSlug(db, slugify(row.title));
  const pipeline = pipelineCredit(row.pipelineVersion);
  const texts = draftTexts({
    slug,
    title: row.title,
    acquiredBy: joinNames(sets.map((s) => s.ownerName)),
    processedBy: row.composer ? `${row.composer} (composite), ${pipeline}` : pipeline,
    renditions,
    curator,
    licence: settings.defaultLicence,
  });
  return writeDraft(db, curator, { compositeId, renditions, slug }, (tx) => createPlateFromComposite(tx, { compositeId, ...texts }));
}

/** A draft's first texts: empty caption, description and alt text, the society's licence, not published. */
function draftTexts(d: { slug: string; title: string; acquiredBy: string; processedBy: string; renditions: Rendition[]; curator: Actor; licence: string }): NewPlateTexts {
  return {
    slug: d.slug, title: d.title, caption: "", description: "", altText: "", acquiredBy: d.acquiredBy, processedBy: d.processedBy,
    licence: toPlateLicence(d.licence), renditions: d.renditions, publish: false, createdBy: d.curator.userId,
  };
}

/** The draft and its audit row in one transaction; another draft taking the same link name at the same moment is said so. */
async function writeDraft(db: Db, curator: Actor, detail: Record<string, unknown> & { slug: string }, create: (tx: DbOrTx) => Promise<{ id: string; slug: string }>): Promise<{ id: string; slug: string }> {
  try {
    return await db.transaction(async (tx) => {
      const plate = await create(tx);
      await recordAudit(tx, { actorId: curator.userId, action: "plate.created", subjectType: "plate", subjectId: plate.id, detail });
      return plate;
    });
  } catch (err) {
    throw isSlugTaken(err) ? new AppError("conflict", `Another plate took the link name "${detail.slug}" at the same moment; try again.`) : err;
  }
}

const EDITABLE: (keyof PlateEditInput)[] = ["title", "caption", "description", "altText", "acquiredBy", "processedBy", "licence", "slug"];

/** Title, caption, description, alt text, credits, licence and link name. Returns the fields that changed. */
export async function updatePlate(db: Db, actor: Actor | null, plateId: string, input: unknown): Promise<string[]> {
  const curator = requireCurator(actor, "editing plates");
  const values = parseInput(plateEditSchema, input);
  const before = await findPlateRow(db, plateId);
  if (before.state === "withdrawn" && before.withdrawnKind === "permanent") {
    throw new AppError("conflict", `"${before.title}" was withdrawn for good; its record is kept as it was.`);
  }
  if (values.slug !== before.slug) {
    // Published links are permanent: the link name is fixed once the public has seen it.
    if (before.publishedAt) throw new AppError("invalid_input", "The link name cannot change after publishing: published links are permanent.", [{ field: "slug", message: "fixed after publishing" }]);
    const [taken] = await db.select({ id: plates.id }).from(plates).where(eq(plates.slug, values.slug)).limit(1);
    if (taken) throw slugTaken(values.slug);
  }
  const changed = EDITABLE.filter((k) => before[k] !== values[k]);
  if (changed.length === 0) return [];
  try {
    await db.transaction(async (tx) => {
      await tx
        .update(plates)
        .set({ ...values, updatedAt: sql`now()` })
        .where(eq(plates.id, plateId));
      await recordAudit(tx, {
        actorId: curator.userId,
        action: "plate.edited",
        subjectType: "plate",
        subjectId: plateId,
        detail: Object.fromEntries(changed.map((k) => [k, { from: before[k], to: values[k] }])),
      });
    });
  } catch (err) {
    // Another plate may take the same name between the check and the update.
    throw isSlugTaken(err) ? slugTaken(values.slug) : err;
  }
  // The public files carry the credits: write every version's again when the texts change.
  if (before.state === "published") {
    const versions = await db.select({ version: plateVersions.version }).from(plateVersions).where(eq(plateVersions.plateId, plateId));
    for (const { version } of versions) await makeWebJpeg(db, plateId, version);
  }
  return changed;
}

type PlateChange = "published" | "withdrawn-temporary" | "withdrawn-permanent" | "restored";

/**
 * Writes the photographer's mail about a change of their plate into the
 * outbox, in the caller's transaction: the change and its mail exist together
 * or not at all. Returns the outbox ids to send once the transaction commits.
 */
async function writePlateMail(tx: DbOrTx, plate: Plate, change: PlateChange, reason: string | null): Promise<string[]> {
  const compositeId = plate.bracketSetId ? null : await findCurrentComposite(tx, plate);
  const owners = plate.bracketSetId
    ? await tx
        .select({ name: users.name, email: users.email, setName: bracketSets.name })
        .from(bracketSets)
        .innerJoin(users, eq(users.id, bracketSets.ownerId))
        .where(eq(bracketSets.id, plate.bracketSetId))
        .limit(1)
    : compositeId
      ? (await findCompositeSets(tx, compositeId)).map((s) => ({ name: s.ownerName, email: s.ownerEmail, setName: s.name }))
      : [];
  const society = (await findSocietySettings(tx)).name;
  // One message to each photographer, naming their set (or sets) in the plate.
  const byEmail = new Map<string, { name: string; sets: string[] }>();
  for (const o of owners) byEmail.set(o.email, { name: o.name, sets: [...(byEmail.get(o.email)?.sets ?? []), o.setName] });
  const ids: string[] = [];
  for (const [email, owner] of byEmail) {
    ids.push(await stageMail(tx, plateStateMail(society, email, owner.name, { change, title: plate.title, setName: joinNames(owner.sets), reason, url: appLink(`/plates/${plate.slug}`) })));
  }
  return ids;
}

/**
 * After a state change has committed: the tile server forgets what it knew of
 * the plate's reductions (so a restored plate's images answer at once and a
 * withdrawn plate's stop at once), and the photographer's mail is queued.
 */
async function afterStateChange(db: Db, plateId: string, outboxIds: string[]): Promise<void> {
  const rows = await db.select({ reductionId: plateVersions.reductionId, compositeId: plateVersions.compositeId }).from(plateVersions).where(eq(plateVersions.plateId, plateId));
  for (const row of rows) forgetPublicAccess((row.reductionId ?? row.compositeId)!);
  await sendStagedMail(db, outboxIds);
}

/** Checks what publishing needs besides an approved set: the texts the public reads. */
function requireReadyToPublish(plate: Plate): void {
  const fields = [
    !plate.altText.trim() && { field: "altText", message: "alt text is required before publishing" },
    !plate.caption.trim() && { field: "caption", message: "a caption is required before publishing" },
  ].filter((x): x is { field: string; message: string } => Boolean(x));
  if (fields.length) throw new AppError("invalid_input", `"${plate.title}" is not ready: ${fields.map((f) => f.message).join("; ")}.`, fields);
}

/** Draft -> published, once the set (or every set of a composite) is approved. Makes the version's web JPEG first, so a failure publishes nothing. */
export async function publishPlate(db: Db, actor: Actor | null, plateId: string): Promise<void> {
  const curator = requireCurator(actor, "publishing plates");
  const plate = await findPlateRow(db, plateId);
  if (plate.state !== "draft") throw new AppError("conflict", `"${plate.title}" is ${plate.state}; only a draft can be published (a withdrawn plate is restored instead).`);
  requireReadyToPublish(plate);
  if (plate.bracketSetId) await requireApprovedSet(db, plate.bracketSetId, "its plate can be published");
  else {
    const compositeId = await findCurrentComposite(db, plate);
    if (!compositeId) throw notFound("What that plate shows");
    await requireApprovedInputs(db, compositeId, "its plate can be published");
  }
  await makeWebJpeg(db, plateId, plate.currentVersion);
  const outboxId = await db.transaction(async (tx) => {
    const done = await tx
      .update(plates)
      .set({ state: "published", publishedAt: sql`now()`, updatedAt: sql`now()` })
      .where(and(eq(plates.id, plateId), eq(plates.state, "draft")))
      .returning({ id: plates.id });
    if (!done.length) throw new AppError("conflict", `"${plate.title}" changed while you were publishing it; reload and try again.`);
    await recordAudit(tx, { actorId: curator.userId, action: "plate.published", subjectType: "plate", subjectId: plateId, detail: { version: plate.currentVersion } });
    return writePlateMail(tx, plate, "published", null);
  });
  await afterStateChange(db, plateId, outboxId);
}

/**
 * Published -> withdrawn (temporary or permanent), or a temporary withdrawal
 * made permanent. The plate keeps its record; its public page says why.
 */
export async function withdrawPlate(db: Db, actor: Actor | null, plateId: string, input: unknown): Promise<void> {
  const curator = requireCurator(actor, "withdrawing plates");
  const { reason, kind } = parseInput(withdrawSchema, input);
  const plate = await findPlateRow(db, plateId);
  const allowed = plate.state === "published" || (plate.state === "withdrawn" && plate.withdrawnKind === "temporary" && kind === "permanent");
  if (!allowed) {
    const now = plate.state === "withdrawn" ? `withdrawn (${plate.withdrawnKind ?? "temporary"})` : plate.state;
    throw new AppError("conflict", `"${plate.title}" is ${now}; only a published plate, or one withdrawn for the time being, can be withdrawn${kind === "permanent" ? " for good" : ""}.`);
  }
  const outboxId = await db.transaction(async (tx) => {
    await tx
      .update(plates)
      .set({ state: "withdrawn", withdrawnAt: sql`now()`, withdrawnReason: reason, withdrawnKind: kind, updatedAt: sql`now()` })
      .where(eq(plates.id, plateId));
    await recordAudit(tx, { actorId: curator.userId, action: "plate.withdrawn", subjectType: "plate", subjectId: plateId, detail: { from: plate.state, kind, reason } });
    return writePlateMail(tx, plate, kind === "temporary" ? "withdrawn-temporary" : "withdrawn-permanent", reason);
  });
  await afterStateChange(db, plateId, outboxId);
}

/** A plate withdrawn for the time being goes back to the gallery. One withdrawn for good stays withdrawn. */
export async function restorePlate(db: Db, actor: Actor | null, plateId: string): Promise<void> {
  const curator = requireCurator(actor, "restoring plates");
  const plate = await findPlateRow(db, plateId);
  if (plate.state !== "withdrawn") throw new AppError("conflict", `"${plate.title}" is ${plate.state}; only a withdrawn plate can be restored.`);
  if (plate.withdrawnKind === "permanent") throw new AppError("conflict", `"${plate.title}" was withdrawn for good and cannot be restored.`);
  const outboxId = await db.transaction(async (tx) => {
    await tx
      .update(plates)
      .set({ state: "published", withdrawnAt: null, withdrawnReason: null, withdrawnKind: null, updatedAt: sql`now()` })
      .where(eq(plates.id, plateId));
    await recordAudit(tx, { actorId: curator.userId, action: "plate.restored", subjectType: "plate", subjectId: plateId, detail: { reason: plate.withdrawnReason } });
    return writePlateMail(tx, plate, "restored", null);
  });
  await afterStateChange(db, plateId, outboxId);
}

/**
 * Replaces the reduction a plate shows: version n+1 with a change note, and
 * the current version moves to it. Earlier versions stay at /plates/{slug}/v/{n}.
 * The reduction must be a finished one of the same bracket set.
 */
export async function addPlateVersion(db: Db, actor: Actor | null, plateId: string, input: unknown): Promise<{ version: number }> {
  const curator = requireCurator(actor, "replacing a plate's reduction");
  const { reductionId, compositeId, renditions, changeNote } = parseInput(newVersionSchema, input);
  const plate = await findPlateRow(db, plateId);
  if (plate.state === "withdrawn" && plate.withdrawnKind === "permanent") throw new AppError("conflict", `"${plate.title}" was withdrawn for good; it takes no new versions.`);
  let prepared: PreparedSource;
  if (plate.bracketSetId) {
    if (!reductionId) throw new AppError("invalid_input", "This plate shows one bracket set: its new version is another reduction of that set.", [{ field: "reductionId", message: "choose a reduction of the plate's own bracket set" }]);
    prepared = await readReductionForPlate(db, reductionId, renditions as Rendition[]);
    if (prepared.setId !== plate.bracketSetId) {
      throw new AppError("invalid_input", "The new reduction must come from the plate's own bracket set.", [{ field: "reductionId", message: "from another bracket set" }]);
    }
  } else {
    if (!compositeId) throw new AppError("invalid_input", "This plate shows a composite: its new version is another finished composite.", [{ field: "compositeId", message: "choose a finished composite" }]);
    prepared = await readCompositeForPlate(db, compositeId, renditions as Rendition[]);
    if (prepared.eclipseId !== plate.eclipseId) throw new AppError("invalid_input", "The new composite must be of the plate's own eclipse.", [{ field: "compositeId", message: "of another eclipse" }]);
    if (plate.state !== "draft") await requireApprovedInputs(db, compositeId, "it can be shown on a published plate");
  }
  const source = prepared.source;
  const version = await db.transaction(async (tx) => {
    // Lock the plate row so two curators cannot both add version n+1.
    const [locked] = await tx.select({ current: plates.currentVersion }).from(plates).where(eq(plates.id, plateId)).for("update");
    const [{ max }] = await tx.select({ max: sql<number>`coalesce(max(${plateVersions.version}), 0)::int` }).from(plateVersions).where(eq(plateVersions.plateId, plateId));
    const next = Math.max(max, locked.current) + 1;
    await tx.insert(plateVersions).values({ plateId, version: next, ...versionSource(source), renditions: prepared.renditions, imageSizes: prepared.imageSizes, geometry: prepared.geometry, facts: prepared.facts, changeNote, createdBy: curator.userId });
    await tx.update(plates).set({ currentVersion: next, updatedAt: sql`now()` }).where(eq(plates.id, plateId));
    await recordAudit(tx, { actorId: curator.userId, action: "plate.version-added", subjectType: "plate", subjectId: plateId, detail: { from: locked.current, to: next, [source.kind === "composite" ? "compositeId" : "reductionId"]: source.id, changeNote } });
    return next;
  });
  forgetPublicAccess(source.id);
  if (plate.state !== "draft") await makeWebJpeg(db, plateId, version);
  return { version };
}

export type { WithdrawalKind };
