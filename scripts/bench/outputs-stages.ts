// The output side of a reduction, stage by stage, from a merged master saved
// once: the structure and natural renditions (finishMergedBracket), every file
// writeReductionOutputs writes (master FITS, each rendition's PNG and preview,
// each rendition's pair of tile pyramids, the summary), then the whole
// writeReductionOutputs as the runner and the flow call it (its writes overlap),
// and, with --store, the upload of that folder to the S3 fake as the flow
// stores it. Wall time, CPU time (every thread of this process) and peak RSS
// (sampled every 20 ms from a worker thread) per stage.
//
// The saved master: frames --first K (default 3, the 4th) and on, --frames N
// (default 3) of the cached 6000 x 4000 bench bracket (npm run bench makes it),
// decoded, planned and merged as the pipeline does, kept with its plan in
// .cache/bench-outputs-6000x4000-<N>-from<K>-seed7/ (about 1 GB, a few minutes the first time).
//
// Run: node --expose-gc --import tsx scripts/bench/outputs-stages.ts [--first 3] [--frames 3]
//        [--stages renditions,files,tiles,whole,store] [--out FILE.json] [--keep DIR] [--plane-workers N]
// (--plane-workers 0: the renditions on this thread alone; default the runner's pool, plane-pool.ts.)
// (`--cpu-prof` before --import for a profile; --keep DIR leaves the written folder there to compare.)
import { createHash } from "node:crypto";
import { cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, renameSync, rmSync, writeFileSync } from "node:fs";
import { readdir, stat } from "node:fs/promises";
import { loadavg, tmpdir } from "node:os";
import { basename, join, relative } from "node:path";
import { finishMergedBracket, mergeKeptFramesInSteps } from "@/lib/imaging/bracket-finish";
import { planBracket, type BracketPlan } from "@/lib/imaging/bracket-plan";
import { finishMerge, type MergeResult } from "@/lib/imaging/merge";
import type { ReductionResult } from "@/lib/imaging/pipeline";
import { computeScaledSize } from "@/lib/imaging/pyramid";
import { DEFAULT_REDUCTION_PARAMS, type LinearFrame } from "@/lib/imaging/types";
import { decodeFrame } from "@/lib/media";
import { decodeWork, encodeWork } from "@/lib/reduction-flow/work-blob";
import type { FrameProvenance } from "@/lib/reduction-runner/decode-frames";
import { writeMasterSummary } from "@/lib/reduction-runner/master-summary";
import { createStagedOutput, commitStagedOutput } from "@/lib/reduction-runner/output-dir";
import { createPlanePool, PLANE_WORKERS } from "@/lib/reduction-runner/plane-pool";
import { writeReductionOutputs } from "@/lib/reduction-runner/run-reduction";
import { createHalvingCache, writeMasterFits, writePreview, writeRenditionPng, writeRenditionTiles, RENDITIONS } from "@/lib/reduction-runner/write-outputs";
import { BENCH_HEIGHT, BENCH_SEED, BENCH_WIDTH, prepareBenchBracket } from "./bench-bracket";
import { startMemorySampler, type MemorySampler } from "./memory-sampler";

const ALL_STAGES = ["renditions", "files", "tiles", "whole", "store"];

interface Args {
  first: number;
  frames: number;
  stages: Set<string>;
  out?: string;
  keep?: string;
  /** Worker threads of the renditions' plane pool; 0 renders on this thread alone. */
  planeWorkers: number;
}

function readArgs(argv: string[]): Args {
  const args: Args = { first: 3, frames: 3, stages: new Set(ALL_STAGES.filter((s) => s !== "store")), planeWorkers: PLANE_WORKERS };
  for (let k = 0; k < argv.length; k++) {
    const value = argv[k + 1];
    if (argv[k] === "--first") args.first = Number(value);
    else if (argv[k] === "--frames") args.frames = Number(value);
    else if (argv[k] === "--stages") args.stages = new Set(value.split(","));
    else if (argv[k] === "--out") args.out = value;
    else if (argv[k] === "--keep") args.keep = value;
    else if (argv[k] === "--plane-workers") args.planeWorkers = Number(value);
    else continue;
    k++;
  }
  const unknown = [...args.stages].filter((s) => !ALL_STAGES.includes(s));
  if (unknown.length > 0 || !(args.frames >= 2) || !(Number.isInteger(args.planeWorkers) && args.planeWorkers >= 0)) {
    throw new Error(`usage: outputs-stages.ts [--first K] [--frames N >= 2] [--stages ${ALL_STAGES.join(",")}] [--out FILE.json] [--keep DIR] [--plane-workers N >= 0]`);
  }
  return args;
}

interface SavedFinish {
  plan: BracketPlan;
  merged: MergeResult;
  provenance: FrameProvenance[];
}

/** The merged master of the picked frames with its plan, made once and read back from the cache. */
async function loadSavedFinish(args: Args): Promise<SavedFinish> {
  const root = join(process.cwd(), ".cache");
  const dir = join(root, `bench-outputs-${BENCH_WIDTH}x${BENCH_HEIGHT}-${args.frames}-from${args.first}-seed${BENCH_SEED}`);
  const path = join(dir, "finish.work");
  if (!existsSync(path)) {
    console.log(`making ${path} (once)`);
    const bracket = await prepareBenchBracket(root);
    const frames: LinearFrame[] = [];
    const provenance: FrameProvenance[] = [];
    for (let k = args.first; k < args.first + args.frames; k++) {
      const file = bracket.files[k];
      const d = await decodeFrame(file, basename(file));
      const exposureS = bracket.exposuresS[k];
      frames.push({ name: d.name, image: d.image, exposureS, blackLevel: d.blackLevel, blackLevelSource: d.blackLevelSource, whiteLevel: d.whiteLevel, encoding: d.encoding });
      provenance.push({ name: d.name, path: file, format: d.format, bitDepth: d.bitDepth, width: d.image.width, height: d.image.height, planeCount: d.image.planes.length, exposureS, exposureSource: "override" });
    }
    const { plan, ready } = planBracket(frames, [], DEFAULT_REDUCTION_PARAMS);
    const steps = mergeKeptFramesInSteps(plan, frames, ready);
    let step = steps.next();
    while (!step.done) step = steps.next();
    const merged = finishMerge(step.value);
    mkdirSync(dir, { recursive: true });
    writeFileSync(`${path}.partial`, encodeWork({ plan, merged, provenance }));
    // Renamed last: its presence means the cache is complete.
    renameSync(`${path}.partial`, path);
  }
  // Whole, not readWorkFile's lazy fields: those read the file again on every access.
  return decodeWork<SavedFinish>(readFileSync(path), path);
}

interface Row {
  stage: string;
  wallMs: number;
  cpuMs: number;
  peakMb: number;
}

/** Times stages one after the other; each stage's peak RSS from the sampler's marks. */
function createStageClock(sampler: MemorySampler) {
  const rows: Row[] = [];
  const gc = (globalThis as { gc?: () => void }).gc;
  let open: { stage: string; wall: number; cpu: NodeJS.CpuUsage } | undefined;
  const close = () => {
    if (!open) return;
    const used = process.cpuUsage(open.cpu);
    rows.push({ stage: open.stage, wallMs: performance.now() - open.wall, cpuMs: (used.user + used.system) / 1000, peakMb: 0 });
    sampler.mark(open.stage);
    open = undefined;
  };
  return {
    rows,
    /** Closes the stage running (if any) and opens the next. */
    start: (stage: string) => {
      close();
      open = { stage, wall: performance.now(), cpu: process.cpuUsage() };
    },
    close,
    /** A full collection between stages (with --expose-gc), so each starts from what is live. */
    settle: () => {
      close();
      gc?.();
      sampler.mark("(between)");
    },
    async fillPeaks(): Promise<void> {
      const marks = (await sampler.readMarks()).filter(([label]) => label !== "(between)");
      marks.forEach(([, peak], i) => { rows[i].peakMb = peak / 1024 ** 2; });
    },
  };
}

/** SHA-256 of planes' bytes in order: two versions of the renditions' code compare by it. */
function hashPlanes(planes: ArrayBufferView[]): string {
  const hash = createHash("sha256");
  for (const p of planes) hash.update(new Uint8Array(p.buffer, p.byteOffset, p.byteLength));
  return hash.digest("hex");
}

async function folderBytes(dir: string): Promise<{ files: number; bytes: number }> {
  let files = 0, bytes = 0;
  for (const e of await readdir(dir, { withFileTypes: true, recursive: true })) {
    if (!e.isFile()) continue;
    files++;
    bytes += (await stat(join(e.parentPath, e.name))).size;
  }
  return { files, bytes };
}

async function main(): Promise<void> {
  const args = readArgs(process.argv.slice(2));
  const saved = await loadSavedFinish(args);
  const sampler = startMemorySampler(20);
  const clock = createStageClock(sampler);
  const scratch = mkdtempSync(join(tmpdir(), "crownlight-outputs-stages-"));
  const extra: Record<string, unknown> = {};
  try {
    // The renditions' pool as the runner and the flow start it, up before the clock starts.
    const planes = args.planeWorkers > 0 ? createPlanePool({ workers: args.planeWorkers }) : undefined;
    extra.planeWorkersUp = await planes?.ready();
    clock.settle();
    // The renditions always run: every later stage writes them.
    let result: ReductionResult;
    try {
      result = finishMergedBracket(saved.plan, saved.merged, (stage, fraction) => {
        if (stage !== "renditions") return;
        if (fraction === 0) clock.start("structure rendition");
        else if (fraction === 0.5) clock.start("natural rendition");
        else if (fraction === 1) clock.close();
      }, 0, planes);
    } finally {
      extra.planePieces = planes?.counts();
      await planes?.close();
    }
    clock.settle();
    const natural = result.natural;
    const structure = result.structure;
    extra.natural = result.overall.natural;
    // What the renditions and the finish report, timings aside: equal hashes mean the same output bit for bit.
    const { timingsMs: _timings, ...figures } = result.overall;
    extra.hashes = {
      structure: hashPlanes(structure.planes),
      natural: hashPlanes(natural.planes),
      figures: createHash("sha256").update(JSON.stringify({ figures, frames: result.frames, coverage: hashPlanes([result.coverage]), master: hashPlanes(result.master.planes) })).digest("hex"),
    };
    const dir = join(scratch, "files");
    mkdirSync(dir, { recursive: true });
    const halve = createHalvingCache();
    if (args.stages.has("files")) {
      clock.start("master.fits");
      await writeMasterFits(dir, { result, frames: saved.provenance.map((p) => ({ name: p.name, exposureS: p.exposureS, exposureSource: p.exposureSource, captureTimeMs: p.captureTimeMs })), encoding: "linear", createdMs: Date.now(), registrationMode: "corona" });
      clock.settle();
      for (const name of RENDITIONS) {
        clock.start(`${name}.png`);
        await writeRenditionPng(dir, name, name === "natural" ? natural : structure);
        clock.settle();
      }
      clock.start("preview.jpg");
      await writePreview(dir, natural, halve);
      clock.settle();
      clock.start("preview-structure.jpg");
      await writePreview(dir, structure, halve, "preview-structure.jpg");
      clock.settle();
      clock.start("summary (coverage.png)");
      await writeMasterSummary(dir, result);
      clock.settle();
    }
    if (args.stages.has("tiles")) {
      for (const name of RENDITIONS) {
        clock.start(`tiles ${name} (DZI + IIIF)`);
        await writeRenditionTiles(dir, dir, name, name === "natural" ? natural : structure, "https://bench.invalid/iiif", undefined, halve);
        clock.settle();
      }
    }
    if (args.stages.has("files") || args.stages.has("tiles")) extra.separateFolder = await folderBytes(dir);
    rmSync(dir, { recursive: true, force: true });

    let wholeDir: string | undefined;
    if (args.stages.has("whole") || args.stages.has("store")) {
      const output = await createStagedOutput(join(scratch, "whole"));
      const size = computeScaledSize(natural.width, natural.height, 0);
      clock.start("writeReductionOutputs (all, overlapped)");
      const timingsMs: Record<string, number> = {};
      await writeReductionOutputs(output, {
        result, provenance: saved.provenance, helio: undefined, registrationMode: "corona", calibration: { source: "none", badPixelCount: 0 },
        timingsMs, started: performance.now(), outputLongSidePx: 0, iiifBaseUrl: "https://bench.invalid/iiif", notes: [], clockOffsetS: 0,
      }, () => undefined);
      clock.settle();
      await commitStagedOutput(output);
      wholeDir = output.finalDir;
      extra.whole = { ...(await folderBytes(wholeDir)), timingsMs, size };
      if (args.keep) {
        rmSync(args.keep, { recursive: true, force: true });
        cpSync(wholeDir, args.keep, { recursive: true });
      }
    }
    if (args.stages.has("store") && wholeDir) {
      const { loadDevelopmentEnv } = await import("./bench-services");
      loadDevelopmentEnv(process.cwd());
      const { uploadReductionFolder } = await import("@/lib/reduction-flow/store-outputs");
      const { bucketName, deleteObject } = await import("@/lib/storage");
      const prefix = `bench-outputs/${Date.now()}/`;
      clock.start("store to S3 (the fake)");
      await uploadReductionFolder(prefix, wholeDir, () => undefined);
      clock.settle();
      // By the files uploaded, one at a time: the S3 fake answers 500 to a listing of this prefix.
      for (const e of await readdir(wholeDir, { recursive: true, withFileTypes: true })) {
        if (e.isFile()) await deleteObject({ bucket: bucketName("derived"), key: prefix + relative(wholeDir, join(e.parentPath, e.name)) });
      }
    }
    await clock.fillPeaks();
  } finally {
    await sampler.stop();
    rmSync(scratch, { recursive: true, force: true });
  }
  const { width, height } = saved.merged;
  console.log(`${width} x ${height}, ${saved.plan.keep.length} frames merged; load average ${loadavg().map((l) => l.toFixed(1)).join(" ")}`);
  console.log("stage                                        wall       CPU  cores  peak RSS");
  for (const r of clock.rows) {
    console.log(`${r.stage.padEnd(40)} ${(r.wallMs / 1000).toFixed(2).padStart(7)} s ${(r.cpuMs / 1000).toFixed(2).padStart(7)} s ${(r.cpuMs / r.wallMs).toFixed(2).padStart(5)} ${r.peakMb.toFixed(0).padStart(6)} MB`);
  }
  console.log(`hashes: ${JSON.stringify(extra.hashes)}; natural ${JSON.stringify(extra.natural)}`);
  console.log(`plane pool: ${args.planeWorkers} worker(s) asked, ${extra.planeWorkersUp ?? 0} up; pieces ${JSON.stringify(extra.planePieces ?? {})}`);
  if (extra.separateFolder) console.log(`files written one by one: ${JSON.stringify(extra.separateFolder)}`);
  if (extra.whole) console.log(`writeReductionOutputs: ${JSON.stringify(extra.whole)}`);
  if (args.out) writeFileSync(args.out, `${JSON.stringify({ rows: clock.rows, ...extra }, null, 2)}\n`);
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
