// Makes one print bundle (run by the worker's edition.export job): for every
// plate of the edition, in print order, the rendition's 16-bit PNG is sized
// for its slot (render.ts), every file gets the plate's metadata
// (metadata.ts through embed.ts), then the captions and credits files, the
// PDF proof and the metadata JSON join them in one ZIP, streamed to the
// exports bucket. Progress goes to the export row as it goes. Nothing of the
// edition or its plates is changed but the edition's state (exported) once
// the ZIP is stored; a failure leaves the edition as it was.
import { createHash } from "node:crypto";
import { createReadStream, createWriteStream } from "node:fs";
import { mkdtemp, readFile, rm, stat, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pipeline } from "node:stream/promises";
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import { ZipFile } from "yazl";
import type { Db, DbOrTx } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { bracketSets, editionExports, editionItems, editions, composites, kits, plates, plateVersions, reductions, sites, users, type ExportFileEntry, type LocationPrecision } from "@/db/schema";
import { recordAudit } from "@/lib/audit/record";
import { appLink, queueMailOnce } from "@/lib/bracket-sets/notify";
import { editionExportFailedMail, editionExportReadyMail } from "@/lib/email/templates";
import { AppError } from "@/lib/errors";
import { formatBytes } from "@/lib/format/bytes";
import { createSharp } from "@/lib/media/sharp-setup";
import { plateCreditLine } from "@/lib/plates/credit";
import { LICENCE_INFO } from "@/lib/plates/licences";
import { bucketName, isMissingObject, putObjectFile, readSmallObject } from "@/lib/storage";
import { buildFileNames, MAX_FILE_NAME_LENGTH, safePart } from "../file-names";
import { SLOT_SPECS, slotWidthPx } from "../print-sizes";
import { embedTags } from "./embed";
import { buildCaptionsText, buildCreditsText, type HouseStyleEntry } from "./house-style";
import { buildPlateMetadata, metadataTags, type ExportPlateInput, type MasterSky, type PlateMetadata } from "./metadata";
import { buildProofPdf, type ProofPage } from "./proof";
import { planPrintSize, renderPlateFiles, type PrintPlan, type RenderedFile } from "./render";
import { toPublicObserver } from "@/lib/sites/precision";
import { buildPrinterReadme, describeCmykProfile, readProfileFacts, README_FILE, type ProfileFacts } from "./printer-notes";

/** Largest rendition PNG read into memory (a 16-bit RGB 8000 x 8000 image is 384 MB raw, far less as PNG). */
const MAX_RENDITION_BYTES = 1024 ** 3;
const VARIANT_SUFFIX_ROOM = 10;
export const METADATA_FILE = "metadata.json";
export const CAPTIONS_FILE = "captions.txt";
export const CREDITS_FILE = "credits.txt";
export const PROOF_FILE = "proof.pdf";

export type ExportReporter = (stage: string, fraction: number) => Promise<void>;

interface ItemRow {
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

async function loadItems(db: DbOrTx, editionId: string): Promise<ItemRow[]> {
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

const num = (v: unknown) => (typeof v === "number" && Number.isFinite(v) ? v : undefined);

/** The master's sky geometry from report.json (overall.sky), or null when the reduction has none. */
export function masterSkyFromReport(report: Record<string, unknown>): MasterSky | null {
  if (report.kind === "composite") return compositeSkyFromReport(report);
  const overall = (report.overall ?? {}) as Record<string, unknown>;
  const sky = (overall.sky ?? {}) as Record<string, unknown>;
  const master = (overall.masterSize ?? {}) as { width?: unknown; height?: unknown };
  const width = num(master.width);
  const height = num(master.height);
  if (!width || !height) return null;
  const centre = sky.sunCentrePx as { x?: unknown; y?: unknown } | undefined;
  const observer = sky.observer as { latDeg?: unknown; lonDeg?: unknown; elevationM?: unknown } | undefined;
  const out: MasterSky = { masterWidth: width, masterHeight: height };
  if (centre && num(centre.x) !== undefined && num(centre.y) !== undefined) out.sunCentrePx = { x: centre.x as number, y: centre.y as number };
  if (num(sky.plateScaleArcsecPerPx)) out.plateScaleArcsecPerPx = sky.plateScaleArcsecPerPx as number;
  if (num(sky.northAngleDeg) !== undefined) out.northAngleDeg = sky.northAngleDeg as number;
  if (typeof sky.moonSilhouetteUtc === "string") out.referenceUtc = sky.moonSilhouetteUtc;
  if (observer && num(observer.latDeg) !== undefined && num(observer.lonDeg) !== undefined) {
    out.observer = { latDeg: observer.latDeg as number, lonDeg: observer.lonDeg as number, elevationM: num(observer.elevationM) ?? 0 };
  }
  return out;
}

/** A composite's grid: north up, the Sun at its centre pixel; it stands for several observers, so it names none. */
function compositeSkyFromReport(report: Record<string, unknown>): MasterSky | null {
  const grid = (report.grid ?? {}) as { width?: unknown; height?: unknown; scaleArcsecPerPx?: unknown; sunCentre?: { x?: unknown; y?: unknown }; solarNorthDeg?: unknown };
  const width = num(grid.width);
  const height = num(grid.height);
  if (!width || !height) return null;
  const out: MasterSky = { masterWidth: width, masterHeight: height, northAngleDeg: num(grid.solarNorthDeg) ?? 0 };
  if (num(grid.sunCentre?.x) !== undefined && num(grid.sunCentre?.y) !== undefined) out.sunCentrePx = { x: grid.sunCentre!.x as number, y: grid.sunCentre!.y as number };
  if (num(grid.scaleArcsecPerPx)) out.plateScaleArcsecPerPx = grid.scaleArcsecPerPx as number;
  return out;
}

/**
 * The master's sky geometry as a print bundle may carry it: the report holds the
 * exact observer, and the bundle is for publication, so the Sun's place is
 * computed from the site at its public precision (from the Earth's centre for
 * a hidden site, within the solar parallax of 8.8 arcsec).
 */
export function publicSkyFromReport(report: Record<string, unknown>, precision: LocationPrecision): MasterSky | null {
  const sky = masterSkyFromReport(report);
  if (sky?.observer) sky.observer = toPublicObserver(sky.observer, precision);
  return sky;
}

async function sha256File(path: string): Promise<string> {
  const hash = createHash("sha256");
  await pipeline(createReadStream(path), hash);
  return hash.digest("hex");
}

/** HHMMSS of an ISO instant, UTC. */
const timeOf = (iso: string | null) => (iso ? iso.slice(11, 19).replace(/:/g, "") : "");

/** A template the checks let through but the names cannot follow is the editor's input: said as such. */
function namesOrRefuse(make: () => string[]): string[] {
  try {
    return make();
  } catch (err) {
    if (err instanceof RangeError) throw new AppError("invalid_input", `fileNameTemplate: ${err.message}`);
    throw err;
  }
}

export interface BundleResult {
  objectKey: string;
  zipName: string;
  bytes: number;
  files: ExportFileEntry[];
  warnings: string[];
  plates: number;
}

/**
 * Makes the bundle of an export and stores it; returns what the row records.
 * Throws AppError with a message naming the plate and the fault on bad data.
 */
export async function makeBundle(db: DbOrTx, exportId: string, report: ExportReporter): Promise<BundleResult> {
  const [row] = await db.select().from(editionExports).where(eq(editionExports.id, exportId)).limit(1);
  if (!row) throw new AppError("not_found", `Export ${exportId} does not exist.`);
  const [edition] = await db.select().from(editions).where(eq(editions.id, row.editionId)).limit(1);
  if (!edition) throw new AppError("not_found", "The edition of this export is gone.");
  const items = await loadItems(db, edition.id);
  if (items.length === 0) throw new AppError("conflict", `"${edition.title}" has no plates to export.`);
  const society = await findSocietySettings(db);
  const options = row.options;
  const cmykProfilePath = process.env.EDITION_CMYK_ICC_PROFILE || undefined;

  const stems = namesOrRefuse(() => buildFileNames(
    options.fileNameTemplate,
    items.map((it) => ({
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
    })),
    MAX_FILE_NAME_LENGTH - VARIANT_SUFFIX_ROOM,
  ));

  const dir = await mkdtemp(join(tmpdir(), "crownlight-edition-export-"));
  try {
    const listed: { name: string; path: string; kind: string; position: number | null }[] = [];
    const platesMeta: Record<string, unknown>[] = [];
    const proofPages: ProofPage[] = [];
    const houseEntries: HouseStyleEntry[] = [];
    const warnings: string[] = [];
    let cmykFacts: ProfileFacts | null = null;
    let cmykRead = false;
    const perItem = 0.8 / items.length;

    for (const [i, it] of items.entries()) {
      const label = `plate ${it.position} ("${it.plate.title}")`;
      const base = 0.05 + i * perItem;
      await report(`Plate ${it.position} of ${items.length}: reading the ${it.rendition} rendition`, base);
      if (it.plate.state !== "published") throw new AppError("conflict", `The ${label} is ${it.plate.state} now; remove it from the edition or ask a curator.`);
      if (!it.prefix) throw new AppError("conflict", `The reduction behind ${label} has no stored outputs.`);
      if (it.slot === "custom" && (it.customWidthMm === null || it.customDpi === null)) throw new AppError("invalid_input", `The ${label} has a custom slot without a width or dpi.`);
      const sourceName = `${it.rendition}.png of ${label}`;
      let source: Buffer;
      try {
        source = await readSmallObject({ bucket: bucketName("derived"), key: `${it.prefix}${it.rendition}.png` }, MAX_RENDITION_BYTES);
      } catch (err) {
        if (isMissingObject(err)) throw new AppError("conflict", `The ${it.rendition} rendition of ${label} is missing from storage.`);
        throw err;
      }
      const meta = await createSharp(source).metadata();
      if (!meta.width || !meta.height) throw new AppError("invalid_input", `${sourceName} has no readable size.`);
      let sky: MasterSky | null = null;
      try {
        sky = publicSkyFromReport(JSON.parse((await readSmallObject({ bucket: bucketName("derived"), key: `${it.prefix}report.json` })).toString("utf8")) as Record<string, unknown>, it.site?.precision ?? "hidden");
      } catch (err) {
        if (!isMissingObject(err) && !(err instanceof SyntaxError)) throw err;
      }

      const custom = it.slot === "custom" ? { widthMm: it.customWidthMm as number, dpi: it.customDpi as number } : null;
      const spec = it.slot === "custom" ? { widthMm: custom!.widthMm, dpi: custom!.dpi } : { widthMm: SLOT_SPECS[it.slot].widthMm, dpi: SLOT_SPECS[it.slot].dpi };
      const neededWidth = slotWidthPx(it.slot, custom);
      const available = { width: meta.width, height: meta.height };
      const plan: PrintPlan = planPrintSize({ width: neededWidth, height: Math.round((neededWidth * available.height) / available.width) }, available, spec);
      const slotLabel = it.slot === "custom" ? `Custom, ${custom!.widthMm} mm at ${custom!.dpi} dpi` : SLOT_SPECS[it.slot].label;
      const notes: string[] = [];
      if (plan.shortfall) {
        notes.push(plan.shortfall);
        warnings.push(`Plate ${it.position}: ${plan.shortfall}.`);
      }

      await report(`Plate ${it.position} of ${items.length}: making the files`, base + perItem * 0.2);
      const files: RenderedFile[] = await renderPlateFiles(source, sourceName, plan, stems[i], dir, { cmyk: options.cmyk, greyscale: options.greyscale, cmykProfilePath });
      const caption = it.captionOverride?.trim() || it.plate.caption;
      const creditLine = plateCreditLine(society.creditLineTemplate, society.name, { ...it.plate, publishedAt: it.plate.publishedAt?.toISOString() ?? null });
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
        societyName: society.name,
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
      await report(`Plate ${it.position} of ${items.length}: writing metadata`, base + perItem * 0.7);
      const tags = metadataTags(metadata, plan.dpi);
      for (const f of files) await embedTags(f.path, tags);
      const cmykFile = files.find((f) => f.kind === "tiff-cmyk");
      if (cmykFile && !cmykRead) {
        cmykFacts = await readProfileFacts(cmykFile.path);
        cmykRead = true;
      }
      for (const f of files) listed.push({ name: f.name, path: f.path, kind: f.kind, position: it.position });

      platesMeta.push({
        position: it.position,
        plate: { slug: it.plate.slug, version: it.version, rendition: it.rendition },
        slot: { key: it.slot, label: slotLabel, widthMm: spec.widthMm, dpi: spec.dpi, neededWidthPx: neededWidth },
        pixels: { width: plan.width, height: plan.height, dpi: plan.dpi, renditionWidth: available.width, renditionHeight: available.height },
        files: files.map((f) => ({ name: f.name, kind: f.kind })),
        notes,
        metadata,
      });
      houseEntries.push({
        position: it.position,
        slotLabel,
        title: it.plate.title,
        caption,
        creditLine,
        acquiredBy: it.plate.acquiredBy,
        processedBy: it.plate.processedBy,
        licenceName: LICENCE_INFO[it.plate.licence].name,
        licenceUri: LICENCE_INFO[it.plate.licence].rightsUri,
        files: files.map((f) => f.name),
      });
      proofPages.push({
        position: it.position,
        title: it.plate.title,
        slotLabel,
        caption,
        creditLine,
        files: files.map((f) => f.name),
        jpeg: await readFile(files.find((f) => f.kind === "jpeg")!.path),
        widthPx: plan.width,
        heightPx: plan.height,
        widthMm: plan.widthMm,
        dpi: plan.dpi,
        notes,
      });
    }

    await report("Captions, credits and the proof", 0.86);
    const styleEdition = { title: edition.title, issueLabel: edition.issueLabel, societyName: society.name, embargoDate: edition.embargoDate };
    const texts: [string, string][] = [
      [CAPTIONS_FILE, buildCaptionsText(styleEdition, houseEntries)],
      [CREDITS_FILE, buildCreditsText(styleEdition, houseEntries)],
    ];
    for (const [name, text] of texts) {
      await writeFile(join(dir, name), text, "utf8");
      listed.push({ name, path: join(dir, name), kind: name === CAPTIONS_FILE ? "captions" : "credits", position: null });
    }
    const readme = buildPrinterReadme({
      editionName: `${edition.title}${edition.issueLabel ? `, ${edition.issueLabel}` : ""}`,
      societyName: society.name,
      embargoDate: edition.embargoDate,
      plateCount: items.length,
      files: [...listed, { name: PROOF_FILE, kind: "proof", position: null }],
      cmyk: options.cmyk ? { facts: cmykFacts, custom: Boolean(cmykProfilePath) } : null,
      greyscale: options.greyscale,
      warnings,
    });
    await writeFile(join(dir, README_FILE), readme, "utf8");
    const proof = await buildProofPdf({ ...styleEdition, createdAt: new Date().toISOString() }, proofPages);
    await writeFile(join(dir, PROOF_FILE), proof);
    listed.push({ name: PROOF_FILE, path: join(dir, PROOF_FILE), kind: "proof", position: null });
    listed.push({ name: README_FILE, path: join(dir, README_FILE), kind: "readme", position: null });

    const files: (ExportFileEntry & { kind: string; position: number | null; sha256: string })[] = [];
    for (const f of listed) files.push({ name: f.name, kind: f.kind, position: f.position, bytes: (await stat(f.path)).size, sha256: await sha256File(f.path) });
    const metadataJson = {
      format: "crownlight-edition-bundle/1",
      generatedAt: new Date().toISOString(),
      society: society.name,
      edition: { id: edition.id, title: edition.title, kind: edition.kind, issueLabel: edition.issueLabel, embargoDate: edition.embargoDate },
      options: { ...options, cmykProfile: options.cmyk ? (cmykFacts?.description ?? "unnamed profile") : null,
        cmykProfileAbout: options.cmyk ? describeCmykProfile(cmykFacts, Boolean(cmykProfilePath)) : null, greyscaleProfile: options.greyscale ? "none embedded (16-bit grey, sRGB tone curve)" : null },
      files,
      plates: platesMeta,
      warnings,
    };
    await writeFile(join(dir, METADATA_FILE), JSON.stringify(metadataJson, null, 2), "utf8");

    await report("Packing the ZIP", 0.9);
    const zipStem = safePart(`${edition.title}${edition.issueLabel ? `_${edition.issueLabel}` : ""}_print-bundle`) || "print-bundle";
    const zipName = `${zipStem.slice(0, 80)}.zip`;
    const zipPath = join(dir, "bundle.zip");
    const zip = new ZipFile();
    // Images and the PDF are compressed already: stored as they are, only the texts are deflated.
    for (const f of listed) zip.addFile(f.path, f.name, { compress: /\.(txt|json)$/.test(f.name) });
    zip.addFile(join(dir, METADATA_FILE), METADATA_FILE);
    zip.end();
    await pipeline(zip.outputStream, createWriteStream(zipPath));

    await report("Storing the ZIP", 0.95);
    const objectKey = `editions/${edition.id}/exports/${exportId}/${zipName}`;
    const bytes = await putObjectFile({ bucket: bucketName("exports"), key: objectKey }, zipPath, "application/zip");
    return { objectKey, zipName, bytes, files: files.map((f) => ({ name: f.name, bytes: f.bytes })), warnings, plates: items.length };
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

const ACTIVE = ["queued", "running"] as const;

/**
 * Marks the export done and the edition exported, with the audit entry, in one
 * transaction; only an export still under way changes (a repeated call does
 * nothing). The e-mail is queued after the commit: a Redis hiccup then leaves
 * the mail pending in the outbox, never the bundle undone.
 */
export async function finishExport(db: Db, exportId: string, result: BundleResult): Promise<void> {
  const row = await db.transaction(async (tx) => {
    const [done] = await tx
      .update(editionExports)
      .set({ state: "done", progress: 1, stage: "Ready", objectKey: result.objectKey, zipName: result.zipName, bytes: result.bytes, files: result.files, warnings: result.warnings, error: null, finishedAt: sql`now()` })
      .where(and(eq(editionExports.id, exportId), inArray(editionExports.state, ACTIVE)))
      .returning({ editionId: editionExports.editionId, requestedBy: editionExports.requestedBy });
    if (!done) return null;
    await tx.update(editions).set({ state: "exported", updatedAt: sql`now()` }).where(eq(editions.id, done.editionId));
    await recordAudit(tx, { actorId: done.requestedBy, action: "edition.exported", subjectType: "edition", subjectId: done.editionId, detail: { exportId, bytes: result.bytes, files: result.files.length } });
    return done;
  });
  if (row) await notifyExport(db, exportId, row.editionId, row.requestedBy, { ok: true, bytes: result.bytes, plates: result.plates });
}

/** Marks an export under way as failed with its reason (a finished one stays finished) and tells the editor. */
export async function failExport(db: DbOrTx, exportId: string, reason: string): Promise<void> {
  const [row] = await db
    .update(editionExports)
    .set({ state: "failed", error: reason, stage: "Failed", finishedAt: sql`now()` })
    .where(and(eq(editionExports.id, exportId), inArray(editionExports.state, ACTIVE)))
    .returning({ editionId: editionExports.editionId, requestedBy: editionExports.requestedBy });
  if (row) await notifyExport(db, exportId, row.editionId, row.requestedBy, { ok: false, reason });
}

async function notifyExport(db: DbOrTx, exportId: string, editionId: string, userId: string | null, outcome: { ok: true; bytes: number; plates: number } | { ok: false; reason: string }): Promise<void> {
  if (!userId) return;
  try {
    const [user] = await db.select({ name: users.name, email: users.email }).from(users).where(eq(users.id, userId)).limit(1);
    const [edition] = await db.select({ title: editions.title }).from(editions).where(eq(editions.id, editionId)).limit(1);
    if (!user || !edition) return;
    const society = (await findSocietySettings(db)).name;
    const url = appLink(`/editions/${editionId}#exports-h`);
    if (outcome.ok) {
      await queueMailOnce(db, `edition-export-ready-${exportId}`, editionExportReadyMail(society, user.email, user.name, { title: edition.title, plates: outcome.plates, size: formatBytes(outcome.bytes), url }));
    } else {
      await queueMailOnce(db, `edition-export-failed-${exportId}`, editionExportFailedMail(society, user.email, user.name, { title: edition.title, reason: outcome.reason, url }));
    }
  } catch (err) {
    // The bundle's state is already recorded; a mail that could not be queued stays pending in the outbox.
    console.error(`[edition-export] the e-mail about export ${exportId} could not be queued:`, err);
  }
}
