// Pure readers of what Linux's /proc says about a process (proc(5)), and the
// least-squares line the scale benchmark fits to peak memory against frames.

export interface ProcStatus {
  /** Resident memory now (VmRSS), bytes. */
  rssBytes: number;
  /** The kernel's high-water mark of resident memory (VmHWM), bytes. */
  hwmBytes: number;
}

/**
 * VmRSS and VmHWM from the text of /proc/PID/status (kB in the file). Null when
 * either line is missing, as for a zombie or a kernel thread, which hold no memory.
 */
export function parseProcStatus(text: string): ProcStatus | null {
  const kb = (key: string): number | null => {
    const match = new RegExp(`^${key}:\\s*(\\d+)\\s*kB\\s*$`, "m").exec(text);
    return match ? Number(match[1]) * 1024 : null;
  };
  const rssBytes = kb("VmRSS");
  const hwmBytes = kb("VmHWM");
  return rssBytes === null || hwmBytes === null ? null : { rssBytes, hwmBytes };
}

export interface ProcStat {
  pid: number;
  /** The executable's name as the kernel keeps it (at most 15 characters). */
  comm: string;
  ppid: number;
  /** The process's own CPU time in clock ticks, user and system. */
  utimeTicks: number;
  stimeTicks: number;
}

/**
 * The fields we use from /proc/PID/stat. The name sits in parentheses and may
 * itself hold spaces and parentheses, so the fields are counted from the last ")".
 * Null when the text is not such a line.
 */
export function parseProcStat(text: string): ProcStat | null {
  const open = text.indexOf("(");
  const close = text.lastIndexOf(")");
  if (open < 0 || close < open) return null;
  const pid = Number(text.slice(0, open).trim());
  // After the name: state (field 3), ppid (4), ..., utime (14), stime (15).
  const rest = text.slice(close + 1).trim().split(/\s+/);
  if (!Number.isInteger(pid) || rest.length < 13) return null;
  const field = (n: number) => Number(rest[n - 3]);
  const stat = { pid, comm: text.slice(open + 1, close), ppid: field(4), utimeTicks: field(14), stimeTicks: field(15) };
  return [stat.ppid, stat.utimeTicks, stat.stimeTicks].every(Number.isInteger) ? stat : null;
}

/** Every process below the roots (not the roots themselves), from pid to parent pid, in breadth-first order. */
export function findDescendants(roots: readonly number[], parentOf: ReadonlyMap<number, number>): number[] {
  const children = new Map<number, number[]>();
  for (const [pid, ppid] of parentOf) {
    const list = children.get(ppid);
    if (list) list.push(pid);
    else children.set(ppid, [pid]);
  }
  const seen = new Set<number>(roots);
  const out: number[] = [];
  const queue = [...roots];
  while (queue.length > 0) {
    for (const child of children.get(queue.shift()!) ?? []) {
      if (seen.has(child)) continue;
      seen.add(child);
      out.push(child);
      queue.push(child);
    }
  }
  return out;
}

/** Ordinary least-squares line y = slope x + intercept. Needs at least two distinct x. */
export function fitLine(xs: readonly number[], ys: readonly number[]): { slope: number; intercept: number } {
  if (xs.length !== ys.length) throw new Error(`fitLine: ${xs.length} x values but ${ys.length} y values`);
  const n = xs.length;
  const meanX = xs.reduce((a, b) => a + b, 0) / n;
  const meanY = ys.reduce((a, b) => a + b, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (xs[i] - meanX) ** 2;
    sxy += (xs[i] - meanX) * (ys[i] - meanY);
  }
  if (!(sxx > 0)) throw new Error("fitLine: needs at least two different x values");
  const slope = sxy / sxx;
  return { slope, intercept: meanY - slope * meanX };
}
