// The bracket's own defect search (findBadPixelsFromBracket) split for the flow:
// each decode part marks its frame's candidates, the survey counts them. A pixel
// is a defect when at least bracketMinFrames frames mark it, exactly as the
// single-process search decides, but no process holds more than one frame and
// the counting pass reads only the short lists.
import { DEFAULT_DEFECT_THRESHOLDS, findBadPixelsFromBracket } from "@/lib/imaging/calibrate";
import type { LinearFrame } from "@/lib/imaging/types";

/** Indices of the pixels this frame marks as standing out from all eight neighbours. */
export function markFrameDefectCandidates(frame: LinearFrame): Uint32Array {
  // With one frame and a minimum of one, the bracket's map is this frame's marks.
  const marks = findBadPixelsFromBracket([frame], { bracketMinFrames: 1 });
  let count = 0;
  for (let i = 0; i < marks.length; i++) count += marks[i];
  const out = new Uint32Array(count);
  for (let i = 0, k = 0; i < marks.length; i++) if (marks[i]) out[k++] = i;
  return out;
}

/** The bracket's defect map from its frames' candidates: marked in at least bracketMinFrames frames. */
export function combineDefectCandidates(candidates: Uint32Array[], size: number, minFrames = DEFAULT_DEFECT_THRESHOLDS.bracketMinFrames): Uint8Array {
  const map = new Uint8Array(size);
  if (candidates.length < minFrames) return map;
  const counts = new Uint16Array(size);
  for (const list of candidates) {
    for (let k = 0; k < list.length; k++) {
      const i = list[k];
      if (i >= size) throw new Error(`a defect candidate lies outside the frame (${i} of ${size} pixels)`);
      counts[i]++;
    }
  }
  for (let i = 0; i < size; i++) if (counts[i] >= minFrames) map[i] = 1;
  return map;
}
