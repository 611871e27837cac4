// Editions: the editor builds a newsletter or journal issue from published
// plates. Every function takes the actor and requires editions:use; every
// change writes the audit log in the same transaction. Item positions stay
// 1..n: changes lock the edition row so two editors cannot interleave.
import { and, asc, desc, eq, gt, ilike, inArray, ne, or, sql, type SQL } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db/client";
import { editionExports, editionItems, editions, plates, plateVersions, type EditionKind, type EditionSlot, type EditionState, type PlateState, type Rendition } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { requireSignedIn, type Actor } from "@/lib/auth/actor";
import { can } from "@/lib/auth/permissions";
import { AppError, forbidden, notFound } from "@/lib/errors";
import { parseInput } from "@/lib/validation";
import { findActiveExport } from "./export/active";
import { findEditionRow, isUuid, lockDraftEdition, lockEdition, lockItem, requireEditor, touch, type LockedEdition } from "./guards";
import { addItemSchema, editionNameSchema, embargoSchema, moveItemSchema, newEditionSchema, updateItemSchema, type EditionNameInput } from "./input";
import { compareWithRendition, SLOT_SPECS, type PixelSize } from "./print-sizes";
import { plateFilesBase, sourceOfVersion } from "@/lib/plates/source";

export interface OtherEditionDto {
  id: string;
  title: string;
  issueLabel: string;
  embargoDate: string | null;
}

export interface EditionRowDto {
  id: string;
  title: string;
  kind: EditionKind;
  issueLabel: string;
  embargoDate: string | null;
  state: EditionState;
  itemCount: number;
  updatedAt: string;
}

export interface EditionItemDto {
  id: string;
  position: number;
  plate: { id: string; title: string; slug: string; state: PlateState; caption: string; observer: string };
  /** The pinned plate version. */
  version: number;
  /** The plate's newest version; above `version` when a newer one was made after this plate was chosen. */
  currentVersion: number;
  slot: EditionSlot;
  slotLabel: string;
  customWidthMm: number | null;
  customDpi: number | null;
  rendition: Rendition;
  /** The renditions the pinned version published. */
  renditions: Rendition[];
  captionOverride: string | null;
  /** The pinned version's rendition sizes, so the builder can compare a slot before it is saved. */
  imageSizes: Partial<Record<Rendition, PixelSize>>;
  /** A small picture of the plate (the pinned version's preview). */
  thumbnailUrl: string;
  available: PixelSize | null;
  needed: PixelSize | null;
  enlargement: number | null;
  sizeWarning: string | null;
  /** Other editions holding the same plate. */
  alsoIn: OtherEditionDto[];
}

export interface EditionDto extends EditionRowDto {
  createdAt: string;
  items: EditionItemDto[];
}

export async function listEditions(db: Db, actor: Actor | null): Promise<EditionRowDto[]> {
  requireEditor(actor, "editions");
  const rows = await db
    .select({
      id: editions.id,
      title: editions.title,
      kind: editions.kind,
      issueLabel: editions.issueLabel,
      embargoDate: editions.embargoDate,
      state: editions.state,
      updatedAt: editions.updatedAt,
      itemCount: sql<number>`(select count(*)::int from ${editionItems} where ${editionItems.editionId} = ${editions.id})`,
    })
    .from(editions)
    .orderBy(desc(editions.createdAt))
    .limit(200);
  return rows.map((r) => ({ ...r, updatedAt: r.updatedAt.toISOString() }));
}

export async function createEdition(db: Db, actor: Actor | null, input: unknown): Promise<{ id: string }> {
  const editor = requireEditor(actor, "starting editions");
  const values = parseInput(newEditionSchema, input);
  return db.transaction(async (tx) => {
    const [row] = await tx.insert(editions).values({ ...values, createdBy: editor.userId }).returning({ id: editions.id });
    await recordAudit(tx, { actorId: editor.userId, action: "edition.created", subjectType: "edition", subjectId: row.id, detail: { title: values.title, kind: values.kind } });
    return row;
  });
}

/** Other editions holding each plate, keyed by plate id. */
async function otherEditionsOf(db: DbOrTx, plateIds: string[], exceptEditionId: string | null): Promise<Map<string, OtherEditionDto[]>> {
  const out = new Map<string, OtherEditionDto[]>();
  if (plateIds.length === 0) return out;
  const where: SQL[] = [inArray(editionItems.plateId, plateIds)];
  if (exceptEditionId) where.push(ne(editionItems.editionId, exceptEditionId));
  const rows = await db
    .select({ plateId: editionItems.plateId, id: editions.id, title: editions.title, issueLabel: editions.issueLabel, embargoDate: editions.embargoDate })
    .from(editionItems)
    .innerJoin(editions, eq(editions.id, editionItems.editionId))
    .where(and(...where))
    .orderBy(asc(editions.createdAt));
  for (const { plateId, ...e } of rows) out.set(plateId, [...(out.get(plateId) ?? []), e]);
  return out;
}

export async function findEdition(db: Db, actor: Actor | null, editionId: string): Promise<EditionDto> {
  requireEditor(actor, "editions");
  const edition = await findEditionRow(db, editionId);
  const rows = await db
    .select({
      id: editionItems.id,
      position: editionItems.position,
      version: editionItems.plateVersion,
      currentVersion: plates.currentVersion,
      slot: editionItems.slot,
      customWidthMm: editionItems.customWidthMm,
      customDpi: editionItems.customDpi,
      rendition: editionItems.rendition,
      captionOverride: editionItems.captionOverride,
      plate: { id: plates.id, title: plates.title, slug: plates.slug, state: plates.state, caption: plates.caption, observer: plates.acquiredBy },
      renditions: plateVersions.renditions,
      imageSizes: plateVersions.imageSizes,
      reductionId: plateVersions.reductionId,
      compositeId: plateVersions.compositeId,
    })
    .from(editionItems)
    .innerJoin(plates, eq(plates.id, editionItems.plateId))
    .innerJoin(plateVersions, and(eq(plateVersions.plateId, editionItems.plateId), eq(plateVersions.version, editionItems.plateVersion)))
    .where(eq(editionItems.editionId, editionId))
    .orderBy(asc(editionItems.position));
  const others = await otherEditionsOf(db, rows.map((r) => r.plate.id), editionId);
  return {
    ...edition,
    itemCount: rows.length,
    items: rows.map(({ imageSizes, reductionId, compositeId, ...r }) => {
      const available = imageSizes[r.rendition] ?? null;
      const custom = r.slot === "custom" && r.customWidthMm !== null && r.customDpi !== null ? { widthMm: r.customWidthMm, dpi: r.customDpi } : null;
      const need = available && (r.slot !== "custom" || custom) ? compareWithRendition(r.slot, custom, available) : null;
      return {
        ...r,
        imageSizes,
        thumbnailUrl: `${plateFilesBase(sourceOfVersion({ reductionId, compositeId }))}/preview.jpg`,
        slotLabel: r.slot === "custom" ? (custom ? `Custom, ${custom.widthMm} mm at ${custom.dpi} dpi` : "Custom (incomplete)") : SLOT_SPECS[r.slot].label,
        available,
        needed: need?.needed ?? null,
        enlargement: need?.enlargement ?? null,
        sizeWarning: need?.warning ?? (available ? null : `The ${r.rendition} rendition of version ${r.version} has no recorded size.`),
        alsoIn: others.get(r.plate.id) ?? [],
      };
    }),
  };
}

/**
 * Adds a published plate at the end, pinned to its current version, in the
 * first rendition it published. A plate already in another edition is added
 * all the same: the answer lists those editions so the editor is warned.
 */
export async function addEditionItem(db: Db, actor: Actor | null, editionId: string, input: unknown): Promise<{ itemId: string; alsoIn: OtherEditionDto[] }> {
  const editor = requireEditor(actor, "building editions");
  const { plateId, rendition } = parseInput(addItemSchema, input);
  return db.transaction(async (tx) => {
    const edition = await lockDraftEdition(tx, editionId);
    const [plate] = await tx
      .select({ title: plates.title, state: plates.state, version: plates.currentVersion, renditions: plateVersions.renditions })
      .from(plates)
      .innerJoin(plateVersions, and(eq(plateVersions.plateId, plates.id), eq(plateVersions.version, plates.currentVersion)))
      .where(eq(plates.id, plateId))
      .limit(1);
    if (!plate) throw notFound("That plate");
    // Editors see published plates only, so the refusal does not repeat a draft's title.
    if (plate.state !== "published") {
      throw new AppError("invalid_input", "plateId: that plate is not published; only published plates can go into an edition.", [{ field: "plateId", message: "the plate is not published" }]);
    }
    const chosen = rendition ?? plate.renditions[0];
    if (!chosen || !plate.renditions.includes(chosen)) {
      throw new AppError("invalid_input", `"${plate.title}" did not publish the ${chosen ?? "requested"} rendition.`, [{ field: "rendition", message: `expected one of ${plate.renditions.join(", ")}` }]);
    }
    const [dup] = await tx.select({ id: editionItems.id }).from(editionItems).where(and(eq(editionItems.editionId, editionId), eq(editionItems.plateId, plateId))).limit(1);
    if (dup) throw new AppError("conflict", `"${plate.title}" is already in "${edition.title}".`);
    const [{ max }] = await tx.select({ max: sql<number>`coalesce(max(${editionItems.position}), 0)::int` }).from(editionItems).where(eq(editionItems.editionId, editionId));
    const [item] = await tx
      .insert(editionItems)
      .values({ editionId, plateId, plateVersion: plate.version, position: max + 1, rendition: chosen })
      .returning({ id: editionItems.id });
    await touch(tx, editionId);
    const alsoIn = (await otherEditionsOf(tx, [plateId], editionId)).get(plateId) ?? [];
    await recordAudit(tx, { actorId: editor.userId, action: "edition.plate-added", subjectType: "edition", subjectId: editionId, detail: { plateId, version: plate.version, alsoIn: alsoIn.map((e) => e.id) } });
    return { itemId: item.id, alsoIn };
  });
}

/** Removes a plate; the ones after it move up so positions stay 1..n. */
export async function removeEditionItem(db: Db, actor: Actor | null, editionId: string, itemId: string): Promise<void> {
  const editor = requireEditor(actor, "building editions");
  await db.transaction(async (tx) => {
    await lockDraftEdition(tx, editionId);
    const item = await lockItem(tx, editionId, itemId);
    await tx.delete(editionItems).where(and(eq(editionItems.id, itemId), eq(editionItems.editionId, editionId)));
    await tx
      .update(editionItems)
      .set({ position: sql`${editionItems.position} - 1` })
      .where(and(eq(editionItems.editionId, editionId), gt(editionItems.position, item.position)));
    await touch(tx, editionId);
    await recordAudit(tx, { actorId: editor.userId, action: "edition.plate-removed", subjectType: "edition", subjectId: editionId, detail: { plateId: item.plateId } });
  });
}

/** Swaps a plate with its neighbour above or below; at either end nothing changes. Returns the new position. */
export async function moveEditionItem(db: Db, actor: Actor | null, editionId: string, itemId: string, input: unknown): Promise<{ position: number }> {
  requireEditor(actor, "building editions");
  const { direction } = parseInput(moveItemSchema, input);
  return db.transaction(async (tx) => {
    await lockDraftEdition(tx, editionId);
    const item = await lockItem(tx, editionId, itemId);
    const target = direction === "up" ? item.position - 1 : item.position + 1;
    const [neighbour] = await tx
      .select({ id: editionItems.id })
      .from(editionItems)
      .where(and(eq(editionItems.editionId, editionId), eq(editionItems.position, target)))
      .limit(1);
    if (!neighbour) return { position: item.position };
    await tx.update(editionItems).set({ position: item.position }).where(eq(editionItems.id, neighbour.id));
    await tx.update(editionItems).set({ position: target }).where(eq(editionItems.id, itemId));
    await touch(tx, editionId);
    return { position: target };
  });
}

/** Slot (preset or custom mm and dpi), rendition among those the pinned version published, caption override. */
export async function updateEditionItem(db: Db, actor: Actor | null, editionId: string, itemId: string, input: unknown): Promise<void> {
  const editor = requireEditor(actor, "building editions");
  const values = parseInput(updateItemSchema, input);
  await db.transaction(async (tx) => {
    await lockDraftEdition(tx, editionId);
    const item = await lockItem(tx, editionId, itemId);
    const [version] = await tx
      .select({ renditions: plateVersions.renditions })
      .from(plateVersions)
      .where(and(eq(plateVersions.plateId, item.plateId), eq(plateVersions.version, item.plateVersion)))
      .limit(1);
    if (!version?.renditions.includes(values.rendition)) {
      throw new AppError("invalid_input", `rendition: version ${item.plateVersion} of this plate did not publish the ${values.rendition} rendition.`, [
        { field: "rendition", message: `expected one of ${(version?.renditions ?? []).join(", ")} (received "${values.rendition}")` },
      ]);
    }
    const custom = values.slot === "custom";
    const caption = values.captionOverride.trim();
    await tx
      .update(editionItems)
      .set({
        slot: values.slot,
        customWidthMm: custom ? (values.customWidthMm ?? null) : null,
        customDpi: custom ? (values.customDpi ?? null) : null,
        rendition: values.rendition,
        captionOverride: caption === "" ? null : caption,
      })
      .where(eq(editionItems.id, itemId));
    await touch(tx, editionId);
    await recordAudit(tx, { actorId: editor.userId, action: "edition.plate-laid-out", subjectType: "edition", subjectId: editionId, detail: { plateId: item.plateId, slot: values.slot, rendition: values.rendition } });
  });
}

/** Title, kind and issue label. Allowed in any state: it only names the edition. */
export async function renameEdition(db: Db, actor: Actor | null, editionId: string, input: unknown): Promise<EditionNameInput & { changed: boolean }> {
  const editor = requireEditor(actor, "building editions");
  const to = parseInput(editionNameSchema, input);
  return db.transaction(async (tx) => {
    const row = await lockEdition(tx, editionId);
    const from = { title: row.title, kind: row.kind, issueLabel: row.issueLabel };
    const changed = from.title !== to.title || from.kind !== to.kind || from.issueLabel !== to.issueLabel;
    if (!changed) return { ...to, changed };
    await tx.update(editions).set({ ...to, updatedAt: sql`now()` }).where(eq(editions.id, editionId));
    await recordAudit(tx, { actorId: editor.userId, action: "edition.renamed", subjectType: "edition", subjectId: editionId, detail: { from, to } });
    return { ...to, changed };
  });
}

/**
 * Every reason an edition may not be deleted, in one place; deleteEdition
 * calls it with the edition row locked. An exported edition stays as the
 * record of what went to print.
 */
async function refuseDeletion(tx: DbOrTx, editionId: string, edition: LockedEdition): Promise<void> {
  if (edition.state !== "draft") throw new AppError("conflict", `"${edition.title}" was exported; it stays as a record of what went to print and cannot be deleted.`);
  if (await findActiveExport(tx, editionId)) throw new AppError("conflict", `"${edition.title}" is being exported; wait for the bundle before deleting it.`);
  // Reopened after an export: its bundles are the record of what went to print.
  const [bundle] = await tx
    .select({ id: editionExports.id })
    .from(editionExports)
    .where(and(eq(editionExports.editionId, editionId), eq(editionExports.state, "done")))
    .limit(1);
  if (bundle) throw new AppError("conflict", `"${edition.title}" has print bundles; it stays as a record of what went to print and cannot be deleted.`);
}

/** Deletes a draft edition and its items (the plates themselves stay). */
export async function deleteEdition(db: Db, actor: Actor | null, editionId: string): Promise<void> {
  const editor = requireEditor(actor, "deleting editions");
  await db.transaction(async (tx) => {
    const edition = await lockEdition(tx, editionId);
    await refuseDeletion(tx, editionId, edition);
    const items = await tx.select({ plateId: editionItems.plateId, version: editionItems.plateVersion }).from(editionItems).where(eq(editionItems.editionId, editionId)).orderBy(asc(editionItems.position));
    // edition_items go with it (on delete cascade).
    await tx.delete(editions).where(eq(editions.id, editionId));
    await recordAudit(tx, {
      actorId: editor.userId,
      action: "edition.deleted",
      subjectType: "edition",
      subjectId: editionId,
      detail: { title: edition.title, kind: edition.kind, issueLabel: edition.issueLabel, plates: items },
    });
  });
}

export async function setEditionEmbargo(db: Db, actor: Actor | null, editionId: string, input: unknown): Promise<{ embargoDate: string | null }> {
  const editor = requireEditor(actor, "building editions");
  const { embargoDate } = parseInput(embargoSchema, input);
  await db.transaction(async (tx) => {
    await findEditionRow(tx, editionId);
    await tx.update(editions).set({ embargoDate, updatedAt: sql`now()` }).where(eq(editions.id, editionId));
    await recordAudit(tx, { actorId: editor.userId, action: "edition.embargo-set", subjectType: "edition", subjectId: editionId, detail: { embargoDate } });
  });
  return { embargoDate };
}

export interface PickablePlateDto {
  id: string;
  title: string;
  slug: string;
  observer: string;
  version: number;
  renditions: Rendition[];
  /** Editions other than this one that hold the plate. */
  alsoIn: OtherEditionDto[];
  /** True when the plate is in this edition already. */
  inThisEdition: boolean;
}

/** Published plates for the picker, newest first, searched in title, caption and observer. */
export async function listPickablePlates(db: Db, actor: Actor | null, editionId: string, q = ""): Promise<PickablePlateDto[]> {
  requireEditor(actor, "editions");
  await findEditionRow(db, editionId);
  const where: SQL[] = [eq(plates.state, "published")];
  if (q.trim()) {
    const like = `%${q.trim().replace(/[%_\\]/g, (c) => `\\${c}`)}%`;
    where.push(or(ilike(plates.title, like), ilike(plates.caption, like), ilike(plates.acquiredBy, like)) as SQL);
  }
  const rows = await db
    .select({ id: plates.id, title: plates.title, slug: plates.slug, observer: plates.acquiredBy, version: plates.currentVersion, renditions: plateVersions.renditions })
    .from(plates)
    .innerJoin(plateVersions, and(eq(plateVersions.plateId, plates.id), eq(plateVersions.version, plates.currentVersion)))
    .where(and(...where))
    .orderBy(desc(plates.publishedAt))
    .limit(50);
  const ids = rows.map((r) => r.id);
  const others = await otherEditionsOf(db, ids, editionId);
  const here = ids.length
    ? new Set((await db.select({ plateId: editionItems.plateId }).from(editionItems).where(and(eq(editionItems.editionId, editionId), inArray(editionItems.plateId, ids)))).map((r) => r.plateId))
    : new Set<string>();
  return rows.map((r) => ({ ...r, alsoIn: others.get(r.id) ?? [], inThisEdition: here.has(r.id) }));
}

export interface PlatePublicationDto extends OtherEditionDto {
  kind: EditionKind;
  state: EditionState;
  version: number;
  position: number;
}

/** The editions a plate went into, for the curator's plate page (curators) or editors. */
export async function listEditionsOfPlate(db: Db, actor: Actor | null, plateId: string): Promise<PlatePublicationDto[]> {
  // Curators read it on the plate page, editors where they build editions.
  const signedIn = requireSignedIn(actor);
  if (!can(signedIn.roles, "review:use") && !can(signedIn.roles, "editions:use")) throw forbidden("a plate's publication history");
  if (!isUuid(plateId)) throw notFound("That plate");
  return db
    .select({ id: editions.id, title: editions.title, issueLabel: editions.issueLabel, embargoDate: editions.embargoDate, kind: editions.kind, state: editions.state, version: editionItems.plateVersion, position: editionItems.position })
    .from(editionItems)
    .innerJoin(editions, eq(editions.id, editionItems.editionId))
    .where(eq(editionItems.plateId, plateId))
    .orderBy(asc(editions.createdAt));
}
