// Watches processes from the outside through /proc: every sample finds the roots'
// descendants (any process whose parent chain leads to a root), reads each one's
// resident memory now (VmRSS), the kernel's high-water mark (VmHWM) and CPU time.
// A process's VmHWM is exact while it lives; once it has exited /proc no longer has
// it, so a root should report its own last VmHWM (see scale-reduce-child.ts) and
// for short-lived descendants the last sample stands (at most one interval late).
import { execFileSync, spawn } from "node:child_process";
import { readdirSync, readFileSync } from "node:fs";
import { findDescendants, parseProcStat, parseProcStatus } from "./proc-stats";

export interface WatchedProcess {
  pid: number;
  comm: string;
  /** Largest of the VmHWM and VmRSS samples, bytes. */
  peakRssBytes: number;
  /** utime + stime at the last sample, seconds. */
  cpuS: number;
  isRoot: boolean;
}

export interface WatchSummary {
  processes: WatchedProcess[];
  /** Largest sum of VmRSS over all watched processes in one sample, bytes. */
  peakTotalRssBytes: number;
  samples: number;
}

let clockTicksPerS: number | undefined;
/** USER_HZ, the unit of the times in /proc/PID/stat (sysconf(_SC_CLK_TCK)). */
export function readClockTicksPerS(): number {
  if (clockTicksPerS === undefined) {
    const text = execFileSync("getconf", ["CLK_TCK"], { encoding: "utf8" }).trim();
    const ticks = Number(text);
    if (!(Number.isInteger(ticks) && ticks > 0)) throw new Error(`getconf CLK_TCK printed "${text}", not a positive whole number`);
    clockTicksPerS = ticks;
  }
  return clockTicksPerS;
}

function readText(path: string): string | null {
  try {
    return readFileSync(path, "utf8");
  } catch {
    return null; // the process has exited between listing and reading
  }
}

/** pid -> parent pid for every process /proc lists now. */
function readParents(): Map<number, number> {
  const parents = new Map<number, number>();
  for (const entry of readdirSync("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    const text = readText(`/proc/${entry}/stat`);
    const stat = text ? parseProcStat(text) : null;
    if (stat) parents.set(stat.pid, stat.ppid);
  }
  return parents;
}

export interface TreeWatcher {
  /** Take one last sample and stop. */
  stop: () => WatchSummary;
}

export function watchProcessTrees(roots: readonly number[], intervalMs = 100): TreeWatcher {
  const ticks = readClockTicksPerS();
  const watched = new Map<number, WatchedProcess>();
  let peakTotalRssBytes = 0;
  let samples = 0;
  const sample = () => {
    const pids = [...roots, ...findDescendants(roots, readParents())];
    let total = 0;
    for (const pid of pids) {
      const statText = readText(`/proc/${pid}/stat`);
      const statusText = readText(`/proc/${pid}/status`);
      const stat = statText ? parseProcStat(statText) : null;
      const status = statusText ? parseProcStatus(statusText) : null;
      if (!stat || !status) continue;
      total += status.rssBytes;
      const entry = watched.get(pid) ?? { pid, comm: stat.comm, peakRssBytes: 0, cpuS: 0, isRoot: roots.includes(pid) };
      entry.comm = stat.comm;
      entry.peakRssBytes = Math.max(entry.peakRssBytes, status.hwmBytes, status.rssBytes);
      entry.cpuS = (stat.utimeTicks + stat.stimeTicks) / ticks;
      watched.set(pid, entry);
    }
    peakTotalRssBytes = Math.max(peakTotalRssBytes, total);
    samples++;
  };
  sample();
  const timer = setInterval(sample, intervalMs);
  return {
    stop: () => {
      clearInterval(timer);
      sample();
      return { processes: [...watched.values()], peakTotalRssBytes, samples };
    },
  };
}

export interface WatchedRun extends WatchSummary {
  pid: number;
  exitCode: number | null;
  signal: NodeJS.Signals | null;
  /** From spawning to the process's exit, ms. */
  wallMs: number;
  stdout: string;
  stderr: string;
}

/** Run one command as a watched root and wait for it to end. */
export function runWatched(command: string, args: readonly string[], options: { cwd?: string; intervalMs?: number } = {}): Promise<WatchedRun> {
  return new Promise((resolve, reject) => {
    const started = performance.now();
    const child = spawn(command, args, { cwd: options.cwd, stdio: ["ignore", "pipe", "pipe"] });
    if (child.pid === undefined) {
      child.once("error", reject);
      return;
    }
    const pid = child.pid;
    const watcher = watchProcessTrees([pid], options.intervalMs);
    let stdout = "";
    let stderr = "";
    child.stdout.setEncoding("utf8").on("data", (chunk: string) => (stdout += chunk));
    child.stderr.setEncoding("utf8").on("data", (chunk: string) => (stderr += chunk));
    child.once("error", (error) => {
      watcher.stop();
      reject(error);
    });
    let wallMs = NaN;
    child.once("exit", () => (wallMs = performance.now() - started));
    child.once("close", (exitCode, signal) => {
      resolve({ ...watcher.stop(), pid, exitCode, signal, wallMs, stdout, stderr });
    });
  });
}
