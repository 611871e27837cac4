// Groups of frames within a bracket set, when one upload held several brackets
// (two cameras, or second contact and the corona shot apart). Pure: frames in,
// new group numbers out. Frames are ordered by capture time, then file name;
// frames without a capture time come last, by name. Group numbers are always
// 1..k without gaps.
import { AppError } from "@/lib/errors";

export interface GroupedFrame {
  id: string;
  fileName: string;
  /** Capture time in ms (camera clock; one offset for the whole set does not change the order), or null. */
  captureMs: number | null;
  groupNumber: number;
}

/** Default gap for automatic grouping: common practice puts seconds between frames of one bracket, minutes between brackets. */
export const DEFAULT_GROUP_GAP_S = 20;

export function compareFrames(a: GroupedFrame, b: GroupedFrame): number {
  if (a.captureMs !== null && b.captureMs !== null && a.captureMs !== b.captureMs) return a.captureMs - b.captureMs;
  if (a.captureMs === null && b.captureMs !== null) return 1;
  if (a.captureMs !== null && b.captureMs === null) return -1;
  return a.fileName < b.fileName ? -1 : a.fileName > b.fileName ? 1 : a.id < b.id ? -1 : a.id > b.id ? 1 : 0;
}

/** Renumbers groups 1..k in the order of their current numbers, so no number is skipped. */
function compact(numbers: Map<string, number>): Map<string, number> {
  const used = [...new Set(numbers.values())].sort((a, b) => a - b);
  const to = new Map(used.map((g, i) => [g, i + 1]));
  return new Map([...numbers].map(([id, g]) => [id, to.get(g)!]));
}

/** The group numbers in use, ascending. */
export function listGroups(frames: GroupedFrame[]): number[] {
  return [...new Set(frames.map((f) => f.groupNumber))].sort((a, b) => a - b);
}

/**
 * The frame and every later frame of its group start a new group, numbered
 * one after it; later groups move up by one.
 */
export function splitGroup(frames: GroupedFrame[], frameId: string): Map<string, number> {
  const at = frames.find((f) => f.id === frameId);
  if (!at) throw new AppError("not_found", "That frame was not found in this bracket set.", [{ field: "frameId", message: "no such frame in this set" }]);
  const g = at.groupNumber;
  const members = frames.filter((f) => f.groupNumber === g).sort(compareFrames);
  const index = members.findIndex((f) => f.id === frameId);
  if (index === 0) {
    throw new AppError("conflict", `${at.fileName} is already the first frame of group ${g}; split at a later frame.`, [
      { field: "frameId", message: `already the first frame of group ${g}` },
    ]);
  }
  const moving = new Set(members.slice(index).map((f) => f.id));
  const out = new Map<string, number>();
  for (const f of frames) out.set(f.id, moving.has(f.id) || f.groupNumber > g ? f.groupNumber + 1 : f.groupNumber);
  return compact(out);
}

/** Group n joins group n - 1; later groups move down by one. */
export function mergeGroup(frames: GroupedFrame[], groupNumber: number): Map<string, number> {
  const groups = listGroups(frames);
  if (!groups.includes(groupNumber)) {
    throw new AppError("invalid_input", `There is no group ${groupNumber}; the set has group${groups.length === 1 ? "" : "s"} ${groups.join(", ") || "none"}.`, [
      { field: "groupNumber", message: `expected one of ${groups.join(", ")}` },
    ]);
  }
  const previous = groups.filter((g) => g < groupNumber).at(-1);
  if (previous === undefined) {
    throw new AppError("invalid_input", `Group ${groupNumber} is the first group; merge a later group into the one before it.`, [
      { field: "groupNumber", message: "the first group has no group before it" },
    ]);
  }
  const out = new Map<string, number>();
  for (const f of frames) out.set(f.id, f.groupNumber === groupNumber ? previous : f.groupNumber);
  return compact(out);
}

/**
 * Groups by time: a new group starts wherever two consecutive frames (in
 * capture order) are more than gapS apart. Frames without a capture time
 * join the last group.
 */
export function groupByGap(frames: GroupedFrame[], gapS: number): Map<string, number> {
  if (!(gapS > 0) || !Number.isFinite(gapS)) {
    throw new AppError("invalid_input", `The gap must be a positive number of seconds, not ${gapS}.`, [{ field: "gapS", message: "expected seconds above 0" }]);
  }
  const ordered = [...frames].sort(compareFrames);
  const out = new Map<string, number>();
  let group = 1;
  let lastMs: number | null = null;
  for (const f of ordered) {
    if (f.captureMs !== null) {
      if (lastMs !== null && f.captureMs - lastMs > gapS * 1000) group++;
      lastMs = f.captureMs;
    }
    out.set(f.id, group);
  }
  return out;
}

/**
 * The group a frame that arrives after the set was grouped joins: that of the
 * frame nearest to it in capture time (the earlier one on a tie), or null when
 * it has no capture time or no other frame has one (it keeps the default).
 */
export function findGroupForNewFrame(others: { captureMs: number | null; groupNumber: number }[], captureMs: number | null): number | null {
  if (captureMs === null) return null;
  let best: { distance: number; captureMs: number; groupNumber: number } | null = null;
  for (const o of others) {
    if (o.captureMs === null) continue;
    const distance = Math.abs(o.captureMs - captureMs);
    if (!best || distance < best.distance || (distance === best.distance && o.captureMs < best.captureMs)) best = { distance, captureMs: o.captureMs, groupNumber: o.groupNumber };
  }
  return best?.groupNumber ?? null;
}
