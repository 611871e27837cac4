// One reduction of the scale benchmark, in a process of its own so that its memory
// is its own: reads a job file (frames, exposures, output folder), reduces with
// runReductionOnFiles as `npm run bench` does, and prints one line starting with
// SCALE_CHILD_RESULT and a JSON object: the reduction's time and stage times, and
// this process's own high-water mark (VmHWM) and CPU time (user and system), read
// from /proc just before it exits (the watcher outside samples the processes below it).
// Run by scripts/bench/scale.ts: node --import tsx scripts/bench/scale-reduce-child.ts JOB.json
import { readFileSync } from "node:fs";
import { basename } from "node:path";
import { closeExifWriter } from "@/lib/media";
import { runReductionOnFiles } from "@/lib/reduction-runner";
import { parseProcStat, parseProcStatus } from "./proc-stats";
import { SCALE_CHILD_RESULT, type ScaleChildJob, type ScaleChildResult } from "./scale-child-protocol";

async function main(): Promise<void> {
  const jobPath = process.argv[2];
  if (!jobPath) throw new Error("usage: scale-reduce-child.ts JOB.json");
  const job = JSON.parse(readFileSync(jobPath, "utf8")) as ScaleChildJob;
  const exposureOverrides = new Map(job.files.map((file, k) => [basename(file), job.exposuresS[k]]));
  const started = performance.now();
  const { report, scratch } = await runReductionOnFiles({ files: job.files, outDir: job.outDir, exposureOverrides, exposureOverrideSource: "the benchmark's exposure list", spill: job.spill, scratchDir: job.scratchDir });
  const reductionMs = performance.now() - started;
  await closeExifWriter();
  const status = parseProcStatus(readFileSync("/proc/self/status", "utf8"));
  const stat = parseProcStat(readFileSync("/proc/self/stat", "utf8"));
  if (!status || !stat) throw new Error("/proc/self/status or /proc/self/stat could not be read");
  const result: ScaleChildResult = {
    reductionMs,
    stagesMs: report.timingsMs,
    framesLeftOut: report.framesLeftOut.length,
    vmHwmBytes: status.hwmBytes,
    cpuTicks: { utime: stat.utimeTicks, stime: stat.stimeTicks },
    scratch,
  };
  process.stdout.write(`${SCALE_CHILD_RESULT} ${JSON.stringify(result)}\n`);
}

main().catch((error: unknown) => {
  process.stderr.write(`${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
  process.exitCode = 1;
});
