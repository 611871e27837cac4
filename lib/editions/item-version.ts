// Moving an edition item to its plate's newest version. An item pins the
// version it was chosen at, so a curator's new version never changes a laid-out
// edition by itself; the editor takes it here, on purpose, while the edition is
// a draft.
import { and, eq } from "drizzle-orm";
import type { Db } from "@/db/client";
import { editionItems, plates, plateVersions, type Rendition } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import type { Actor } from "@/lib/auth/actor";
import { AppError, notFound } from "@/lib/errors";
import { lockDraftEdition, lockItem, requireEditor, touch } from "./guards";

export interface ItemVersionChangeDto {
  fromVersion: number;
  version: number;
  rendition: Rendition;
  /** Set when the item's rendition is not in the new version and the first one was taken instead. */
  renditionNote: string | null;
}

export async function pinNewestPlateVersion(db: Db, actor: Actor | null, editionId: string, itemId: string): Promise<ItemVersionChangeDto> {
  const editor = requireEditor(actor, "building editions");
  return db.transaction(async (tx) => {
    await lockDraftEdition(tx, editionId);
    const item = await lockItem(tx, editionId, itemId);
    const [plate] = await tx
      .select({ title: plates.title, state: plates.state, version: plates.currentVersion, renditions: plateVersions.renditions })
      .from(plates)
      .innerJoin(plateVersions, and(eq(plateVersions.plateId, plates.id), eq(plateVersions.version, plates.currentVersion)))
      .where(eq(plates.id, item.plateId))
      .limit(1);
    if (!plate) throw notFound("That plate");
    if (plate.state !== "published") {
      throw new AppError("conflict", `"${plate.title}" is ${plate.state}; only a published plate's newest version can be taken into an edition.`);
    }
    if (plate.version <= item.plateVersion) {
      throw new AppError("conflict", `"${plate.title}" already uses version ${item.plateVersion}, its newest.`);
    }
    const [first] = plate.renditions;
    if (!first) throw new AppError("conflict", `Version ${plate.version} of "${plate.title}" published no rendition.`);
    const keeps = plate.renditions.includes(item.rendition);
    const rendition = keeps ? item.rendition : first;
    await tx.update(editionItems).set({ plateVersion: plate.version, rendition }).where(eq(editionItems.id, itemId));
    await touch(tx, editionId);
    await recordAudit(tx, {
      actorId: editor.userId,
      action: "edition.plate-version-changed",
      subjectType: "edition",
      subjectId: editionId,
      detail: { plateId: item.plateId, fromVersion: item.plateVersion, version: plate.version, rendition, fromRendition: item.rendition },
    });
    return {
      fromVersion: item.plateVersion,
      version: plate.version,
      rendition,
      renditionNote: keeps ? null : `Version ${plate.version} has no ${item.rendition} rendition, so the ${rendition} rendition is used instead.`,
    };
  });
}
