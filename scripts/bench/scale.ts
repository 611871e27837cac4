// `npm run bench -- scale`: how a reduction grows with the number of frames.
// Brackets of 9, 27 and 81 frames of one size (scale-bracket.ts, cached in .cache/)
// are each reduced in a process of their own, watched from outside through /proc
// (that process and every process below it: time, peak memory, CPU). Prints per
// bracket the time and peak memory of every process involved and the cores busy;
// then the least-squares slope of peak memory against frames, the floor (sharp
// decoding the same frames plus tiling one rendition) and the ratio to it, and the
// time with one and with two worker processes. Aims are printed, never asserted.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { measureFloorMs } from "./floor";
import { readClockTicksPerS, runWatched, type WatchedProcess } from "./process-monitor";
import { fitLine } from "./proc-stats";
import { SCALE_HEIGHT, SCALE_LADDER_STEPS, SCALE_PASSES, SCALE_WIDTH, prepareScaleBrackets, type ScaleBracket } from "./scale-bracket";
import { findScaleChildResult, SCALE_SPILL_MODES, type ScaleChildJob, type ScaleSpill } from "./scale-child-protocol";

const MB = 1024 ** 2;
const AIM_SLOPE_MB_PER_FRAME = 5;
const AIM_RATIO_TO_FLOOR = 4;
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
/** How the two-worker figure will be measured: one bracket, this many worker processes. */
const WORKER_COUNTS = [1, 2] as const;

interface MeasuredReduction {
  measured: true;
  workers: number;
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
}

interface UnmeasuredReduction {
  measured: false;
  workers: number;
  reason: string;
}

type ReductionRun = MeasuredReduction | UnmeasuredReduction;

/** One reduction of the bracket in a separate process, watched through /proc. */
async function measureInOneProcess(bracket: ScaleBracket, spill: ScaleSpill, scratch: string): Promise<MeasuredReduction> {
  const outDir = join(scratch, `reduction-${bracket.frames}`);
  const jobPath = join(scratch, `job-${bracket.frames}.json`);
  // Spilled frames go inside the benchmark's scratch folder, so that they go with it even when the reduction is killed.
  const job: ScaleChildJob = { files: bracket.files, exposuresS: bracket.exposuresS, outDir, spill, scratchDir: scratch };
  process.stderr.write(`reducing ${bracket.frames} frames in one process\n`);
  writeFileSync(jobPath, JSON.stringify(job));
  const run = await runWatched(process.execPath, ["--import", "tsx", join(import.meta.dirname, "scale-reduce-child.ts"), jobPath], { cwd: process.cwd() });
  const result = findScaleChildResult(run.stdout);
  if (run.exitCode !== 0 || !result) {
    throw new Error(`the reduction of ${bracket.frames} frames ended with ${run.signal ?? `exit code ${run.exitCode}`}:\n${run.stderr.trim().split("\n").slice(-20).join("\n")}`);
  }
  // The root's own last VmHWM and CPU time are exact; the samples can miss its final moments.
  const rootCpuS = (result.cpuTicks.utime + result.cpuTicks.stime) / readClockTicksPerS();
  const sampled = run.processes.some((p) => p.isRoot) ? run.processes : [{ pid: run.pid, comm: "node", peakRssBytes: 0, cpuS: 0, isRoot: true }, ...run.processes];
  const processes = sampled.map((p) => (p.isRoot ? { ...p, peakRssBytes: Math.max(p.peakRssBytes, result.vmHwmBytes), cpuS: rootCpuS } : p));
  return {
    measured: true,
    workers: 1,
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
  };
}

/**
 * The bracket reduced with `workers` worker processes sharing the work. One reduction
 * runs in one process today; when its frames become jobs that several worker processes
 * take, the branch for workers > 1 starts those processes, submits the reduction and
 * watches all of them (watchProcessTrees takes several roots).
 */
async function measureReduction(bracket: ScaleBracket, workers: number, spill: ScaleSpill, scratch: string): Promise<ReductionRun> {
  if (workers === 1) return measureInOneProcess(bracket, spill, scratch);
  return {
    measured: false,
    workers,
    reason: "a reduction still runs whole in one process; its frames are not yet shared out as jobs that several worker processes take, so a second worker process would sit idle",
  };
}

function mb(bytes: number): string {
  return (bytes / MB).toFixed(0);
}

/** The reduction's process on a line of its own; the processes below it one line per program name. */
function describeProcesses(processes: WatchedProcess[]): string[] {
  const lines = processes.filter((p) => p.isRoot).map((p) => `reduction process ${p.comm} (pid ${p.pid}): peak ${mb(p.peakRssBytes)} MB, CPU ${p.cpuS.toFixed(1)} s`);
  const byName = new Map<string, WatchedProcess[]>();
  for (const p of processes) if (!p.isRoot) byName.set(p.comm, [...(byName.get(p.comm) ?? []), p]);
  for (const [comm, group] of byName) {
    const peak = Math.max(...group.map((p) => p.peakRssBytes));
    const cpu = group.reduce((sum, p) => sum + p.cpuS, 0);
    lines.push(`${group.length} process${group.length > 1 ? "es" : ""} ${comm} below it: peak ${mb(peak)} MB${group.length > 1 ? " (largest)" : ""}, CPU ${cpu.toFixed(1)} s${group.length > 1 ? " together" : ""}`);
  }
  return lines;
}

interface BracketFigures {
  frames: number;
  runs: ReductionRun[];
  single: MeasuredReduction;
  floor: { decodeMs: number; tileMs: number };
}

export async function runScaleBench(argv: readonly string[]): Promise<void> {
  const spill = readSpillMode(argv);
  const total = SCALE_PASSES[SCALE_PASSES.length - 1] * SCALE_LADDER_STEPS;
  let lastTenth = -1;
  const prepared = await prepareScaleBrackets(join(process.cwd(), ".cache"), (done) => {
    const tenth = Math.floor((10 * done) / total);
    if (tenth !== lastTenth) process.stderr.write(`making the frames: ${done} of ${total}\n`);
    lastTenth = tenth;
  });
  const scratch = mkdtempSync(join(tmpdir(), "crownlight-bench-scale-"));
  const figures: BracketFigures[] = [];
  try {
    for (const bracket of prepared.brackets) {
      const runs: ReductionRun[] = [];
      for (const workers of WORKER_COUNTS) {
        runs.push(await measureReduction(bracket, workers, spill, scratch));
      }
      const single = runs.find((r): r is MeasuredReduction => r.measured && r.workers === 1)!;
      process.stderr.write(`floor for ${bracket.frames} frames\n`);
      const floorDir = mkdtempSync(join(scratch, "floor-"));
      const floor = await measureFloorMs(bracket.files, join(single.outDir, "natural.png"), floorDir);
      for (const run of runs) if (run.measured) rmSync(run.outDir, { recursive: true, force: true });
      rmSync(floorDir, { recursive: true, force: true });
      figures.push({ frames: bracket.frames, runs, single, floor });
    }
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }

  const ladder = `a ${SCALE_LADDER_STEPS}-step ladder from 1/2000 s to 1 s taken ${SCALE_PASSES.join(", ")} times`;
  console.log(`\nCrownlight scale benchmark: brackets of ${figures.map((f) => f.frames).join(", ")} frames of ${SCALE_WIDTH} x ${SCALE_HEIGHT} 16-bit RGB TIFF (${ladder})${prepared.madeS ? `, made in ${prepared.madeS.toFixed(0)} s` : ", cached"}`);
  console.log("Each reduction runs in a process of its own, watched through /proc with every process below it;");
  console.log(`${spill === "always" ? "frames kept on local disk between stages" : spill === "never" ? "frames kept in memory" : "frames kept on disk or in memory as the reduction decides by the files' size"} (spill: ${spill}).\n`);
  for (const f of figures) {
    const s = f.single;
    const floorMs = f.floor.decodeMs + f.floor.tileMs;
    console.log(`${f.frames} frames: process ${(s.wallMs / 1000).toFixed(1)} s (reduction ${(s.reductionMs / 1000).toFixed(1)} s), CPU ${s.cpuS.toFixed(1)} s = ${(s.cpuS / (s.wallMs / 1000)).toFixed(2)} cores busy, frames left out ${s.framesLeftOut}`);
    for (const line of describeProcesses(s.processes)) console.log(`  ${line}`);
    console.log(`  all processes together at most ${mb(s.peakTotalBytes)} MB at one time`);
    console.log(`  stages (ms): ${Object.entries(s.stagesMs).map(([stage, ms]) => `${stage} ${Math.round(ms)}`).join(", ")}`);
    console.log(`  floor: sharp decode ${(f.floor.decodeMs / 1000).toFixed(1)} s + tiling one rendition ${(f.floor.tileMs / 1000).toFixed(1)} s = ${(floorMs / 1000).toFixed(1)} s; reduction / floor = ${(s.reductionMs / floorMs).toFixed(2)}  (aim: at most ${AIM_RATIO_TO_FLOOR})`);
    for (const run of f.runs) {
      if (run.measured) console.log(`  ${run.workers} worker process${run.workers > 1 ? "es" : ""}: ${(run.wallMs / 1000).toFixed(1)} s`);
      else console.log(`  ${run.workers} worker processes: not measured yet: ${run.reason}`);
    }
  }
  const line = fitLine(figures.map((f) => f.frames), figures.map((f) => f.single.peakProcessBytes / MB));
  console.log(`\npeak memory of the largest process against frames (least squares over ${figures.length} brackets): ${line.slope.toFixed(2)} MB per frame, ${line.intercept.toFixed(0)} MB at zero frames  (aim: under ${AIM_SLOPE_MB_PER_FRAME} MB per frame)`);
  const largest = figures[figures.length - 1];
  const two = largest.runs.find((r) => r.workers === 2);
  console.log(two?.measured
    ? `two worker processes / one on ${largest.frames} frames = ${(two.wallMs / largest.single.wallMs).toFixed(2)}  (aim: at most 0.6)`
    : `two worker processes / one on ${largest.frames} frames: not measured yet (aim: at most 0.6)`);

  console.log(JSON.stringify({
    bench: "scale",
    width: SCALE_WIDTH,
    height: SCALE_HEIGHT,
    ladderSteps: SCALE_LADDER_STEPS,
    spill,
    brackets: figures.map((f) => ({
      frames: f.frames,
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
      workers: f.runs.map((r) => (r.measured ? { workers: r.workers, wallMs: Math.round(r.wallMs) } : { workers: r.workers, wallMs: null })),
    })),
    memorySlopeMbPerFrame: Number(line.slope.toFixed(3)),
    memoryInterceptMb: Number(line.intercept.toFixed(1)),
    twoWorkersOverOne: two?.measured ? Number((two.wallMs / largest.single.wallMs).toFixed(3)) : null,
  }));
}
