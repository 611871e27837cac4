// A composite from master files on disk into a new output folder: read the
// masters, compose (lib/imaging/composite.ts, pure), render, write. Used by
// scripts/compose.ts; all or nothing, like a reduction (output-dir.ts).
import { writeFile } from "node:fs/promises";
import { basename, dirname, join, resolve } from "node:path";
import { composeMasters, type CompositeInputReport } from "@/lib/imaging/composite";
import { renderMasterRenditions } from "@/lib/imaging/renditions";
import type { StructureFilter } from "@/lib/imaging/types";
import { PIPELINE_VERSION } from "@/lib/imaging/version";
import { writeFitsFile } from "@/lib/media";
import { commitStagedOutput, createStagedOutput, discardStagedOutput } from "@/lib/reduction-runner/output-dir";
import { createPlanePool } from "@/lib/reduction-runner/plane-pool";
import { writePreview, writeRenditionPng, writeRenditionTiles } from "@/lib/reduction-runner/write-outputs";
import type { TilePyramidResult } from "@/lib/reduction-runner/tiles";
import { buildCompositeCards } from "./composite-fits";
import { colourOfInput, drawContributionMap } from "./contribution-map";
import { CompositeInputError } from "./errors";
import { readCompositeMaster, requireOneEclipse, type ReadMaster } from "./read-master";

export const COMPOSITE_REPORT_VERSION = 1;

export interface RunCompositeOptions {
  files: string[];
  outDir: string;
  scaleArcsecPerPx?: number;
  refine?: boolean;
  filter?: StructureFilter;
  iiifBaseUrl?: string;
  onProgress?: (stage: string, fraction: number) => void;
}

export interface CompositeReport {
  reportVersion: number;
  kind: "composite";
  createdUtc: string;
  creator: string;
  grid: { width: number; height: number; scaleArcsecPerPx: number; sunCentre: { x: number; y: number }; sunRadiusPx: number; solarNorthDeg: number };
  inputs: (CompositeInputReport & { colour: string; creator?: string; dateAvgUtc?: string; instrument?: string; frameCount?: number })[];
  moonCover: { x: number; y: number; radiusPx: number };
  dynamicRangeStops: number;
  natural: { blackPoint: number; whitePoint: number; beta: number; whiteFractionAtLimb: number };
  timingsMs: Record<string, number>;
  /** Most memory the process held (resident set) by the end of the run, bytes. */
  peakRssBytes: number;
  outputs: Record<string, unknown>;
  notes: string[];
}

/** A factor fitted with a spread past this (natural log) is reported: the cameras' light differs by more than a scale factor. */
const LOOSE_FACTOR_SPREAD = 0.1;

function describeNotes(inputs: CompositeInputReport[]): string[] {
  const notes: string[] = [];
  for (const input of inputs) {
    if (!input.isReference && !input.refinement.applied) notes.push(`${input.name}: placed by its WCS alone (${input.refinement.note ?? "not refined"}).`);
    const loose = Math.max(...input.factorSpreads);
    if (loose > LOOSE_FACTOR_SPREAD) notes.push(`${input.name}: its brightness follows the reference's loosely (spread ${(100 * loose).toFixed(0)} % in the overlap): a different spectral response, passing cloud or scattered light can do that.`);
    if (input.weightShare < 0.01) notes.push(`${input.name}: adds almost nothing (${(100 * input.weightShare).toFixed(1)} % of the weight); the others are finer or less noisy everywhere it reaches.`);
  }
  return notes;
}

/** How a master is called: its file name, or its folder and file name when several share the file name (every reduction's is master.fits). */
function nameOf(file: string, files: string[]): string {
  const shared = files.filter((f) => basename(f) === basename(file)).length > 1;
  return shared ? `${basename(dirname(resolve(file)))}/${basename(file)}` : basename(file);
}

export async function runCompositeOnFiles(options: RunCompositeOptions): Promise<{ outDir: string; report: CompositeReport }> {
  const clock = performance.now();
  const progress = (stage: string, f: number) => options.onProgress?.(stage, f);
  if (options.files.length < 2) throw new CompositeInputError("too-few-masters", `a composite needs at least two master FITS files, got ${options.files.length}`);
  const output = await createStagedOutput(options.outDir);
  // The renditions' per-pixel steps and blurs on both cores (as a reduction's are): the composite's planes live in
  // the pool's shared memory, and the pool's worker starts while the masters are read and merged.
  const planes = createPlanePool();
  try {
    const seen = new Set<string>();
    for (const file of options.files) {
      if (seen.has(resolve(file))) throw new CompositeInputError("bad-option", `${file} is given twice; each master may be composed once`);
      seen.add(resolve(file));
    }
    const masters: ReadMaster[] = [];
    for (const [k, file] of options.files.entries()) {
      masters.push(await readCompositeMaster(file, nameOf(file, options.files)));
      progress("read", (k + 1) / options.files.length);
    }
    requireOneEclipse(masters);
    const readMs = performance.now() - clock;
    const result = composeMasters(masters.map((m) => m.input), { scaleArcsecPerPx: options.scaleArcsecPerPx, refine: options.refine, onProgress: progress, runner: planes });
    // The inputs are in the composite now: let their planes go before the renditions.
    for (const m of masters) m.input.planes = [];
    const { grid } = result;
    const master = { width: grid.width, height: grid.height, planes: result.radiance };
    let lap = performance.now();
    const renditions = renderMasterRenditions({
      master, coverage: result.coverage, moon: result.moonCover, filterCentre: { x: grid.sunX, y: grid.sunY }, edgeBandPx: 2,
      params: { filter: options.filter ?? "mgn" }, noiseVariance: result.noiseVariance, runner: planes, onProgress: progress,
    });
    const timingsMs: Record<string, number> = { read: readMs, ...result.timingsMs, renditions: performance.now() - lap };

    lap = performance.now();
    const dir = output.stagingDir;
    const createdMs = Date.now();
    const { cards, history } = buildCompositeCards(result, masters.map((m) => m.provenance), PIPELINE_VERSION, createdMs);
    progress("write", 0);
    await writeFitsFile(join(dir, "master.fits"), { width: grid.width, height: grid.height, planes: result.radiance, cards, history });
    const images = { natural: renditions.natural.image, structure: renditions.structure };
    await Promise.all([writeRenditionPng(dir, "natural", images.natural), writeRenditionPng(dir, "structure", images.structure)]);
    await writePreview(dir, images.natural);
    await writePreview(dir, images.structure, undefined, "preview-structure.jpg");
    const contribution = drawContributionMap(result.shares, grid.width, grid.height);
    await writePreview(dir, contribution, undefined, "contribution.jpg");
    progress("write", 0.3);
    const tiles: Record<string, TilePyramidResult> = {};
    for (const name of ["natural", "structure"] as const) tiles[name] = await writeRenditionTiles(dir, output.finalDir, name, images[name], options.iiifBaseUrl);
    timingsMs.write = performance.now() - lap;
    timingsMs.total = performance.now() - clock;
    progress("write", 1);

    const report: CompositeReport = {
      reportVersion: COMPOSITE_REPORT_VERSION,
      kind: "composite",
      createdUtc: new Date(createdMs).toISOString(),
      creator: PIPELINE_VERSION,
      grid: { width: grid.width, height: grid.height, scaleArcsecPerPx: grid.scaleArcsecPerPx, sunCentre: { x: grid.sunX, y: grid.sunY }, sunRadiusPx: result.sunRadiusPx, solarNorthDeg: 0 },
      inputs: result.inputs.map((input, k) => ({
        ...input,
        colour: colourOfInput(k),
        creator: masters[k].provenance.creator,
        dateAvgUtc: masters[k].provenance.dateAvgMs === undefined ? undefined : new Date(masters[k].provenance.dateAvgMs!).toISOString(),
        instrument: masters[k].provenance.instrument,
        frameCount: masters[k].provenance.frameCount,
      })),
      moonCover: result.moonCover,
      dynamicRangeStops: Number(renditions.dynamicRangeStops.toFixed(3)),
      natural: { blackPoint: renditions.natural.blackPoint, whitePoint: renditions.natural.whitePoint, beta: renditions.natural.beta, whiteFractionAtLimb: renditions.whiteFractionAtLimb },
      timingsMs: Object.fromEntries(Object.entries(timingsMs).map(([k, v]) => [k, Math.round(v)])),
      peakRssBytes: process.resourceUsage().maxRSS * 1024,
      outputs: {
        master: "master.fits", natural: "natural.png", structure: "structure.png", preview: "preview.jpg", previewStructure: "preview-structure.jpg", contribution: "contribution.jpg",
        tiles: Object.fromEntries(Object.entries(tiles).map(([k, t]) => [k, { dzi: `tiles/${k}.dzi`, iiif: `tiles/${k}-iiif/info.json`, dziTiles: t.dziTileCount, iiifTiles: t.iiifTileCount }])),
      },
      notes: describeNotes(result.inputs),
    };
    await writeFile(join(dir, "report.json"), `${JSON.stringify(report, null, 2)}\n`);
    await commitStagedOutput(output);
    return { outDir: output.finalDir, report };
  } catch (error) {
    await discardStagedOutput(output);
    throw error;
  } finally {
    await planes.close();
  }
}
