// Which automatic findings are faults. Clipping is a fault only in the frames
// that must hold the inner corona: the shortest exposures of their bracket.
// A longer exposure clips the inner corona on purpose, to reach the outer
// one, so its clipping is shown as what it is and not flagged. Client-safe.
import type { FrameDto } from "./dto";

/** Above this clipped fraction the short end of a bracket is flagged: common practice keeps it to a few per cent. */
export const CLIPPED_FLAG = 0.05;
/** Frames within this factor of their group's shortest exposure count as its short end (one stop). */
const SHORT_END_FACTOR = 2;

type TriageFrame = Pick<FrameDto, "id" | "kind" | "ingestState" | "exposureS" | "groupNumber" | "flags">;

/** The shortest exposure of each group's checked light frames. */
export function findShortestExposures(frames: readonly TriageFrame[]): Map<number, number> {
  const shortest = new Map<number, number>();
  for (const f of frames) {
    if (f.kind !== "light" || f.ingestState !== "ingested" || f.exposureS === null) continue;
    const g = f.groupNumber;
    shortest.set(g, Math.min(shortest.get(g) ?? Number.POSITIVE_INFINITY, f.exposureS));
  }
  return shortest;
}

/** "fault": the short end clips; "expected": a longer exposure clips, as it should; null: not clipped beyond the flag. */
export function judgeClipping(frame: TriageFrame, shortest: ReadonlyMap<number, number>): "fault" | "expected" | null {
  if ((frame.flags.clippedFraction ?? 0) <= CLIPPED_FLAG) return null;
  if (frame.kind !== "light") return "fault";
  const min = shortest.get(frame.groupNumber);
  if (frame.exposureS === null || min === undefined) return "fault";
  return frame.exposureS <= min * SHORT_END_FACTOR ? "fault" : "expected";
}

/** Stretches from `start` (the limb) out to the farthest reach that no band covers: gaps in a bracket's coverage. */
export function findReachGaps(bands: readonly { from: number | null; to: number | null }[], start = 1): { from: number; to: number }[] {
  const spans = bands.filter((b): b is { from: number; to: number } => b.from !== null && b.to !== null).sort((a, b) => a.from - b.from);
  const gaps: { from: number; to: number }[] = [];
  let reached = start;
  for (const s of spans) {
    // Bands meet when one starts at the ring where the other ends (within rounding).
    if (s.from > reached + 1e-6) gaps.push({ from: reached, to: s.from });
    reached = Math.max(reached, s.to);
  }
  return gaps;
}
