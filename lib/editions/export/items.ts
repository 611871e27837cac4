// The plates of an export, in print order, with what their files need: the
// plate and the version's facts, the stored outputs' prefix, the site at its
// public label and the kit; and each plate's file-name stem from the editor's
// template.
import { and, asc, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { bracketSets, composites, editionItems, kits, plates, plateVersions, reductions, sites } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { buildFileNames, MAX_FILE_NAME_LENGTH } from "../file-names";
import type { SLOT_SPECS } from "../print-sizes";

/** Room left in a file name for the variant suffix the render adds (-cmyk, -grey). */
const VARIANT_SUFFIX_ROOM = 10;

export interface ItemRow {
  position: number;
  slot: keyof typeof SLOT_SPECS | "custom";
  customWidthMm: number | null;
  customDpi: number | null;
  rendition: "natural" | "structure";
  captionOverride: string | null;
  version: number;
  plate: typeof plates.$inferSelect;
  facts: (typeof plateVersions.$inferSelect)["facts"];
  prefix: string | null;
  site: { name: string; precision: "exact" | "rounded" | "hidden"; latDeg: number; lonDeg: number; elevationM: number } | null;
  kit: { name: string; camera: string; focalMm: number; fNumber: number } | null;
}

export async function loadItems(db: DbOrTx, editionId: string): Promise<ItemRow[]> {
  const rows = await db
    .select({
      position: editionItems.position,
      slot: editionItems.slot,
      customWidthMm: editionItems.customWidthMm,
      customDpi: editionItems.customDpi,
      rendition: editionItems.rendition,
      captionOverride: editionItems.captionOverride,
      version: editionItems.plateVersion,
      plate: plates,
      facts: plateVersions.facts,
      outputs: reductions.outputs,
      compositeOutputs: composites.outputs,
      site: { name: sites.publicLabel, precision: sites.precision, latDeg: sites.latDeg, lonDeg: sites.lonDeg, elevationM: sites.elevationM },
      kitId: kits.id,
      kit: { name: kits.name, camera: kits.camera, focalMm: kits.focalMm, fNumber: kits.fNumber },
    })
    .from(editionItems)
    .innerJoin(plates, eq(plates.id, editionItems.plateId))
    .innerJoin(plateVersions, and(eq(plateVersions.plateId, editionItems.plateId), eq(plateVersions.version, editionItems.plateVersion)))
    // A version shows a reduction or a composite; a composite's plate has no one set, site or kit.
    .leftJoin(reductions, eq(reductions.id, plateVersions.reductionId))
    .leftJoin(composites, eq(composites.id, plateVersions.compositeId))
    .leftJoin(bracketSets, eq(bracketSets.id, plates.bracketSetId))
    .leftJoin(sites, eq(sites.id, bracketSets.siteId))
    .leftJoin(kits, eq(kits.id, bracketSets.kitId))
    .where(eq(editionItems.editionId, editionId))
    .orderBy(asc(editionItems.position));
  return rows.map(({ outputs, compositeOutputs, kitId, kit, site, ...r }) => ({
    ...r,
    prefix: typeof outputs?.prefix === "string" ? outputs.prefix : typeof compositeOutputs?.prefix === "string" ? compositeOutputs.prefix : null,
    site: site?.precision ? site : null,
    kit: kitId ? kit : null,
  }));
}

/** HHMMSS of an ISO instant, UTC. */
const timeOf = (iso: string | null) => (iso ? iso.slice(11, 19).replace(/:/g, "") : "");

/**
 * Each plate's file-name stem, from the editor's template. A template the checks
 * let through but the names cannot follow is the editor's input: said as such.
 */
export function buildItemStems(template: string, items: ItemRow[]): string[] {
  const entries = items.map((it) => ({
    values: {
      date: it.plate.eclipseId,
      time: timeOf(it.facts.captureStartUtc),
      observer: it.plate.acquiredBy,
      version: it.version,
      slot: it.slot,
      position: it.position,
      title: it.plate.title,
    },
    extension: "",
  }));
  try {
    return buildFileNames(template, entries, MAX_FILE_NAME_LENGTH - VARIANT_SUFFIX_ROOM);
  } catch (err) {
    if (err instanceof RangeError) throw new AppError("invalid_input", `fileNameTemplate: ${err.message}`);
    throw err;
  }
}
