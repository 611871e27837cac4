// A linear frame's band of master rows warped and added to a merge pass, as a
// kernel over rows (plane-runner.ts): each row is warped and added on its own,
// so a runner's threads share a band's rows. A row's pixels are the ones the
// band's serial addition gives, bit for bit (each pixel's arithmetic is its own);
// each row keeps its own figures (weight sum, counts, outlier candidates), which
// foldRowTallies adds into the frame's tally in row order, so the result does not
// depend on which thread took which row.
import { openFrameWarpOnArrays, warpFrameBand, type FrameWarpArrays } from "./frame-stage";
import { addBandToMerge, createMergeTally, openMergeArrays, type MergeArrays, type MergeFrameInput, type MergeFrameTally } from "./merge";
import { growCandidates } from "./merge-outliers";
import { definePlaneKernel } from "./plane-runner";

/** Figures each row keeps in WarpMergeArgs.rowCounts: contributing, well exposed, considered, candidates. */
const ROW_FIGURES = 4;

/**
 * The band's arrays (master rows y0 .. y0 + rows - 1, row-major, `width` a row),
 * written by the warp or filled by the caller, and each row's figures. Every
 * typed array sits at the top level, so a runner sees that all are shared.
 */
export interface WarpMergeArgs extends MergeArrays, Partial<FrameWarpArrays> {
  y0: number;
  /** Warp the rows from the frame (the FrameWarpArrays); false: the band's arrays already hold them (a cache). */
  warps: boolean;
  exposureS: number;
  clipLevel: number;
  /** The frame's read noise, NaN when it has none. */
  noiseSigma: number;
  /** The frame's outlier scale (second pass with scoring), NaN otherwise. */
  scale: number;
  /** Whether the frame has a defect mask (the band's `masked` holds it). */
  hasMasked: boolean;
  planes: Float32Array[];
  covered: Uint8Array;
  clipped: Uint8Array;
  noiseFloor: Uint8Array;
  masked: Uint8Array;
  rowWeight: Float64Array;
  rowCounts: Int32Array;
  /** Per band pixel: the outlier candidate's score (0: none), weight, well exposed, contribution per plane. */
  candidateScore: Float32Array;
  candidateWeight: Float32Array;
  candidateWell: Uint8Array;
  candidateContribution: Float32Array[];
}

export const WARP_MERGE_ROWS = definePlaneKernel<WarpMergeArgs>("warp-merge-rows", (args, start, end) => {
  const { width, y0, planes, covered, clipped, noiseFloor, masked, rowWeight, rowCounts, candidateScore, candidateWeight, candidateWell, candidateContribution } = args;
  const acc = openMergeArrays(args);
  const warp = args.warps ? openFrameWarpOnArrays(args as WarpMergeArgs & FrameWarpArrays) : undefined;
  const noiseSigma = Number.isNaN(args.noiseSigma) ? undefined : args.noiseSigma;
  for (let r = start; r < end; r++) {
    const from = r * width, to = from + width;
    const row = {
      planes: planes.map((p) => p.subarray(from, to)),
      covered: covered.subarray(from, to), clipped: clipped.subarray(from, to), noiseFloor: noiseFloor.subarray(from, to), masked: masked.subarray(from, to),
    };
    let input: MergeFrameInput;
    if (warp) {
      const got = warpFrameBand(warp, y0 + r, y0 + r + 1, { planes: row.planes, covered: row.covered, masks: [row.clipped, row.noiseFloor, row.masked] });
      // Unwarped (the identity), the masks are the frame's own rows: copied, so that the band holds the whole row.
      if (got.clipped !== row.clipped) row.clipped.set(got.clipped);
      if (got.noiseFloor !== row.noiseFloor) row.noiseFloor.set(got.noiseFloor);
      if (got.masked && got.masked !== row.masked) row.masked.set(got.masked);
      input = { ...got, clipped: row.clipped, noiseFloor: row.noiseFloor, masked: got.masked ? row.masked : undefined };
    } else {
      input = { planes: row.planes, covered: row.covered, clipped: row.clipped, noiseFloor: row.noiseFloor, masked: args.hasMasked ? row.masked : undefined, exposureS: args.exposureS, clipLevel: args.clipLevel, noiseSigma };
    }
    const tally = createMergeTally();
    if (args.scoring) tally.scale = args.scale;
    candidateScore.fill(0, from, to);
    addBandToMerge(acc, input, (y0 + r) * width, tally);
    rowWeight[r] = tally.weightSum;
    const candidates = tally.candidates;
    const count = candidates?.count ?? 0;
    rowCounts.set([tally.contributing, tally.well, tally.considered, count], r * ROW_FIGURES);
    for (let j = 0; j < count; j++) {
      const k = candidates!.pixel[j] - y0 * width;
      candidateScore[k] = candidates!.score[j];
      candidateWeight[k] = candidates!.weight[j];
      candidateWell[k] = candidates!.wellExposed[j];
      for (let c = 0; c < candidateContribution.length; c++) candidateContribution[c][k] = candidates!.contribution[c][j];
    }
  }
});

/**
 * Adds the figures of a band's rows (WARP_MERGE_ROWS over `rows` rows) into the
 * frame's tally, in row order: weight sums, counts, and the outlier candidates in
 * master order, as a serial addition lists them.
 */
export function foldRowTallies(args: WarpMergeArgs, rows: number, tally: MergeFrameTally): void {
  const { width, y0, rowWeight, rowCounts, candidateScore, candidateWeight, candidateWell, candidateContribution } = args;
  const channels = candidateContribution.length;
  for (let r = 0; r < rows; r++) {
    tally.weightSum += rowWeight[r];
    const at = r * ROW_FIGURES;
    tally.contributing += rowCounts[at];
    tally.well += rowCounts[at + 1];
    tally.considered += rowCounts[at + 2];
    if (rowCounts[at + 3] === 0) continue;
    const candidates = (tally.candidates ??= { count: 0, pixel: new Int32Array(0), score: new Float32Array(0), weight: new Float32Array(0), wellExposed: new Uint8Array(0), contribution: [] });
    for (let k = r * width; k < (r + 1) * width; k++) {
      if (candidateScore[k] === 0) continue;
      if (candidates.count === candidates.pixel.length) growCandidates(candidates, channels);
      const j = candidates.count++;
      candidates.pixel[j] = y0 * width + k;
      candidates.score[j] = candidateScore[k];
      candidates.weight[j] = candidateWeight[k];
      candidates.wellExposed[j] = candidateWell[k];
      for (let c = 0; c < channels; c++) candidates.contribution[c][j] = candidateContribution[c][k];
    }
  }
}
