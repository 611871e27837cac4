// One plate's part of a print bundle: its rendition's 16-bit PNG read from the
// derived bucket and its sky geometry from report.json, the files sized for its
// slot (render.ts) with the plate's metadata in each (metadata.ts, embed.ts),
// and what the bundle's texts say of it (the metadata JSON's entry, captions and
// credits, the proof's page).
import { readFile } from "node:fs/promises";
import type { SocietySettings } from "@/db/schema";
import { appLink } from "@/lib/email/app-link";
import { AppError } from "@/lib/errors";
import { createSharp } from "@/lib/media/sharp-setup";
import { plateCreditLine } from "@/lib/plates/credit";
import { LICENCE_INFO } from "@/lib/plates/licences";
import { bucketName, isMissingObject, readSmallObject } from "@/lib/storage";
import { SLOT_SPECS, slotWidthPx } from "../print-sizes";
import { embedTags } from "./embed";
import type { HouseStyleEntry } from "./house-style";
import type { ItemRow } from "./items";
import { buildPlateMetadata, metadataTags, type ExportPlateInput, type MasterSky, type PlateMetadata } from "./metadata";
import type { ProofPage } from "./proof";
import { planPrintSize, renderPlateFiles, type PrintPlan, type RenderedFile } from "./render";
import { publicSkyFromReport } from "./sky";

/** Largest rendition PNG read into memory (a 16-bit RGB 8000 x 8000 image is 384 MB raw, far less as PNG). */
const MAX_RENDITION_BYTES = 1024 ** 3;

export interface PlateFileOptions {
  dir: string;
  society: Pick<SocietySettings, "name" | "creditLineTemplate">;
  cmyk: boolean;
  greyscale: boolean;
  cmykProfilePath: string | undefined;
}

export interface PlatePart {
  files: RenderedFile[];
  /** The plate's entry in metadata.json. */
  meta: Record<string, unknown>;
  house: HouseStyleEntry;
  proof: ProofPage;
  /** What the printer should know of this plate (a rendition short of the slot's pixels). */
  notes: string[];
}

/** The rendition's bytes; a missing one is the plate's fault, said with the plate. */
async function readRendition(it: ItemRow, prefix: string, label: string): Promise<Buffer> {
  try {
    return await readSmallObject({ bucket: bucketName("derived"), key: `${prefix}${it.rendition}.png` }, MAX_RENDITION_BYTES);
  } catch (err) {
    if (isMissingObject(err)) throw new AppError("conflict", `The ${it.rendition} rendition of ${label} is missing from storage.`);
    throw err;
  }
}

/** The sky geometry from report.json, at the site's public precision; none when the report is missing or unreadable. */
async function readSky(it: ItemRow, prefix: string): Promise<MasterSky | null> {
  try {
    const report = JSON.parse((await readSmallObject({ bucket: bucketName("derived"), key: `${prefix}report.json` })).toString("utf8")) as Record<string, unknown>;
    return publicSkyFromReport(report, it.site?.precision ?? "hidden");
  } catch (err) {
    if (!isMissingObject(err) && !(err instanceof SyntaxError)) throw err;
    return null;
  }
}

/**
 * Makes one plate's files in `options.dir`, named from `stem`. Throws AppError
 * naming the plate when it cannot be exported (withdrawn since, outputs or
 * rendition missing, a custom slot without its size). `step` reports progress
 * within the plate (0..1).
 */
export async function makePlateFiles(it: ItemRow, stem: string, options: PlateFileOptions, step: (what: string, within: number) => Promise<void>): Promise<PlatePart> {
  const label = `plate ${it.position} ("${it.plate.title}")`;
  await step(`reading the ${it.rendition} rendition`, 0);
  if (it.plate.state !== "published") throw new AppError("conflict", `The ${label} is ${it.plate.state} now; remove it from the edition or ask a curator.`);
  if (!it.prefix) throw new AppError("conflict", `The reduction behind ${label} has no stored outputs.`);
  if (it.slot === "custom" && (it.customWidthMm === null || it.customDpi === null)) throw new AppError("invalid_input", `The ${label} has a custom slot without a width or dpi.`);
  const sourceName = `${it.rendition}.png of ${label}`;
  const source = await readRendition(it, it.prefix, label);
  const meta = await createSharp(source).metadata();
  if (!meta.width || !meta.height) throw new AppError("invalid_input", `${sourceName} has no readable size.`);
  const sky = await readSky(it, it.prefix);

  const custom = it.slot === "custom" ? { widthMm: it.customWidthMm as number, dpi: it.customDpi as number } : null;
  const spec = it.slot === "custom" ? { widthMm: custom!.widthMm, dpi: custom!.dpi } : { widthMm: SLOT_SPECS[it.slot].widthMm, dpi: SLOT_SPECS[it.slot].dpi };
  const neededWidth = slotWidthPx(it.slot, custom);
  const available = { width: meta.width, height: meta.height };
  const plan: PrintPlan = planPrintSize({ width: neededWidth, height: Math.round((neededWidth * available.height) / available.width) }, available, spec);
  const slotLabel = it.slot === "custom" ? `Custom, ${custom!.widthMm} mm at ${custom!.dpi} dpi` : SLOT_SPECS[it.slot].label;
  const notes = plan.shortfall ? [plan.shortfall] : [];

  await step("making the files", 0.2);
  const files = await renderPlateFiles(source, sourceName, plan, stem, options.dir, { cmyk: options.cmyk, greyscale: options.greyscale, cmykProfilePath: options.cmykProfilePath });
  const caption = it.captionOverride?.trim() || it.plate.caption;
  const creditLine = plateCreditLine(options.society.creditLineTemplate, options.society.name, { ...it.plate, publishedAt: it.plate.publishedAt?.toISOString() ?? null });
  const input: ExportPlateInput = {
    slug: it.plate.slug,
    version: it.version,
    title: it.plate.title,
    caption,
    altText: it.plate.altText,
    acquiredBy: it.plate.acquiredBy,
    processedBy: it.plate.processedBy,
    licence: it.plate.licence,
    creditLine,
    societyName: options.society.name,
    plateUrl: appLink(`/plates/${it.plate.slug}/v/${it.version}`),
    rendition: it.rendition,
    eclipseDate: it.plate.eclipseId,
    captureStartUtc: it.facts.captureStartUtc,
    captureEndUtc: it.facts.captureEndUtc,
    exposuresS: it.facts.exposuresS,
    kit: it.kit,
    site: it.site,
    sky,
  };
  const metadata: PlateMetadata = buildPlateMetadata(input, plan.width, plan.height);
  await step("writing metadata", 0.7);
  const tags = metadataTags(metadata, plan.dpi);
  for (const f of files) await embedTags(f.path, tags);

  const names = files.map((f) => f.name);
  return {
    files,
    notes,
    meta: {
      position: it.position,
      plate: { slug: it.plate.slug, version: it.version, rendition: it.rendition },
      slot: { key: it.slot, label: slotLabel, widthMm: spec.widthMm, dpi: spec.dpi, neededWidthPx: neededWidth },
      pixels: { width: plan.width, height: plan.height, dpi: plan.dpi, renditionWidth: available.width, renditionHeight: available.height },
      files: files.map((f) => ({ name: f.name, kind: f.kind })),
      notes,
      metadata,
    },
    house: {
      position: it.position,
      slotLabel,
      title: it.plate.title,
      caption,
      creditLine,
      acquiredBy: it.plate.acquiredBy,
      processedBy: it.plate.processedBy,
      licenceName: LICENCE_INFO[it.plate.licence].name,
      licenceUri: LICENCE_INFO[it.plate.licence].rightsUri,
      files: names,
    },
    proof: {
      position: it.position,
      title: it.plate.title,
      slotLabel,
      caption,
      creditLine,
      files: names,
      jpeg: await readFile(files.find((f) => f.kind === "jpeg")!.path),
      widthPx: plan.width,
      heightPx: plan.height,
      widthMm: plan.widthMm,
      dpi: plan.dpi,
      notes,
    },
  };
}
