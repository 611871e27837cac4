// The per-frame stages of a reduction, each timed on its own, on a few cached
// frames: decode, the bracket's defect search, linearize, limb fit and
// registration. For profiling (node --cpu-prof) and for before/after comparisons:
// the results (defect count, limb fits, transforms) go to a JSON file so that two
// versions of the code can be compared on the same input.
// Run: npx tsx scripts/bench/prepare-stages.ts --dir .cache/bench-scale-1500x1000-81-seed11-v2 --frames 9 [--out FILE.json] [--stages decode,defects,prepare,register]
// --stages runner reduces the picked frames whole instead (--spill always|never|auto), and prints each stage's cores busy,
// peak RSS (sampled every 20 ms from a worker thread) and, where the stage ends, the heap and the array buffers held;
// --stop-at STAGE ends the reduction as that stage starts (e.g. merge-pilot: the stages up to the levels alone).
// --stages prepare,register,register-pool also registers with the pairs compared in the frame pool's two threads (the same transforms).
import { createHash } from "node:crypto";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { basename, join } from "node:path";
import { findBadPixelsFromBracket } from "@/lib/imaging/calibrate-defects";
import { fitLimb } from "@/lib/imaging/limb-fit";
import { linearizeFrame } from "@/lib/imaging/linearize";
import { registerFrames, registerFramesOnThreads, type RegistrationFrame } from "@/lib/imaging/register";
import { DEFAULT_REDUCTION_PARAMS, type LinearFrame } from "@/lib/imaging/types";
import { decodeFrame } from "@/lib/media";
import { runReductionOnFiles } from "@/lib/reduction-runner";
import { createPreparePool, PREPARE_WORKERS } from "@/lib/reduction-runner/prepare-pool";
import { startMemorySampler } from "./memory-sampler";

interface Args {
  dir: string;
  frames: number;
  first: number;
  out?: string;
  stages: Set<string>;
  spill?: "auto" | "always" | "never";
  stopAt?: string;
}

function readArgs(argv: string[]): Args {
  const args: Args = { dir: "", frames: 9, first: 0, stages: new Set(["decode", "defects", "prepare", "register"]) };
  for (let k = 0; k < argv.length; k++) {
    const value = argv[k + 1];
    if (argv[k] === "--dir") args.dir = value;
    else if (argv[k] === "--frames") args.frames = Number(value);
    else if (argv[k] === "--first") args.first = Number(value);
    else if (argv[k] === "--out") args.out = value;
    else if (argv[k] === "--stages") args.stages = new Set(value.split(","));
    else if (argv[k] === "--spill") args.spill = value as Args["spill"];
    else if (argv[k] === "--stop-at") args.stopAt = value;
    else continue;
    k++;
  }
  if (!args.dir) throw new Error("usage: prepare-stages.ts --dir FOLDER [--frames N] [--first K] [--out FILE.json] [--stages decode,defects,prepare,register]");
  return args;
}

const MB = 1024 ** 2;

/** SHA-256 of master.fits after its primary header (whose DATE changes from run to run): the master's pixels, to compare two runs. */
function hashMasterData(path: string): string {
  const bytes = readFileSync(path);
  let end = 0;
  for (let card = 0; card + 80 <= bytes.length; card += 80) {
    if (bytes.toString("latin1", card, card + 8) === "END     ") {
      end = Math.ceil((card + 80) / 2880) * 2880;
      break;
    }
  }
  return createHash("sha256").update(bytes.subarray(end)).digest("hex");
}

/**
 * The whole single-process reduction (runReductionOnFiles) on the picked frames,
 * with the wall time, CPU time (every thread of this process), cores busy and peak
 * RSS of each stage the reduction reports, from one report of progress to the next
 * stage's, and what V8 held where the stage ended (heap in use, array buffers:
 * the frames' typed arrays are array buffers, outside the heap).
 */
async function measureRunner(picked: { path: string; exposureS: number }[], out?: string, spill?: Args["spill"], stopAt?: string): Promise<void> {
  const scratch = mkdtempSync(join(tmpdir(), "crownlight-prepare-stages-"));
  const rows: { stage: string; wallMs: number; cpuMs: number; peakRssMb: number; endHeapMb: number; endArrayBuffersMb: number }[] = [];
  let current = "";
  let wall = performance.now();
  let cpu = process.cpuUsage();
  const sampler = startMemorySampler(20);
  sampler.takeSpanPeakBytes();
  const close = () => {
    const used = process.cpuUsage(cpu);
    const memory = process.memoryUsage();
    rows.push({
      stage: current, wallMs: performance.now() - wall, cpuMs: (used.user + used.system) / 1000,
      peakRssMb: Math.round(sampler.takeSpanPeakBytes() / MB), endHeapMb: Math.round(memory.heapUsed / MB), endArrayBuffersMb: Math.round(memory.arrayBuffers / MB),
    });
    wall = performance.now();
    cpu = process.cpuUsage();
  };
  const stopped = new Error(`stopped as ${stopAt} started`);
  try {
    const outDir = join(scratch, "out");
    const run = await runReductionOnFiles({
      files: picked.map((p) => p.path), outDir, exposureOverrides: new Map(picked.map((p) => [basename(p.path), p.exposureS])), spill,
      onProgress: (stage) => {
        if (stage === current) return;
        if (current) close();
        current = stage;
        if (stage === stopAt) throw stopped;
      },
    }).catch((error: unknown) => {
      if (error !== stopped) throw error;
      return undefined;
    });
    if (current !== stopAt) close();
    console.log("stage                  wall       CPU  cores busy  peak RSS   at its end: heap  array buffers");
    for (const r of rows) {
      if (r.wallMs < 50) continue;
      console.log(`${r.stage.padEnd(18)} ${(r.wallMs / 1000).toFixed(2).padStart(8)} s ${(r.cpuMs / 1000).toFixed(2).padStart(7)} s ${(r.cpuMs / r.wallMs).toFixed(2).padStart(6)} ${String(r.peakRssMb).padStart(8)} MB ${String(r.endHeapMb).padStart(10)} MB ${String(r.endArrayBuffersMb).padStart(10)} MB`);
    }
    const peakMb = Math.max(...rows.map((r) => r.peakRssMb));
    if (!run) {
      console.log(`peak RSS up to ${stopAt} ${peakMb} MB`);
      if (out) writeFileSync(out, `${JSON.stringify({ stages: rows }, null, 2)}\n`);
      return;
    }
    const masterSha256 = hashMasterData(join(outDir, "master.fits"));
    console.log(`peak RSS of the reduction ${peakMb} MB; master's pixels SHA-256 ${masterSha256}`);
    if (out) {
      const frames = run.report.frames.map((f) => ({ name: f.name, limb: f.limb, transform: f.transform, offset: f.offset, transmission: f.transmission, effectiveExposureS: f.effectiveExposureS }));
      writeFileSync(out, `${JSON.stringify({ stages: rows, masterSha256, frames }, null, 2)}\n`);
    }
  } finally {
    await sampler.stop();
    rmSync(scratch, { recursive: true, force: true });
  }
}

async function main(): Promise<void> {
  const args = readArgs(process.argv.slice(2));
  const list = JSON.parse(readFileSync(join(args.dir, "frames.json"), "utf8")) as { files: string[]; exposuresS: number[] };
  const picked = list.files.slice(args.first, args.first + args.frames).map((f, k) => ({ path: join(args.dir, f), exposureS: list.exposuresS[args.first + k] }));
  if (args.stages.has("runner")) return measureRunner(picked, args.out, args.spill, args.stopAt);
  // Wall time and this process's CPU time per stage: on a shared machine the CPU time is the fairer measure.
  const times: Record<string, number> = {};
  const cpuTimes: Record<string, number> = {};
  const cpuMs = () => {
    const u = process.cpuUsage();
    return (u.user + u.system) / 1000;
  };
  const time = <T,>(stage: string, run: () => T): T => {
    const started = performance.now();
    const cpuStarted = cpuMs();
    const value = run();
    times[stage] = (times[stage] ?? 0) + performance.now() - started;
    cpuTimes[stage] = (cpuTimes[stage] ?? 0) + cpuMs() - cpuStarted;
    return value;
  };

  const started = performance.now();
  const cpuStarted = cpuMs();
  const frames: LinearFrame[] = [];
  for (const { path, exposureS } of picked) {
    const d = await decodeFrame(path, basename(path));
    frames.push({ name: d.name, image: d.image, exposureS, blackLevel: d.blackLevel, blackLevelSource: d.blackLevelSource, whiteLevel: d.whiteLevel, encoding: d.encoding });
  }
  times.decode = performance.now() - started;
  cpuTimes.decode = cpuMs() - cpuStarted;
  const result: Record<string, unknown> = {};

  if (args.stages.has("defects")) {
    const badPixels = time("defects", () => findBadPixelsFromBracket(frames));
    let count = 0;
    for (const v of badPixels) count += v;
    result.defects = count;
    if (count > 0) frames.forEach((f, i) => { frames[i] = { ...f, badPixels }; });
  }
  if (!args.stages.has("prepare")) return report(args, times, cpuTimes, result);

  const registration: RegistrationFrame[] = [];
  const limbs: unknown[] = [];
  for (const frame of frames) {
    const linear = time("linearize", () => linearizeFrame(frame, DEFAULT_REDUCTION_PARAMS.clipFraction, { keepPlanes: false }));
    const limb = time("limb", () => fitLimb(linear.luminance, linear.width, linear.height, { clipLevel: linear.clipLevel, clipped: linear.clipped, noiseSigma: linear.noiseSigma }));
    limbs.push({ name: frame.name, x: limb.x, y: limb.y, radiusPx: limb.radiusPx, verdict: limb.verdict });
    registration.push({
      name: frame.name, width: linear.width, height: linear.height, exposureS: frame.exposureS, luminance: linear.luminance, clipped: linear.clipped,
      noiseSigma: linear.noiseSigma, limb: limb.verdict === "failed" ? { x: NaN, y: NaN, radiusPx: NaN } : { x: limb.x, y: limb.y, radiusPx: limb.radiusPx },
    });
  }
  result.limbs = limbs;
  const describeRegistration = (registered: ReturnType<typeof registerFrames>) => registered.frames.map((r, i) => ({ name: frames[i].name, ...r.masterToFrame, method: r.method, neighbour: r.neighbour, peak: r.peak, similarity: r.similarity }));
  if (args.stages.has("register")) {
    const registered = time("register", () => registerFrames(registration, { mode: "corona" }));
    result.registration = describeRegistration(registered);
  }
  if (args.stages.has("register-pool")) {
    // The pool's threads start before the clock (the runner has them running from the decode on);
    // CPU time here is every thread's of this process, so cores busy = CPU / wall.
    const pool = createPreparePool();
    try {
      // Both threads booted (tsx's loader, the imaging modules) by a decode each.
      await Promise.all(picked.slice(0, PREPARE_WORKERS).map(({ path }) => pool.decode(path, basename(path), false)));
      const started = performance.now();
      const cpuStarted = cpuMs();
      const registered = await registerFramesOnThreads(registration, { mode: "corona" }, (task) => pool.registerPair(task), PREPARE_WORKERS);
      times["register-pool"] = performance.now() - started;
      cpuTimes["register-pool"] = cpuMs() - cpuStarted;
      result.registrationPool = describeRegistration(registered);
      if (result.registration) console.log(`register-pool gives the same transforms as register: ${JSON.stringify(result.registration) === JSON.stringify(result.registrationPool)}`);
    } finally {
      await pool.close();
    }
  }
  report(args, times, cpuTimes, result);
}

function report(args: Args, times: Record<string, number>, cpuTimes: Record<string, number>, result: Record<string, unknown>): void {
  const seconds = (ms: number) => `${(ms / 1000).toFixed(2)} s`.padStart(9);
  console.log("stage        wall       CPU   CPU a frame");
  for (const [stage, ms] of Object.entries(times)) console.log(`${stage.padEnd(10)} ${seconds(ms)} ${seconds(cpuTimes[stage])} ${seconds(cpuTimes[stage] / args.frames)}`);
  if (args.out) writeFileSync(args.out, `${JSON.stringify({ times, cpuTimes, ...result }, null, 2)}\n`);
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
