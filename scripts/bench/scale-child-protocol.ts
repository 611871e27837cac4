// What scale.ts hands a reduction process (scale-reduce-child.ts) and what it prints back.

import type { ScratchSummary } from "@/lib/reduction-runner/run-reduction";

export const SCALE_CHILD_RESULT = "SCALE_CHILD_RESULT";

export interface ScaleChildJob {
  files: string[];
  exposuresS: number[];
  outDir: string;
  /** Whether the reduction keeps each frame's pixels on local disk between stages (runReductionOnFiles's spill). */
  spill: ScaleSpill;
  /** Folder for the spilled frames, inside the benchmark's own scratch folder. */
  scratchDir: string;
}

export const SCALE_SPILL_MODES = ["always", "never", "auto"] as const;
export type ScaleSpill = (typeof SCALE_SPILL_MODES)[number];

export interface ScaleChildResult {
  /** Around runReductionOnFiles alone, ms. */
  reductionMs: number;
  stagesMs: Record<string, number>;
  framesLeftOut: number;
  /** The process's own high-water mark of resident memory, bytes. */
  vmHwmBytes: number;
  /** The process's own user and system time from /proc/self/stat, clock ticks. */
  cpuTicks: { utime: number; stime: number };
  /** Where the frames lived between stages. */
  scratch: ScratchSummary;
}

/** The result line of a child's standard output; null when it printed none. */
export function findScaleChildResult(stdout: string): ScaleChildResult | null {
  const line = stdout.split("\n").find((l) => l.startsWith(`${SCALE_CHILD_RESULT} `));
  return line ? (JSON.parse(line.slice(SCALE_CHILD_RESULT.length + 1)) as ScaleChildResult) : null;
}
