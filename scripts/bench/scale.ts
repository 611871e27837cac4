// `npm run bench -- scale`: how a reduction grows with the number of frames, and
// how it is shared by worker processes. Brackets of 9, 27 and 81 frames of one size
// (scale-bracket.ts, cached in .cache/) are each reduced three times:
//  - by runReductionOnFiles in a single process of its own (scale-reduce-child.ts):
//    the baseline of the slope of peak memory against frames and of the ratio to the
//    floor (sharp decoding the same frames plus tiling one rendition);
//  - through the app's stepped flow (lib/reduction-flow) with one and with two worker
//    processes of our own on the development services (scale-app.ts puts each
//    bracket into a bench set through the upload and ingest path; scale-flow.ts
//    starts the workers and the reduction and waits for done).
// Every process is watched from outside through /proc (it and every process below
// it: time, peak memory, CPU). Prints per bracket each measure, the floor and the
// ratios, then the slope and the time with two worker processes over one. Aims are
// printed, never asserted. `--frames 9,81` measures only some brackets.
import { mkdtempSync, rmSync, statfsSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { closeDb, getDb, type Db } from "@/db/client";
import type { Actor } from "@/lib/auth/actor";
import type { ScratchSummary } from "@/lib/reduction-runner/run-reduction";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { prepareDevelopmentServices } from "./bench-services";
import { measureFloorMs } from "./floor";
import { readClockTicksPerS, runWatched, type WatchedProcess } from "./process-monitor";
import { fitLine } from "./proc-stats";
import { DEFAULT_SCALE_SIZE, SCALE_LADDER_STEPS, SCALE_LONG_FRAMES, SCALE_PASSES, prepareLongScaleBracket, prepareScaleBrackets, type ScaleBracket, type ScaleSize } from "./scale-bracket";
import { prepareBenchSets } from "./scale-app";
import { BENCH_QUEUE_PREFIX, clearBenchQueues, measureFlowReduction, withBenchWorkers, type FlowRun } from "./scale-flow";
import { findScaleChildResult, SCALE_SPILL_MODES, type ScaleChildJob, type ScaleSpill } from "./scale-child-protocol";

/** Memory is printed in MiB (2^20 bytes); the slope also in decimal MB, the unit of its aim. */
const MiB = 1024 ** 2;
const AIM_SLOPE_MB_PER_FRAME = 5;
const AIM_RATIO_TO_FLOOR = 4;
const AIM_TWO_OVER_ONE = 0.6;
/**
 * Every bracket is reduced in the streaming form by default, each frame's pixels kept on
 * local disk between stages: the form whose memory should not grow with the frames. (The
 * reduction's own default keeps brackets under 512 MB of files in memory, and all three
 * are.) `npm run bench -- scale --spill never` (or auto) measures the other forms.
 */
function readSpillMode(argv: readonly string[]): ScaleSpill {
  const at = argv.indexOf("--spill");
  if (at < 0) return "always";
  const mode = argv[at + 1];
  if (!SCALE_SPILL_MODES.includes(mode as ScaleSpill)) throw new Error(`--spill takes ${SCALE_SPILL_MODES.join(", ")}, not ${mode ?? "nothing"}`);
  return mode as ScaleSpill;
}
/** Worker processes the flow is measured with: one, and two sharing the reduction. */
const WORKER_COUNTS = [1, 2] as const;
/** `--workers 1` measures the flow with those worker counts only. */
function readWorkerCounts(argv: readonly string[]): number[] {
  const at = argv.indexOf("--workers");
  if (at < 0) return [...WORKER_COUNTS];
  const counts = (argv[at + 1] ?? "").split(",").map(Number);
  if (counts.length === 0 || !counts.every((n) => (WORKER_COUNTS as readonly number[]).includes(n))) throw new Error(`--workers takes some of ${WORKER_COUNTS.join(",")}, not ${argv[at + 1] ?? "nothing"}`);
  return counts;
}

/** `--frames 9,81` measures only those brackets (of 9, 27 and 81; 200 is the long bracket, made on its own). */
function readFrameCounts(argv: readonly string[]): number[] | null {
  const at = argv.indexOf("--frames");
  if (at < 0) return null;
  const counts = (argv[at + 1] ?? "").split(",").map(Number);
  const known = [...SCALE_PASSES.map((p) => p * SCALE_LADDER_STEPS), SCALE_LONG_FRAMES];
  if (counts.length === 0 || !counts.every((n) => known.includes(n))) throw new Error(`--frames takes some of ${known.join(",")}, not ${argv[at + 1] ?? "nothing"}`);
  return counts;
}

/** `--size 6000x4000` makes and reduces brackets of that frame size (default 1500 x 1000; each size is cached apart). */
function readSize(argv: readonly string[]): ScaleSize {
  const at = argv.indexOf("--size");
  if (at < 0) return DEFAULT_SCALE_SIZE;
  const match = /^(\d{2,5})x(\d{2,5})$/.exec(argv[at + 1] ?? "");
  const width = Number(match?.[1]);
  const height = Number(match?.[2]);
  if (!match || width < 64 || height < 64 || width > 12_000 || height > 12_000) throw new Error(`--size takes WIDTHxHEIGHT from 64 to 12000 pixels each (6000x4000), not ${argv[at + 1] ?? "nothing"}`);
  return { width, height };
}

/** One reduction by runReductionOnFiles in a child process (no services, no queue). */
interface MeasuredReduction {
  /** From starting the processes to the last one's exit, ms. */
  wallMs: number;
  /** Around the reduction call alone (no process start-up), ms. */
  reductionMs: number;
  stagesMs: Record<string, number>;
  framesLeftOut: number;
  processes: WatchedProcess[];
  /** Largest single process's peak, bytes. */
  peakProcessBytes: number;
  /** Largest sum of resident memory of all processes at one sample, bytes. */
  peakTotalBytes: number;
  /** CPU of every process involved, seconds. */
  cpuS: number;
  /** Where the reduction left its outputs (natural.png for the floor). */
  outDir: string;
  scratch: ScratchSummary;
  /** Most bytes in use on the scratch folder's disk above what was in use at the start (frames, warped bands, outputs). */
  peakDiskBytes: number;
}

/** Bytes in use on the file system that holds `dir`. */
function diskUsedBytes(dir: string): number {
  const fs = statfsSync(dir);
  return (fs.blocks - fs.bfree) * fs.bsize;
}

/** One reduction of the bracket in a separate process, watched through /proc. */
async function measureInOneProcess(bracket: ScaleBracket, spill: ScaleSpill, scratch: string): Promise<MeasuredReduction> {
  const outDir = join(scratch, `reduction-${bracket.frames}`);
  const jobPath = join(scratch, `job-${bracket.frames}.json`);
  // Spilled frames go inside the benchmark's scratch folder, so that they go with it even when the reduction is killed.
  const job: ScaleChildJob = { files: bracket.files, exposuresS: bracket.exposuresS, outDir, spill, scratchDir: scratch };
  process.stderr.write(`reducing ${bracket.frames} frames in one process\n`);
  writeFileSync(jobPath, JSON.stringify(job));
  const diskAtStart = diskUsedBytes(scratch);
  let peakDiskBytes = 0;
  const diskTimer = setInterval(() => {
    peakDiskBytes = Math.max(peakDiskBytes, diskUsedBytes(scratch) - diskAtStart);
  }, 1000);
  const run = await runWatched(process.execPath, ["--import", "tsx", join(import.meta.dirname, "scale-reduce-child.ts"), jobPath], { cwd: process.cwd() });
  clearInterval(diskTimer);
  const result = findScaleChildResult(run.stdout);
  if (run.exitCode !== 0 || !result) {
    throw new Error(`the reduction of ${bracket.frames} frames ended with ${run.signal ?? `exit code ${run.exitCode}`}:\n${run.stderr.trim().split("\n").slice(-20).join("\n")}`);
  }
  // The root's own last VmHWM and CPU time are exact; the samples can miss its final moments.
  const rootCpuS = (result.cpuTicks.utime + result.cpuTicks.stime) / readClockTicksPerS();
  const sampled = run.processes.some((p) => p.isRoot) ? run.processes : [{ pid: run.pid, comm: "node", peakRssBytes: 0, cpuS: 0, isRoot: true }, ...run.processes];
  const processes = sampled.map((p) => (p.isRoot ? { ...p, peakRssBytes: Math.max(p.peakRssBytes, result.vmHwmBytes), cpuS: rootCpuS } : p));
  return {
    wallMs: run.wallMs,
    reductionMs: result.reductionMs,
    stagesMs: result.stagesMs,
    framesLeftOut: result.framesLeftOut,
    processes,
    peakProcessBytes: Math.max(...processes.map((p) => p.peakRssBytes)),
    peakTotalBytes: Math.max(run.peakTotalRssBytes, result.vmHwmBytes),
    // Each process's own time (a descendant's as last sampled), so none is counted twice.
    cpuS: processes.reduce((sum, p) => sum + p.cpuS, 0),
    outDir,
    scratch: result.scratch,
    peakDiskBytes,
  };
}

/** What the flow measures need from the app: the bench member and its set of each bracket; or why they could not be had. */
type AppSide = { db: Db; actor: Actor; setIds: Map<number, string> } | { reason: string };

async function prepareAppSide(brackets: readonly ScaleBracket[]): Promise<AppSide> {
  const log = (line: string) => process.stderr.write(`${line}\n`);
  try {
    await prepareDevelopmentServices(process.cwd(), log);
    // Our own enqueues (ingest, the reduction) go to the queues only the bench's workers read.
    process.env.QUEUE_PREFIX = BENCH_QUEUE_PREFIX;
    const db = getDb();
    await clearBenchQueues();
    const { actor, sets } = await prepareBenchSets(db, brackets, (work) => withBenchWorkers(2, () => work()), log);
    await clearBenchQueues();
    return { db, actor, setIds: new Map(sets.map((s) => [s.frames, s.setId])) };
  } catch (error) {
    return { reason: `the app's side could not be prepared: ${error instanceof Error ? error.message : String(error)}` };
  }
}

/**
 * The bracket reduced through the app's stepped flow (lib/reduction-flow) by `workers`
 * worker processes of our own on the development services: from startReduction to
 * done, each process watched through /proc. A run that cannot be made says why.
 */
async function measureReduction(bracket: ScaleBracket, workers: number, app: AppSide, oneCoreEach: boolean): Promise<FlowRun> {
  if ("reason" in app) return { measured: false, workers, reason: app.reason };
  const setId = app.setIds.get(bracket.frames);
  if (!setId) return { measured: false, workers, reason: `no bench set of ${bracket.frames} frames` };
  process.stderr.write(`reducing ${bracket.frames} frames through the flow with ${workers} worker process${workers > 1 ? "es" : ""}\n`);
  let lastAt = 0;
  return measureFlowReduction(app.db, app.actor, setId, bracket.frames, workers, (line) => {
    // Progress at most every 5 s: a long run would otherwise print thousands of lines.
    if (performance.now() - lastAt < 5000) return;
    lastAt = performance.now();
    process.stderr.write(`${line}\n`);
  }, oneCoreEach);
}

function mb(bytes: number): string {
  return (bytes / MiB).toFixed(0);
}

/** The reduction's process on a line of its own; the processes below it one line per program name. */
function describeProcesses(processes: WatchedProcess[]): string[] {
  const lines = processes.filter((p) => p.isRoot).map((p) => `reduction process ${p.comm} (pid ${p.pid}): peak ${mb(p.peakRssBytes)} MiB, CPU ${p.cpuS.toFixed(1)} s`);
  const byName = new Map<string, WatchedProcess[]>();
  for (const p of processes) if (!p.isRoot) byName.set(p.comm, [...(byName.get(p.comm) ?? []), p]);
  for (const [comm, group] of byName) {
    const peak = Math.max(...group.map((p) => p.peakRssBytes));
    const cpu = group.reduce((sum, p) => sum + p.cpuS, 0);
    lines.push(`${group.length} process${group.length > 1 ? "es" : ""} ${comm} below it: peak ${mb(peak)} MiB${group.length > 1 ? " (largest)" : ""}, CPU ${cpu.toFixed(1)} s${group.length > 1 ? " together" : ""}`);
  }
  return lines;
}

/** One flow run on a line, and each worker process on a line of its own. */
function describeFlowRun(run: FlowRun, single: MeasuredReduction | null, oneCoreEach: boolean): string[] {
  const label = `through the app's flow, ${run.workers} worker process${run.workers > 1 ? "es" : ""}${oneCoreEach ? " (one core each)" : ""}`;
  if (!run.measured) return [`${label}: not measured: ${run.reason}`];
  const lines = [`${label}: ${(run.wallMs / 1000).toFixed(1)} s from start to done, CPU ${run.cpuS.toFixed(1)} s = ${(run.cpuS / (run.wallMs / 1000)).toFixed(2)} cores busy, all processes together at most ${mb(run.peakTotalBytes)} MiB at one time, frames left out ${run.framesLeftOut}${single ? `; over the single process ${(run.wallMs / single.wallMs).toFixed(2)}` : ""}`];
  run.perWorker.forEach((w, i) => lines.push(`  worker process ${i + 1} (pid ${w.pid}): peak ${mb(w.peakRssBytes)} MiB (${mb(w.idleRssBytes)} MiB idle before the start), CPU ${w.cpuS.toFixed(1)} s`));
  // Which steps ran one after the other: a step whose span is near its busy time had nothing to share.
  for (const s of run.steps) {
    const who = s.busyByWorkerMs.map((ms) => (ms / 1000).toFixed(1)).join(" + ");
    lines.push(`    step ${s.step.padEnd(12)} ${s.parts > 0 ? `${s.parts} parts`.padEnd(9) : "parent   "} span ${(s.spanMs / 1000).toFixed(1).padStart(6)} s, busy ${(s.busyMs / 1000).toFixed(1).padStart(6)} s (${who})`);
  }
  for (const p of run.below) lines.push(`  process ${p.comm} (pid ${p.pid}) below a worker: peak ${mb(p.peakRssBytes)} MiB, CPU ${p.cpuS.toFixed(1)} s`);
  return lines;
}

function twoOverOne(runs: readonly FlowRun[]): number | null {
  const one = runs.find((r) => r.workers === 1);
  const two = runs.find((r) => r.workers === 2);
  return one?.measured && two?.measured ? two.wallMs / one.wallMs : null;
}

interface BracketFigures {
  frames: number;
  /** runReductionOnFiles in a child process: the baseline of the memory slope and the ratio to the floor (null with --flow-only). */
  single: MeasuredReduction | null;
  flows: FlowRun[];
  floor: { decodeMs: number; tileMs: number } | null;
}

/** The single-process figures of a bracket for the JSON line (none with --flow-only). */
function singleJson(f: BracketFigures): Record<string, unknown> {
  if (!f.single || !f.floor) return { single: null };
  return {
    processWallMs: Math.round(f.single.wallMs),
    reductionMs: Math.round(f.single.reductionMs),
    stagesMs: Object.fromEntries(Object.entries(f.single.stagesMs).map(([k, v]) => [k, Math.round(v)])),
    cpuS: Number(f.single.cpuS.toFixed(2)),
    coresBusy: Number((f.single.cpuS / (f.single.wallMs / 1000)).toFixed(2)),
    peakProcessBytes: f.single.peakProcessBytes,
    peakTotalBytes: f.single.peakTotalBytes,
    processes: f.single.processes.map((p) => ({ comm: p.comm, root: p.isRoot, peakRssBytes: p.peakRssBytes, cpuS: Number(p.cpuS.toFixed(2)) })),
    floorMs: { decode: Math.round(f.floor.decodeMs), tile: Math.round(f.floor.tileMs) },
    ratioToFloor: Number((f.single.reductionMs / (f.floor.decodeMs + f.floor.tileMs)).toFixed(3)),
    framesLeftOut: f.single.framesLeftOut,
    scratch: f.single.scratch,
    peakDiskBytes: f.single.peakDiskBytes,
  };
}

function describeScratch(scratch: ScratchSummary): string {
  const written = `${(scratch.writtenBytes / 1024 ** 3).toFixed(1)} GB written`;
  if (scratch.preparedFrames === "in-memory") return "frames held in memory";
  if (scratch.preparedFrames === "on-disk") return `frames and their prepared arrays on disk, ${written}`;
  return `frames on disk, their prepared arrays made again when read (${scratch.framesMadeAgain} times), ${written}`;
}

/** The single process's lines of a bracket: its processes, stages, the floor and the ratio to it. */
function describeSingle(f: BracketFigures): string[] {
  const s = f.single;
  if (!s || !f.floor) return [`${f.frames} frames, single process: not measured (--flow-only)`];
  const floorMs = f.floor.decodeMs + f.floor.tileMs;
  return [
    `${f.frames} frames, single process: ${(s.wallMs / 1000).toFixed(1)} s (reduction ${(s.reductionMs / 1000).toFixed(1)} s), CPU ${s.cpuS.toFixed(1)} s = ${(s.cpuS / (s.wallMs / 1000)).toFixed(2)} cores busy, frames left out ${s.framesLeftOut}`,
    ...describeProcesses(s.processes).map((line) => `  ${line}`),
    `  all processes together at most ${mb(s.peakTotalBytes)} MiB at one time`,
    `  scratch: ${describeScratch(s.scratch)}; disk in use at most ${(s.peakDiskBytes / 1024 ** 3).toFixed(1)} GB above the start`,
    `  stages (ms): ${Object.entries(s.stagesMs).map(([stage, ms]) => `${stage} ${Math.round(ms)}`).join(", ")}`,
    `  floor: sharp decode ${(f.floor.decodeMs / 1000).toFixed(1)} s + tiling one rendition ${(f.floor.tileMs / 1000).toFixed(1)} s = ${(floorMs / 1000).toFixed(1)} s; reduction / floor = ${(s.reductionMs / floorMs).toFixed(2)}  (aim: at most ${AIM_RATIO_TO_FLOOR})`,
  ];
}

export async function runScaleBench(argv: readonly string[]): Promise<void> {
  const spill = readSpillMode(argv);
  const only = readFrameCounts(argv);
  // The flow's measures alone (no single-process baseline, no floor): for a quick look at the sharing.
  const flowOnly = argv.includes("--flow-only");
  const size = readSize(argv);
  // The single process alone (no services, no flow): for sizes whose flow would not fit this machine's disk.
  const singleOnly = argv.includes("--single-only");
  if (flowOnly && singleOnly) throw new Error("--flow-only and --single-only exclude each other");
  const total = SCALE_PASSES[SCALE_PASSES.length - 1] * SCALE_LADDER_STEPS;
  const brackets: ScaleBracket[] = [];
  let madeS = 0;
  // The 81 frames only when one of their brackets is asked for (at 24 MP they take most of an hour to make).
  if (!only || only.some((n) => n !== SCALE_LONG_FRAMES)) {
    let lastTenth = -1;
    const prepared = await prepareScaleBrackets(join(process.cwd(), ".cache"), size, (done) => {
      const tenth = Math.floor((10 * done) / total);
      if (tenth !== lastTenth) process.stderr.write(`making the frames: ${done} of ${total}\n`);
      lastTenth = tenth;
    });
    brackets.push(...prepared.brackets.filter((b) => !only || only.includes(b.frames)));
    madeS += prepared.madeS;
  }
  // The long bracket only when asked for: it is made once (about 15 minutes at the default size) and reduced for most of an hour.
  if (only?.includes(SCALE_LONG_FRAMES)) {
    let lastLong = -1;
    const long = await prepareLongScaleBracket(join(process.cwd(), ".cache"), size, (done) => {
      const tenth = Math.floor((10 * done) / SCALE_LONG_FRAMES);
      if (tenth !== lastLong) process.stderr.write(`making the long bracket's frames: ${done} of ${SCALE_LONG_FRAMES}\n`);
      lastLong = tenth;
    });
    brackets.push(...long.brackets);
    madeS += long.madeS;
  }
  const workerCounts = singleOnly ? [] : readWorkerCounts(argv);
  // Each worker process held to a core of its own (taskset), as if each were a machine of one core:
  // on this machine of two cores, one unbounded worker already uses both (its threads), and a second
  // would find no core free; this shows what the flow shares when each worker brings its own.
  const oneCoreEach = argv.includes("--one-core-each");
  const app: AppSide = singleOnly ? { reason: "the flow not measured (--single-only)" } : await prepareAppSide(brackets);
  if ("reason" in app) process.stderr.write(`${app.reason}\n`);
  const scratch = mkdtempSync(join(tmpdir(), "crownlight-bench-scale-"));
  const figures: BracketFigures[] = [];
  try {
    // Per bracket, the three measures one after the other, so that load from other work on the machine falls on all of them alike.
    for (const bracket of brackets) {
      const single = flowOnly ? null : await measureInOneProcess(bracket, spill, scratch);
      const flows: FlowRun[] = [];
      for (const workers of workerCounts) flows.push(await measureReduction(bracket, workers, app, oneCoreEach));
      let floor = null;
      if (single) {
        process.stderr.write(`floor for ${bracket.frames} frames\n`);
        const floorDir = mkdtempSync(join(scratch, "floor-"));
        floor = await measureFloorMs(bracket.files, join(single.outDir, "natural.png"), floorDir);
        rmSync(single.outDir, { recursive: true, force: true });
        rmSync(floorDir, { recursive: true, force: true });
      }
      figures.push({ frames: bracket.frames, single, flows, floor });
    }
  } finally {
    rmSync(scratch, { recursive: true, force: true });
    if (!("reason" in app)) {
      await closeQueues();
      await closeProducerRedis();
      await closeDb();
    }
  }

  const ladder = `a ${SCALE_LADDER_STEPS}-step ladder from 1/2000 s to 1 s taken ${SCALE_PASSES.join(", ")} times${figures.some((f) => f.frames === SCALE_LONG_FRAMES) ? `; the long bracket runs the ladder over ${SCALE_LONG_FRAMES} frames` : ""}`;
  console.log(`\nCrownlight scale benchmark: brackets of ${figures.map((f) => f.frames).join(", ")} frames of ${size.width} x ${size.height} 16-bit RGB TIFF (${ladder})${madeS ? `, made in ${madeS.toFixed(0)} s` : ", cached"}`);
  if (singleOnly) console.log("Each bracket is reduced once, by runReductionOnFiles in a single process of its own (--single-only: the flow is not measured).");
  else {
    console.log("Each bracket is reduced three times: by runReductionOnFiles in a single process of its own (the baseline of the memory slope");
    console.log("and the ratio to the floor), and through the app's stepped flow with one and with two worker processes (worker/index.ts on the");
    console.log(`development services, frames uploaded and ingested into a bench set, timed from starting the reduction to done).`);
  }
  console.log("Every process is watched through /proc with every process below it. Single process: " +
    `${spill === "always" ? "frames kept on local disk between stages" : spill === "never" ? "frames kept in memory" : "frames kept on disk or in memory as the reduction decides by the files' size"} (spill: ${spill}).\n`);
  for (const f of figures) {
    for (const line of describeSingle(f)) console.log(line);
    for (const run of f.flows) for (const line of describeFlowRun(run, f.single, oneCoreEach)) console.log(`  ${line}`);
    const ratio = twoOverOne(f.flows);
    console.log(`  two worker processes / one = ${ratio === null ? "not measured" : ratio.toFixed(2)}  (aim: at most ${AIM_TWO_OVER_ONE})`);
  }
  const withSingle = figures.filter((f): f is BracketFigures & { single: MeasuredReduction } => f.single !== null);
  const line = withSingle.length >= 2 ? fitLine(withSingle.map((f) => f.frames), withSingle.map((f) => f.single.peakProcessBytes / MiB)) : null;
  console.log(line
    ? `\npeak memory of the largest single process against frames (least squares over ${withSingle.length} brackets): ${line.slope.toFixed(2)} MiB = ${((line.slope * MiB) / 1e6).toFixed(2)} MB per frame, ${line.intercept.toFixed(0)} MiB at zero frames  (aim: under ${AIM_SLOPE_MB_PER_FRAME} MB per frame)`
    : "\npeak memory against frames: needs the single process on at least two brackets");
  const largest = figures[figures.length - 1];
  const ratio = largest ? twoOverOne(largest.flows) : null;
  console.log(ratio !== null
    ? `two worker processes / one through the flow on ${largest.frames} frames = ${ratio.toFixed(2)}  (aim: at most ${AIM_TWO_OVER_ONE})`
    : `two worker processes / one on ${largest?.frames ?? "no"} frames: not measured (aim: at most ${AIM_TWO_OVER_ONE})`);

  console.log(JSON.stringify({
    bench: "scale",
    width: size.width,
    height: size.height,
    ladderSteps: SCALE_LADDER_STEPS,
    spill,
    oneCoreEach,
    brackets: figures.map((f) => ({
      frames: f.frames,
      ...singleJson(f),
      flows: f.flows.map((r) => (r.measured
        ? {
            workers: r.workers, wallMs: Math.round(r.wallMs), cpuS: Number(r.cpuS.toFixed(2)), peakTotalBytes: r.peakTotalBytes, framesLeftOut: r.framesLeftOut,
            perWorker: r.perWorker.map((w) => ({ peakRssBytes: w.peakRssBytes, idleRssBytes: w.idleRssBytes, cpuS: Number(w.cpuS.toFixed(2)) })),
            steps: r.steps,
          }
        : { workers: r.workers, wallMs: null, reason: r.reason })),
      twoWorkersOverOne: twoOverOne(f.flows) === null ? null : Number(twoOverOne(f.flows)!.toFixed(3)),
    })),
    memorySlopeMbPerFrame: line ? Number(line.slope.toFixed(3)) : null,
    memoryInterceptMb: line ? Number(line.intercept.toFixed(1)) : null,
    twoWorkersOverOne: ratio === null ? null : Number(ratio.toFixed(3)),
  }));
}
