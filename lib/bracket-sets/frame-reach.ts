// A frame's reach: the radii about the lunar limb's centre where the corona is
// well exposed in it, in units of the limb radius. Measured at ingest on the
// shrunken linear luminance the limb was fitted on. A ring is well exposed when
// its median lies above the frame's noise floor and below its clip level, as
// the imaging core decides per pixel (lib/imaging/linearize.ts: 3 sigma of the
// dark noise, 0.92 of the white level). The noise comes from the Moon's own
// disk, which in totality holds no light worth the name (earthshine is many
// magnitudes fainter than the inner corona), so a bias pedestal is taken out too.
import type { FrameFlags } from "@/db/schema";
import { NOISE_FLOOR_CODE, NOISE_FLOOR_SIGMAS } from "@/lib/imaging/linearize";
import { decodeSrgb, type LinearLuminance } from "./frame-analysis";

type Reach = NonNullable<FrameFlags["reach"]>;
type Limb = NonNullable<FrameFlags["limb"]>;

/** Ring width in limb radii: fine enough for a bar chart, wide enough for a steady median on 512 px. */
export const REACH_RING_STEP = 0.05;
/** Inside this share of the limb radius the disk is the Moon's dark side, far from the limb's blur. */
const DISK_SAMPLE_R = 0.85;
/** A ring counts while at least this share of it lies inside the frame. */
const MIN_RING_COVER = 0.5;
/** The limb is fitted on a shrunken image; a radius below this many shrunken pixels gives no rings worth reading. */
const MIN_LIMB_RADIUS_PX = 4;
/** 1.4826 x MAD estimates sigma for normal noise. */
const MAD_TO_SIGMA = 1.4826;

function median(values: Float64Array | number[]): number {
  const sorted = Float64Array.from(values).sort();
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

const round2 = (v: number) => Math.round(v * 100) / 100;

/**
 * The reach of one frame, or undefined when the limb is too small to read rings
 * around. `limb` is in the original's pixels; the shrunken pixel j covers
 * original pixels j*f .. j*f+f-1 (its centre at j*f + (f-1)/2).
 */
export function measureReach(lum: LinearLuminance, limb: Limb, encoding: "linear" | "srgb8"): Reach | undefined {
  const { data, width: w, height: h, factor: f } = lum;
  const cx = (limb.cx - (f - 1) / 2) / f;
  const cy = (limb.cy - (f - 1) / 2) / f;
  const radius = limb.radiusPx / f;
  if (!(radius >= MIN_LIMB_RADIUS_PX) || !Number.isFinite(cx) || !Number.isFinite(cy)) return undefined;

  const maxR = Math.hypot(Math.max(cx, w - cx), Math.max(cy, h - cy)) / radius;
  const ringCount = Math.max(0, Math.ceil((maxR - 1) / REACH_RING_STEP));
  const disk: number[] = [];
  const counts = new Uint32Array(ringCount);
  const ringOf = new Int32Array(w * h).fill(-1);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const i = y * w + x;
      const v = data[i];
      if (!Number.isFinite(v)) continue;
      const r = Math.hypot(x - cx, y - cy) / radius;
      if (r < DISK_SAMPLE_R) disk.push(v);
      else if (r >= 1) {
        const k = Math.floor((r - 1) / REACH_RING_STEP);
        if (k < ringCount) {
          ringOf[i] = k;
          counts[k]++;
        }
      }
    }
  }
  if (disk.length < 8) return undefined;

  // Noise floor: the disk's level plus 3 sigma of one original pixel (a box mean of f x f pixels has 1/f of its noise).
  const dark = median(disk);
  const mad = median(disk.map((v) => Math.abs(v - dark)));
  const sigmaOriginal = MAD_TO_SIGMA * mad * f;
  const clip = lum.clipLevel;
  const quantum = encoding === "srgb8" ? decodeSrgb(NOISE_FLOOR_CODE) : clip !== undefined ? clip / 0.92 / 65535 : 0;
  const floor = dark + Math.max(NOISE_FLOOR_SIGMAS * sigmaOriginal, quantum);

  // Values per ring, then each covered ring's median.
  const offsets = new Uint32Array(ringCount + 1);
  for (let k = 0; k < ringCount; k++) offsets[k + 1] = offsets[k] + counts[k];
  const values = new Float64Array(offsets[ringCount]);
  const fill = offsets.slice(0, ringCount);
  for (let i = 0; i < ringOf.length; i++) if (ringOf[i] >= 0) values[fill[ringOf[i]]++] = data[i];

  let edgeR = 1;
  let fromR: number | null = null;
  let toR: number | null = null;
  let clippedToR: number | null = null;
  for (let k = 0; k < ringCount; k++) {
    const inner = 1 + k * REACH_RING_STEP;
    const outer = inner + REACH_RING_STEP;
    const area = Math.PI * (outer * outer - inner * inner) * radius * radius;
    if (counts[k] < MIN_RING_COVER * area) break;
    edgeR = outer;
    const m = median(values.subarray(offsets[k], offsets[k + 1]));
    if (clip !== undefined && m >= clip) clippedToR = outer;
    else if (m > floor) {
      fromR ??= inner;
      toR = outer;
    }
  }
  return { fromR: fromR === null ? null : round2(fromR), toR: toR === null ? null : round2(toR), edgeR: round2(edgeR), clippedToR: clippedToR === null ? null : round2(clippedToR) };
}
