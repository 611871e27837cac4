// Every plane kernel by name, for threads that are handed a kernel's name and
// its arguments (lib/reduction-runner/plane-worker.ts). A kernel missing here
// is still run, on the calling thread (plane-pool.ts), with the same numbers.
import { BLUR_COLUMNS, BLUR_ROWS, BOX_AVERAGE, SPREAD_BILINEAR } from "./blur";
import { WARP_MERGE_ROWS } from "./merge-kernels";
import { FILL_PLANE, MGN_COMBINE, MGN_DETAIL, MGN_ROW_EXTENTS, MGN_SCALE, MGN_WEIGH } from "./mgn-kernels";
import { NATURAL_PIXELS, RADIAL_BINS, RADIAL_GAIN, SCALE_BY_GAIN } from "./natural-kernels";
import type { PlaneKernel } from "./plane-runner";
import { NOISE_KERNELS } from "./structure-noise";

const ALL: PlaneKernel<never>[] = [
  BLUR_ROWS, BLUR_COLUMNS, BOX_AVERAGE, SPREAD_BILINEAR,
  MGN_ROW_EXTENTS, MGN_SCALE, MGN_DETAIL, MGN_WEIGH, MGN_COMBINE, FILL_PLANE,
  RADIAL_BINS, RADIAL_GAIN, SCALE_BY_GAIN, NATURAL_PIXELS,
  ...NOISE_KERNELS,
  WARP_MERGE_ROWS,
];

export const PLANE_KERNELS: ReadonlyMap<string, PlaneKernel<never>> = new Map(ALL.map((k) => [k.name, k]));
