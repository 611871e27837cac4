// Registration of a bracket to its reference frame by similarity transforms.
//
// Start: the limb fits (in "moon" mode the Moon's centre is the anchor; with
// Moon-minus-Sun offsets the anchor becomes the Sun's centre). Refine (both
// modes): frames are taken in order of exposure, outward from the reference,
// and each is compared with a neighbour one step closer to the reference (the
// frame it shares the most well-exposed corona with), so the two see the corona
// at similar signal levels.
//
// Two forms (options.form). "chain", the default: one pair after another, each
// neighbour held at its refined map. "pairs": the comparisons are independent
// pairs: every neighbour is chosen before any
// comparison runs, and each frame i is compared with its neighbour n held at
// n's own start (limb-fit) map, not at n's refined one. The pair gives the
// map from frame n to frame i, R_i = m_i o start_n^-1 (m_i: the refined
// master-to-frame-i map found against n at start_n); the transforms are then
// composed down the tree from the reference, T_i = R_i o T_n, which chains them
// to the reference as a comparison with n at T_n would. A comparison's answer
// leans a little toward where the neighbour is held, so a second round compares
// each frame again with its neighbour held at the composed map, the frame
// started where the first round started it relative to the neighbour (the
// relations then compose as accurately as the chain's, which held each neighbour
// at its refined map). So the pairs of a round can run side by side
// (registerFramesOnThreads), each from a few small inputs
// (RegistrationPairTask), with the same result on any thread.
//
// Each comparison warps both frames into a common window of master pixels and
// builds exposure-normalized, high-passed, masked corona images:
//   F = ln(I / t) - G_sigma(ln(I / t)) on pixels that are neither clipped, nor
//   faint, nor near the frame's lunar disk (normalized convolution for G).
// Phase correlation of F (fft.ts) finds the translation from a start that may
// be pixels off; then Gauss-Newton alignment of F (Lucas-Kanade) refines
// translation and rotation (and scale on request) together, to hundredths of a
// pixel. We chose this over log-polar phase correlation after measuring it:
// the common mask of clipped and faint pixels is identical in both polar images
// and pulled the rotation toward zero (it found 15 to 80 % of a 0.2 degree turn),
// while the least-squares step sums over valid pixels only and has no such pull.
// Each step warps from the original frame, so resampling never builds up.
import { blurGaussian, blurGaussianMasked, blurMaskWeights } from "./blur";
import { downsampleMean } from "./coarse-disk";
import { ImagingError, type ImagingErrorCode } from "./errors";
import { correlatePhase, nextPowerOfTwo } from "./fft";
import { solveCholesky } from "./linalg";
import { findKthSmallest } from "./select";
import { warpMask, warpPlanes, type WarpWindow } from "./resample";
import { applyAffine, composeAffine, createAffineAbout, invertAffine, type AffineSimilarity } from "./similarity";

export interface RegistrationFrame {
  name: string;
  width: number;
  height: number;
  exposureS: number;
  /** Linear luminance (black subtracted). */
  luminance: Float32Array;
  /** 1 = clipped. */
  clipped: Uint8Array;
  /** Dark noise sigma of the luminance. */
  noiseSigma: number;
  /** Fitted lunar limb in frame pixels. */
  limb: { x: number; y: number; radiusPx: number };
  /** Moon minus Sun in master pixels, when the ephemeris gives it. */
  moonMinusSunPx?: { dx: number; dy: number };
  /**
   * True when the frame's own limb could not be found and `limb` is the reference
   * frame's (see assumeMissingLimbs): the frame starts from the reference's pointing.
   */
  limbAssumed?: boolean;
}

/**
 * Frames whose limb fit failed (NaN) take the limb of the given reference, so
 * that they start from its pointing (pointing errors within a bracket are a few
 * pixels) and mask the Moon where it is; such frames are marked limbAssumed.
 */
export function assumeMissingLimbs(frames: RegistrationFrame[], referenceIndex: number): RegistrationFrame[] {
  const ref = frames[referenceIndex];
  return frames.map((f) => {
    if (Number.isFinite(f.limb.x) && Number.isFinite(f.limb.radiusPx)) return f;
    // A copy that keeps the pixel fields as they are (they may be getters over data kept on disk).
    const copy = Object.defineProperties({}, Object.getOwnPropertyDescriptors(f)) as RegistrationFrame;
    return Object.assign(copy, { limb: { ...ref.limb }, moonMinusSunPx: ref.moonMinusSunPx, limbAssumed: true });
  });
}

export interface RegistrationOptions {
  mode: "moon" | "corona";
  referenceIndex?: number;
  /** Also estimate scale (off by default: the corona's smooth radial profile constrains it poorly). */
  estimateScale?: boolean;
  /**
   * "chain" (the default): each frame against its neighbour held at the neighbour's
   * refined map, one pair after another. "pairs": independent pairs composed down the
   * tree, in two rounds, whose pairs can run side by side (see the notes at the top).
   */
  form?: "chain" | "pairs";
}

export interface FrameRegistration {
  /** Master to frame. */
  masterToFrame: AffineSimilarity;
  /** Phase correlation peak of the last translation step (0..1); NaN for the reference. */
  peak: number;
  /** Index of the frame this one was compared with; -1 for the reference. */
  neighbour: number;
  /**
   * "corona": refined on the corona; "limb": the corona comparison failed and the
   * limb fit (with the ephemeris offset when known) placed the frame; "failed":
   * neither could, and `reason` says why; "reference": the reference frame.
   */
  method: "reference" | "corona" | "limb" | "failed";
  reason?: string;
  /** Correlation of the aligned high-passed corona with the neighbour's (see MIN_STRUCTURE_CORRELATION). */
  similarity?: number;
}

/** Signal-to-noise a pixel needs to take part in registration (common practice: log noise below 10 %). */
const MIN_SNR = 10;
/** Common well-exposed pixels (at the region's step) below which two frames are not compared. */
const MIN_COMMON_PIXELS = 64;
const HIGH_PASS_SIGMA = 4;
const MAX_WINDOW = 512;
/**
 * How far the corona may move a frame from its limb-fit start, master px: at
 * least MIN_SEARCH_RADIUS_PX, else this share of the Moon's radius. The start
 * is off only by the Moon's motion against the Sun (under 1 % of its radius over
 * a bracket of tens of seconds) and the inward bias of a clipped limb fit (its
 * centre moved under 1.5 px in our synthetic brackets with radii of 33 to 62 px);
 * a correlation peak farther away is noise or a mask edge, not the corona.
 */
const SEARCH_RADIUS_SHARE = 0.1;
const MIN_SEARCH_RADIUS_PX = 4;

export function computeSearchRadiusPx(moonRadiusPx: number): number {
  return Math.max(MIN_SEARCH_RADIUS_PX, SEARCH_RADIUS_SHARE * moonRadiusPx);
}

/** The frame of median exposure (the longer of the middle two for an even count). */
export function chooseReferenceFrame(exposuresS: number[]): number {
  const order = exposuresS.map((t, i) => i).sort((a, b) => exposuresS[a] - exposuresS[b] || a - b);
  return order[Math.floor(order.length / 2)];
}

/** Anchor (Moon centre, or Sun centre when the offset is known) of a frame, in frame pixels. */
export function computeAnchor(frame: RegistrationFrame): { x: number; y: number } {
  const off = frame.moonMinusSunPx ?? { dx: 0, dy: 0 };
  return { x: frame.limb.x - off.dx, y: frame.limb.y - off.dy };
}

/** Translation-only start: the anchor of each frame onto the reference's. */
export function computeInitialTransforms(frames: RegistrationFrame[], referenceIndex: number): AffineSimilarity[] {
  const ref = computeAnchor(frames[referenceIndex]);
  return frames.map((f) => {
    const a = computeAnchor(f);
    return { a: 1, b: 0, tx: a.x - ref.x, ty: a.y - ref.y };
  });
}

/** The grid of master pixels two frames are compared on (plain data: it travels with a pair to a worker thread). */
export interface RegionGrid extends Required<WarpWindow> {
  /** Master coordinates of the Sun's (or Moon's) centre. */
  centreX: number;
  centreY: number;
  moonRadiusPx: number;
}

/**
 * The comparison window around the Sun: `radiiAcross` Moon radii on a side
 * (6 by default: out to 3 radii, where short and middle exposures hold the
 * corona's structure), at most the frame.
 */
function defineRegion(ref: RegistrationFrame, radiiAcross = 6): RegionGrid {
  const anchor = computeAnchor(ref);
  const extent = Math.min(radiiAcross * ref.limb.radiusPx, ref.width, ref.height);
  const step = Math.max(1, Math.ceil(extent / MAX_WINDOW));
  const size = Math.min(MAX_WINDOW, Math.ceil(extent / step));
  return {
    width: size,
    height: size,
    step,
    originX: anchor.x - (step * (size - 1)) / 2,
    originY: anchor.y - (step * (size - 1)) / 2,
    centreX: anchor.x,
    centreY: anchor.y,
    moonRadiusPx: ref.limb.radiusPx,
  };
}

/** A frame's luminance and clipped mask at the registration window's step (box-averaged when the step exceeds 1). */
export interface SourceImage {
  data: Float32Array;
  clipped: Uint8Array;
  width: number;
  height: number;
  step: number;
}

function createSourceImage(frame: RegistrationFrame, step: number): SourceImage {
  if (step === 1) return { data: frame.luminance, clipped: frame.clipped, width: frame.width, height: frame.height, step };
  const { data, width, height } = downsampleMean(frame.luminance, frame.width, frame.height, step);
  const clipped = new Uint8Array(width * height);
  // Read once: the field may be a getter over data kept elsewhere.
  const frameClipped = frame.clipped;
  for (let y = 0; y < frame.height; y++) {
    const row = ((y / step) | 0) * width;
    const o = y * frame.width;
    for (let j = 0, x = 0; j < width; j++) {
      const end = Math.min(frame.width, x + step);
      for (; x < end; x++) {
        if (frameClipped[o + x]) {
          clipped[row + j] = 1;
          break;
        }
      }
      x = end;
    }
  }
  return { data, clipped, width, height, step };
}

/** A frame's source image at a step; registerFrames keeps recent ones (createSourceCache). */
export type SourceImages = (frame: RegistrationFrame, step: number) => SourceImage;

/**
 * Bytes of source images registerFrames keeps: pairs are built in the outward order, and
 * each frame's neighbour is most often the frame just before it, so a few suffice (about
 * four at 24 megapixels).
 */
const SOURCE_CACHE_BYTES = 128 * 1024 ** 2;
/**
 * And at most this many, whatever their size: small frames' images would otherwise
 * fill the byte budget one frame at a time, so that memory grew with the bracket.
 */
const SOURCE_CACHE_IMAGES = 8;

/**
 * createSourceImage, remembering the most recently used images up to a byte
 * budget and a count (least recently used out first): each frame is compared with a
 * neighbour whose pair was built just before, and whose image (box-averaged
 * from the whole frame, perhaps read back from disk) would otherwise be made again.
 */
function createSourceCache(budgetBytes = SOURCE_CACHE_BYTES, maxImages = SOURCE_CACHE_IMAGES): SourceImages {
  const cache = new Map<RegistrationFrame, Map<number, SourceImage>>();
  const order: { frame: RegistrationFrame; step: number; bytes: number }[] = [];
  let held = 0;
  return (frame, step) => {
    const hit = cache.get(frame)?.get(step);
    const at = order.findIndex((e) => e.frame === frame && e.step === step);
    if (hit && at >= 0) {
      order.push(...order.splice(at, 1));
      return hit;
    }
    const image = createSourceImage(frame, step);
    const bytes = image.data.byteLength + image.clipped.byteLength;
    if (bytes > budgetBytes) return image;
    if (!cache.has(frame)) cache.set(frame, new Map());
    cache.get(frame)!.set(step, image);
    order.push({ frame, step, bytes });
    held += bytes;
    while (held > budgetBytes || order.length > maxImages) {
      const out = order.shift()!;
      cache.get(out.frame)?.delete(out.step);
      held -= out.bytes;
    }
    return image;
  };
}

/** Frame pixels to source pixels: cell j of a step-s source is centred on frame pixel j s + (s - 1) / 2. */
function toSourceMap(m: AffineSimilarity, step: number): AffineSimilarity {
  if (step === 1) return m;
  const k = 1 / step;
  const c = (step - 1) / (2 * step);
  return { a: m.a * k, b: m.b * k, tx: m.tx * k - c, ty: m.ty * k - c };
}

interface Features {
  values: Float64Array;
  valid: Uint8Array;
}

/** What the comparison needs of a frame besides its pixels. */
type FrameFacts = Pick<RegistrationFrame, "name" | "exposureS" | "noiseSigma" | "limb">;

/** Exposure-normalized log light and validity of a frame warped into the region. */
function buildLogImage(frame: FrameFacts, source: SourceImage, masterToFrame: AffineSimilarity, region: RegionGrid): Features {
  const toSource = toSourceMap(masterToFrame, source.step);
  const { planes, covered } = warpPlanes([source.data], source.width, source.height, toSource, region, "bicubic");
  const clipped = warpMask(source.clipped, source.width, source.height, toSource, region, 1);
  const n = region.width * region.height;
  const values = new Float64Array(n);
  const valid = new Uint8Array(n);
  // A step-s source pixel is the mean of s^2 frame pixels: its dark noise is sigma / s.
  const floor = Math.max((MIN_SNR * frame.noiseSigma) / region.step, 1e-30);
  // The Moon of this frame, in master coordinates, with a margin for the PSF and the fit.
  const toMaster = invertAffine(masterToFrame);
  const moon = applyAffine(toMaster, frame.limb.x, frame.limb.y);
  const scale = Math.hypot(masterToFrame.a, masterToFrame.b);
  const moonR = frame.limb.radiusPx / scale + 3 + 2 * region.step;
  const t = frame.exposureS;
  for (let v = 0; v < region.height; v++) {
    const my = region.originY + v * region.step;
    for (let u = 0; u < region.width; u++) {
      const i = v * region.width + u;
      const mx = region.originX + u * region.step;
      const value = planes[0][i];
      if (!covered[i] || clipped[i] || !(value > floor)) continue;
      if ((mx - moon.x) ** 2 + (my - moon.y) ** 2 < moonR * moonR) continue;
      values[i] = Math.log(value / t);
      valid[i] = 1;
    }
  }
  return { values, valid };
}

/**
 * High-pass of a log image on its own valid pixels (normalized convolution), 0 elsewhere.
 * `den` may be the support's blurMaskWeights, made once for both images of a pair.
 */
function highPass(f: Features, region: RegionGrid, support: Uint8Array = f.valid, den?: Float32Array): Float64Array {
  const { width, height } = region;
  const n = width * height;
  const low = blurGaussianMasked(Float32Array.from(f.values), support, width, height, HIGH_PASS_SIGMA, den);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) if (support[i]) out[i] = f.values[i] - low[i];
  return out;
}

function isSameMask(a: Uint8Array, b: Uint8Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/**
 * The high-pass of a moving image and of the fixed reference on their common
 * support. Each step of a refinement needs both; the reference's (and the
 * support's blurred weights) is made again only when the support has changed,
 * which near convergence it seldom does. The same numbers as two calls of highPass.
 */
function createPairHighPass(reference: Features, region: RegionGrid): (moving: Features, common: Uint8Array) => { moving: Float64Array; reference: Float64Array } {
  let last: { common: Uint8Array; den: Float32Array; reference: Float64Array } | undefined;
  return (moving, common) => {
    if (!last || !isSameMask(last.common, common)) {
      const den = blurMaskWeights(common, region.width, region.height, HIGH_PASS_SIGMA);
      last = { common, den, reference: highPass(reference, region, common, den) };
    }
    return { moving: highPass(moving, region, common, last.den), reference: last.reference };
  };
}

/** Share of the region's side over which the window tapers to zero at each edge. */
const WINDOW_TAPER = 0.125;

/** Tukey (tapered cosine) weight of sample k of n: flat in the middle, a raised cosine over the outer taper share at each end. */
function computeTukeyWeight(k: number, n: number): number {
  const edge = Math.max(1, WINDOW_TAPER * n);
  const d = Math.min(k + 0.5, n - k - 0.5);
  return d >= edge ? 1 : Math.sin((Math.PI * d) / (2 * edge)) ** 2;
}

/**
 * Features multiplied by a soft common mask and a Tukey window over the whole
 * region, zero-padded to a power-of-two square, for phase correlation. The
 * window covers the region rather than a square cut from its middle: a long
 * exposure is clipped over the inner corona and keeps its well-exposed light
 * only far out, where a window cut to the middle had left nothing of it
 * (the peak was then noise). The soft mask already tapers every inner edge.
 */
function windowPair(fa: Float64Array, fb: Float64Array, common: Uint8Array, region: RegionGrid): { wa: Float64Array; wb: Float64Array; size: number } {
  const { width, height } = region;
  const size = nextPowerOfTwo(Math.max(width, height));
  const u0 = Math.floor((size - width) / 2);
  const v0 = Math.floor((size - height) / 2);
  const ones = Float32Array.from(common);
  const soft = blurGaussian(ones, width, height, 2, ones);
  const wa = new Float64Array(size * size);
  const wb = new Float64Array(size * size);
  const wxs = new Float64Array(width);
  for (let u = 0; u < width; u++) wxs[u] = computeTukeyWeight(u, width);
  for (let v = 0; v < height; v++) {
    const wy = computeTukeyWeight(v, height);
    for (let u = 0; u < width; u++) {
      const i = v * width + u;
      if (!common[i]) continue;
      const w = soft[i] * wy * wxs[u];
      wa[(v + v0) * size + u + u0] = fa[i] * w;
      wb[(v + v0) * size + u + u0] = fb[i] * w;
    }
  }
  return { wa, wb, size };
}

function intersectMasks(a: Uint8Array, b: Uint8Array): { common: Uint8Array; count: number } {
  const common = new Uint8Array(a.length);
  let count = 0;
  for (let i = 0; i < a.length; i++) if (a[i] && b[i]) { common[i] = 1; count++; }
  return { common, count };
}

/**
 * Inverse-variance weights of the log residual between two frames, up to one
 * constant: for photon noise var(ln I) ~ var(I) / I^2 = 1 / (g I) with I the
 * frame's own counts (not per second) and g the gain, so the residual has
 * variance (1 / I_a + 1 / I_b) / g; the camera's gain is shared and cancels from
 * the normal equations. Without them a short frame's faint pixels, just above
 * the dark-noise floor, counted as much as its bright ones. Measured on eight
 * synthetic brackets: the worst bracket's RMS error went from 0.11 to 0.09 px
 * and the worst frame's (always the shortest) from 0.25 to 0.15 px.
 */
function computeShotNoiseWeights(countsA: Float64Array, b: Features, exposureB: number, common: Uint8Array): Float64Array {
  const weights = new Float64Array(common.length);
  for (let i = 0; i < common.length; i++) {
    if (!common[i]) continue;
    const countsB = Math.exp(b.values[i]) * exposureB;
    weights[i] = 1 / (1 / countsA[i] + 1 / countsB);
  }
  return weights;
}

/** A frame's own counts, exp(F) t, on its valid pixels: the fixed side of computeShotNoiseWeights, made once per pair. */
function computeCounts(f: Features, exposureS: number): Float64Array {
  const counts = new Float64Array(f.values.length);
  for (let i = 0; i < counts.length; i++) if (f.valid[i]) counts[i] = Math.exp(f.values[i]) * exposureS;
  return counts;
}

/**
 * One Gauss-Newton step of direct least-squares alignment (Lucas and Kanade
 * 1981, IJCAI; the similarity form as in Baker and Matthews 2004, IJCV 56:221):
 * minimize sum over common valid pixels of (M(x + D(x)) - R(x))^2, with
 * D(x) = (dx, dy) + theta (-(y - cy), x - cx) + s (x - cx, y - cy) and M
 * linearized by its gradient, each pixel weighted (see computeShotNoiseWeights).
 * Solving for all four parameters together keeps translation and rotation from trading off.
 */
function solveAlignmentStep(moving: Float64Array, movingValid: Uint8Array, reference: Float64Array, referenceValid: Uint8Array, region: RegionGrid, withScale: boolean, weights?: Float64Array): number[] | null {
  const { width, height, step } = region;
  const cu = (region.centreX - region.originX) / step;
  const cv = (region.centreY - region.originY) / step;
  const k = withScale ? 4 : 3;
  const jtj = new Float64Array(k * k);
  const jtr = new Float64Array(k);
  const row = new Float64Array(k);
  let count = 0;
  const usable = (i: number) => referenceValid[i] && movingValid[i] && movingValid[i - 1] && movingValid[i + 1] && movingValid[i - width] && movingValid[i + width];
  // Robust scale of the noise-normalized residuals (1.4826 MAD) for Tukey's biweight
  // (Beaton and Tukey 1974) at c = 6 robust sigmas, wider than the usual 4.685 so that
  // the corona's own residuals keep nearly full weight: a trail, a cosmic ray or a hot
  // pixel in one frame (tens of sigmas) is structure the other lacks, and must not pull the alignment.
  const residuals = new Float64Array(width * height);
  let filled = 0;
  for (let v = 1; v < height - 1; v++) {
    for (let u = 1; u < width - 1; u++) {
      const i = v * width + u;
      if (usable(i)) residuals[filled++] = Math.abs(reference[i] - moving[i]) * Math.sqrt(weights ? weights[i] : 1);
    }
  }
  // The median by selection: the value a sort would put in the middle, without the sort.
  const cutoff = 6 * 1.4826 * (findKthSmallest(residuals.subarray(0, filled), filled >> 1) ?? 0);
  for (let v = 1; v < height - 1; v++) {
    for (let u = 1; u < width - 1; u++) {
      const i = v * width + u;
      if (!usable(i)) continue;
      // Gradients per master pixel.
      const gx = (moving[i + 1] - moving[i - 1]) / (2 * step);
      const gy = (moving[i + width] - moving[i - width]) / (2 * step);
      const x = (u - cu) * step;
      const y = (v - cv) * step;
      row[0] = gx;
      row[1] = gy;
      row[2] = -gx * y + gy * x;
      if (withScale) row[3] = gx * x + gy * y;
      const r = reference[i] - moving[i];
      const base = weights ? weights[i] : 1;
      const u2 = cutoff > 0 ? (Math.abs(r) * Math.sqrt(base)) / cutoff : 0;
      if (u2 >= 1) continue;
      const w = base * (1 - u2 * u2) ** 2;
      // The same sums as a loop over p and q, written out (the loop's overhead dominated here).
      const r0 = row[0], r1 = row[1], r2 = row[2];
      const w0 = w * r0, w1 = w * r1, w2 = w * r2;
      jtr[0] += w0 * r;
      jtr[1] += w1 * r;
      jtr[2] += w2 * r;
      if (withScale) {
        const r3 = row[3];
        const w3 = w * r3;
        jtr[3] += w3 * r;
        jtj[0] += w0 * r0; jtj[1] += w0 * r1; jtj[2] += w0 * r2; jtj[3] += w0 * r3;
        jtj[4] += w1 * r0; jtj[5] += w1 * r1; jtj[6] += w1 * r2; jtj[7] += w1 * r3;
        jtj[8] += w2 * r0; jtj[9] += w2 * r1; jtj[10] += w2 * r2; jtj[11] += w2 * r3;
        jtj[12] += w3 * r0; jtj[13] += w3 * r1; jtj[14] += w3 * r2; jtj[15] += w3 * r3;
      } else {
        jtj[0] += w0 * r0; jtj[1] += w0 * r1; jtj[2] += w0 * r2;
        jtj[3] += w1 * r0; jtj[4] += w1 * r1; jtj[5] += w1 * r2;
        jtj[6] += w2 * r0; jtj[7] += w2 * r1; jtj[8] += w2 * r2;
      }
      count++;
    }
  }
  if (count < 64) return null;
  try {
    return Array.from(solveCholesky(jtj, jtr, k));
  } catch {
    return null;
  }
}

/** Composes the small update D (see solveAlignmentStep) onto a master-to-frame map. */
function applyAlignmentStep(m: AffineSimilarity, delta: number[], region: RegionGrid): AffineSimilarity {
  const [dx, dy, theta, s = 0] = delta;
  const about = createAffineAbout(region.centreX, region.centreY, theta, 1 + s);
  return composeAffine(m, { a: about.a, b: about.b, tx: about.tx + dx, ty: about.ty + dy });
}

/** Distance between the images of the region's centre under two maps, frame px. */
function measureMove(a: AffineSimilarity, b: AffineSimilarity, region: RegionGrid): number {
  const p = applyAffine(a, region.centreX, region.centreY);
  const q = applyAffine(b, region.centreX, region.centreY);
  return Math.hypot(p.x - q.x, p.y - q.y);
}

/** One frame of a pair: what the comparison needs of it, and its source image at the region's step. */
export interface PairSide extends FrameFacts {
  image: SourceImage;
}

/**
 * One comparison of a registration, all its inputs (plain data, a few
 * megabytes at most: the two source images at the region's step): frame i,
 * its neighbour n held at n's start map, the region, the options.
 */
export interface RegistrationPairTask {
  frame: PairSide;
  neighbour: PairSide;
  /** Master to frame i at the start (limb fits). */
  start: AffineSimilarity;
  /** Master to frame n at its start: where the neighbour is held. */
  neighbourStart: AffineSimilarity;
  region: RegionGrid;
  estimateScale: boolean;
  /** See computeSearchRadiusPx; absent: from the region's Moon. */
  searchRadiusPx?: number;
  /** False: the start is known to within a pixel or two, so the phase correlation is left out (the peak reported is then NaN). */
  searchTranslation?: boolean;
}

/** What a pair comparison found: the refined master-to-frame-i map (against n at its start), or why it could not. */
export type RegistrationPairOutcome =
  | { ok: true; masterToFrame: AffineSimilarity; peak: number; similarity: number; iterations: number; confined: boolean }
  | { ok: false; code: ImagingErrorCode; detail: string };

/**
 * Compares one pair (see refineAgainstNeighbour). Pure: the same task gives the
 * same numbers on any thread. A comparison that fails with the imaging core's
 * error comes back as { ok: false } with its code and words; any other fault throws.
 */
export function refineRegistrationPair(task: RegistrationPairTask): RegistrationPairOutcome {
  try {
    const refined = refineAgainstNeighbour(task.frame, task.start, task.neighbour, task.neighbourStart, task.region, { estimateScale: task.estimateScale, searchRadiusPx: task.searchRadiusPx, searchTranslation: task.searchTranslation });
    return { ok: true, ...refined };
  } catch (error) {
    if (!(error instanceof ImagingError)) throw error;
    return { ok: false, code: error.code, detail: error.detail };
  }
}

/**
 * Refines the transform of one frame against a neighbour held at a given map:
 * phase correlation for the translation first (robust to a start that is off by
 * pixels, though pulled a little toward zero by the common mask), then
 * Gauss-Newton alignment of translation, rotation and optionally scale until
 * the update moves no point of the window by more than 0.002 px. Both images
 * are high-passed on their common valid pixels, so that a mask edge (clipping
 * in one frame, the noise floor in the other) looks the same in both. Neither
 * step may take the frame farther than searchRadiusPx from its start (see
 * computeSearchRadiusPx): the correlation peak is sought only within it, and a
 * Gauss-Newton step that leaves it is undone and ends the refinement
 * (reported as confined). Held at its start map, the neighbour is off its
 * refined place by its own start's error, so the radius bounds the move of the
 * frame relative to the neighbour: what the two limb-fit starts got wrong
 * between them. Returns the map and the phase correlation peak.
 */
function refineAgainstNeighbour(
  frame: PairSide,
  start: AffineSimilarity,
  neighbour: PairSide,
  neighbourTransform: AffineSimilarity,
  region: RegionGrid,
  options: { estimateScale?: boolean; maxIterations?: number; searchRadiusPx?: number; searchTranslation?: boolean } = {},
): { masterToFrame: AffineSimilarity; peak: number; iterations: number; confined: boolean; similarity: number } {
  const searchRadiusPx = options.searchRadiusPx ?? computeSearchRadiusPx(region.moonRadiusPx);
  const source = frame.image;
  const neighbourSource = neighbour.image;
  const refLog = buildLogImage(neighbour, neighbourSource, neighbourTransform, region);
  const pairHighPass = createPairHighPass(refLog, region);
  let m = start;
  let peak = options.searchTranslation === false ? NaN : 0;
  let confined = false;
  for (let round = 0; round < (options.searchTranslation === false ? 0 : 2); round++) {
    const moving = buildLogImage(frame, source, m, region);
    const { common, count } = intersectMasks(refLog.valid, moving.valid);
    if (count < MIN_COMMON_PIXELS) throw new ImagingError("registration-failed", `too few pixels of corona are well exposed both here and in ${neighbour.name} to register them`, frame.name);
    const passed = pairHighPass(moving, common);
    const { wa, wb, size } = windowPair(passed.reference, passed.moving, common, region);
    const budget = Math.max(0, searchRadiusPx - measureMove(m, start, region)) / region.step;
    const shift = correlatePhase(wa, wb, size, size, 1, budget);
    peak = shift.peak;
    m = composeAffine(m, { a: 1, b: 0, tx: shift.dx * region.step, ty: shift.dy * region.step });
    if (Math.hypot(shift.dx, shift.dy) < 0.5) break;
  }
  const maxIterations = options.maxIterations ?? 12;
  const refCounts = computeCounts(refLog, neighbour.exposureS);
  let iterations = 0;
  for (; iterations < maxIterations; iterations++) {
    const moving = buildLogImage(frame, source, m, region);
    const { common } = intersectMasks(refLog.valid, moving.valid);
    const weights = computeShotNoiseWeights(refCounts, moving, frame.exposureS, common);
    const passed = pairHighPass(moving, common);
    const delta = solveAlignmentStep(passed.moving, common, passed.reference, common, region, options.estimateScale ?? false, weights);
    if (!delta) break;
    const next = applyAlignmentStep(m, delta, region);
    if (measureMove(next, start, region) > searchRadiusPx) {
      confined = true;
      break;
    }
    m = next;
    const radius = 0.4 * region.width * region.step;
    if (Math.hypot(delta[0], delta[1]) + Math.abs(delta[2]) * radius + Math.abs(delta[3] ?? 0) * radius < 2e-3) break;
  }
  // Aligned frames of one corona share its structure: their high-passed log images
  // correlate. A blank, fogged or wrongly chosen frame does not, whatever the fit said.
  const moving = buildLogImage(frame, source, m, region);
  const { common } = intersectMasks(refLog.valid, moving.valid);
  const passed = pairHighPass(moving, common);
  const similarity = correlateNormalized(passed.moving, passed.reference, common);
  if (!(similarity >= MIN_STRUCTURE_CORRELATION)) {
    throw new ImagingError("registration-failed", `its corona shares no structure with ${neighbour.name} (correlation ${similarity.toFixed(2)})`, frame.name);
  }
  return { masterToFrame: m, peak, iterations, confined, similarity };
}

/** Below this normalized correlation of the aligned high-passed images, a frame is taken not to show the corona its neighbour shows. */
export const MIN_STRUCTURE_CORRELATION = 0.1;

/** Pearson correlation of two images over the common pixels (0 when either is flat there). */
export function correlateNormalized(a: Float64Array, b: Float64Array, common: Uint8Array): number {
  let n = 0, sa = 0, sb = 0;
  for (let i = 0; i < common.length; i++) if (common[i]) { n++; sa += a[i]; sb += b[i]; }
  if (n < 2) return 0;
  const ma = sa / n, mb = sb / n;
  let saa = 0, sbb = 0, sab = 0;
  for (let i = 0; i < common.length; i++) {
    if (!common[i]) continue;
    const da = a[i] - ma, db = b[i] - mb;
    saa += da * da; sbb += db * db; sab += da * db;
  }
  return saa > 0 && sbb > 0 ? sab / Math.sqrt(saa * sbb) : 0;
}

/** Among registered frames, the one whose valid pixels overlap frame i's most (the latest registered on a tie). */
export function chooseNeighbour(valid: Uint8Array[], i: number, registered: number[], overlap = countOverlap): number {
  let best = registered[registered.length - 1];
  let bestCount = -1;
  for (let k = registered.length - 1; k >= 0; k--) {
    const count = overlap(valid, i, registered[k]);
    if (count > bestCount) {
      bestCount = count;
      best = registered[k];
    }
  }
  return best;
}

/** Pixels well exposed in both frames i and j (at their start maps). */
function countOverlap(valid: Uint8Array[], i: number, j: number): number {
  const mine = valid[i];
  const theirs = valid[j];
  let count = 0;
  for (let p = 0; p < mine.length; p++) if (mine[p] && theirs[p]) count++;
  return count;
}

/**
 * Pair comparisons a registration needs before it can go on: `count` of them,
 * independent of each other. `task(k)` builds the k-th one's inputs (it makes the
 * two source images, so call it just before that pair runs, not for all at once).
 */
export interface RegistrationPairBatch {
  count: number;
  task: (k: number) => RegistrationPairTask;
}

/** A registration as steps: it yields batches of pairs and is resumed with their outcomes, in the batch's order. */
export type RegistrationSteps<T> = Generator<RegistrationPairBatch, T, RegistrationPairOutcome[]>;

/** Runs the pairs of some registration steps here, one after another. */
export function runRegistrationSteps<T>(steps: RegistrationSteps<T>): T {
  let next = steps.next();
  while (!next.done) {
    const batch = next.value;
    next = steps.next(Array.from({ length: batch.count }, (_, k) => refineRegistrationPair(batch.task(k))));
  }
  return next.value;
}

/** Runs one pair elsewhere (a worker thread); undefined when it could not, and the caller runs it itself. */
export type RegistrationPairRunner = (task: RegistrationPairTask) => Promise<RegistrationPairOutcome | undefined>;

/**
 * Runs the pairs of some registration steps through `runPair`, `lanes` at a time,
 * building each pair's inputs here just before it is sent. A pair the runner
 * could not do is done on this thread. The outcomes, and so the result, are those
 * of runRegistrationSteps: each pair is the same pure function of the same inputs.
 */
export async function runRegistrationStepsOn<T>(steps: RegistrationSteps<T>, runPair: RegistrationPairRunner, lanes: number): Promise<T> {
  let next = steps.next();
  while (!next.done) {
    const batch = next.value;
    const outcomes: RegistrationPairOutcome[] = new Array(batch.count);
    let claimed = 0;
    await Promise.all(Array.from({ length: Math.max(1, Math.min(lanes, batch.count)) }, async () => {
      while (claimed < batch.count) {
        const k = claimed++;
        const task = batch.task(k);
        outcomes[k] = (await runPair(task)) ?? refineRegistrationPair(task);
      }
    }));
    next = steps.next(outcomes);
  }
  return next.value;
}

export interface Registration {
  referenceIndex: number;
  frames: FrameRegistration[];
}

/** Registers every frame to the reference, its pairs one after another on this thread; see the notes at the top of this file. */
export function registerFrames(frames: RegistrationFrame[], options: RegistrationOptions): Registration {
  return runRegistrationSteps(registerFramesInSteps(frames, options));
}

/** registerFrames with its pairs run through `runPair` (a pool's worker threads), `lanes` at a time: the same result. */
export function registerFramesOnThreads(frames: RegistrationFrame[], options: RegistrationOptions, runPair: RegistrationPairRunner, lanes: number): Promise<Registration> {
  return runRegistrationStepsOn(registerFramesInSteps(frames, options), runPair, lanes);
}

/**
 * registerFrames as steps (see RegistrationSteps). First every frame's neighbour
 * is chosen, as a chain outward from the reference would: among the reference
 * and the frames before it in the outward order, the one it shares the most
 * well-exposed corona with at the start maps. Then all pairs run at once (those
 * that fail on the usual window again over the wide one), and the transforms are
 * composed down the tree from the reference; then, in a second round, every
 * frame whose neighbour was placed on the corona is compared again with the
 * neighbour held at its composed map, and the tree is composed again.
 *
 * A frame whose pair fails is placed by its limb (method "limb", T = its start,
 * so a frame compared with it composes onto that start), or, with no limb of its
 * own, is not placed ("failed"). A frame whose chosen neighbour was not placed is
 * compared again with the placed frame among those before it that it shares the
 * most with: the neighbour a chain that only ever chose among placed frames would
 * have chosen. Only frames without a limb of their own can go unplaced, so such
 * second comparisons are rare; they run together, in a batch of their own, as
 * soon as it is known which frames before each are placed.
 */
export function* registerFramesInSteps(frames: RegistrationFrame[], options: RegistrationOptions): RegistrationSteps<Registration> {
  if (frames.length === 0) throw new ImagingError("too-few-frames", "registration needs frames");
  const withLimb = frames.map((f, i) => i).filter((i) => Number.isFinite(frames[i].limb.x) && Number.isFinite(frames[i].limb.radiusPx));
  if (withLimb.length === 0) throw new ImagingError("limb-not-found", "the lunar limb could not be found in any frame");
  const referenceIndex = options.referenceIndex ?? withLimb[chooseReferenceFrame(withLimb.map((i) => frames[i].exposureS))];
  frames = assumeMissingLimbs(frames, referenceIndex);
  const start = computeInitialTransforms(frames, referenceIndex);
  const result: FrameRegistration[] = frames.map((_, i) => ({ masterToFrame: start[i], peak: NaN, neighbour: -1, method: i === referenceIndex ? "reference" : "failed" }));
  const region = defineRegion(frames[referenceIndex]);
  const order = frames.map((_, i) => i).sort((a, b) => frames[a].exposureS - frames[b].exposureS || a - b);
  const refPos = order.indexOf(referenceIndex);
  // Outward from the reference in exposure, shorter ones first; each frame is compared with the
  // frame before it that it shares the most well-exposed corona with (at the start maps), which is
  // usually its neighbour in exposure but not when that one is clipped or faint where this one is good.
  const outward = [...order.slice(0, refPos).reverse(), ...order.slice(refPos + 1)];
  const sources = createSourceCache();
  const validAtStart = frames.map((f, i) => buildLogImage(f, sources(f, region.step), start[i], region).valid);
  // Overlaps are asked for again and again (each frame against every frame before it): counted once.
  const overlaps = new Map<number, number>();
  const overlap = (valid: Uint8Array[], i: number, j: number) => {
    const key = i * frames.length + j;
    let count = overlaps.get(key);
    if (count === undefined) overlaps.set(key, (count = countOverlap(valid, i, j)));
    return count;
  };
  const chosen = new Map<number, number>();
  outward.forEach((i, k) => chosen.set(i, chooseNeighbour(validAtStart, i, [referenceIndex, ...outward.slice(0, k)], overlap)));
  // Long exposures are saturated over the inner corona and well exposed only far out:
  // when the usual window holds too little of both frames, they are compared over the whole frame.
  let wide: RegionGrid | undefined;
  const side = (i: number, step: number): PairSide => {
    const f = frames[i];
    return { name: f.name, exposureS: f.exposureS, noiseSigma: f.noiseSigma, limb: f.limb, image: sources(f, step) };
  };
  const pairTask = (i: number, n: number, r: RegionGrid): RegistrationPairTask => ({
    frame: side(i, r.step), neighbour: side(n, r.step), start: start[i], neighbourStart: start[n], region: r,
    estimateScale: options.estimateScale ?? false,
    // A frame without its own limb starts from the reference's pointing: allow a wider search.
    searchRadiusPx: frames[i].limbAssumed ? Math.max(3 * computeSearchRadiusPx(region.moonRadiusPx), 12) : undefined,
  });
  /** Frames whose comparison stands on the wide window. */
  const onWide = new Set<number>();
  /** The pairs (frame, neighbour), each on the usual window and, where that fails, on the wide one. */
  function* comparePairs(pairs: [number, number][], held?: AffineSimilarity[]): Generator<RegistrationPairBatch, RegistrationPairOutcome[], RegistrationPairOutcome[]> {
    for (const [i] of pairs) onWide.delete(i);
    // `held[k]`: where pair k's neighbour is held (else at its start).
    const taskOf = (k: number, r: RegionGrid) => (held ? { ...pairTask(pairs[k][0], pairs[k][1], r), neighbourStart: held[k] } : pairTask(pairs[k][0], pairs[k][1], r));
    const outcomes = yield { count: pairs.length, task: (k) => taskOf(k, region) };
    const again = pairs.map((_, k) => k).filter((k) => { const o = outcomes[k]; return !o.ok && o.code === "registration-failed"; });
    if (again.length > 0) {
      wide ??= defineRegion(frames[referenceIndex], Infinity);
      const widened = yield { count: again.length, task: (k) => taskOf(again[k], wide!) };
      again.forEach((k, j) => {
        outcomes[k] = widened[j];
        onWide.add(pairs[k][0]);
      });
    }
    return outcomes;
  }
  if ((options.form ?? "chain") === "chain") {
    // The chain: in outward order, each frame against the placed frame before it that it shares the
    // most with (among the reference and the frames before it that were not left unplaced), held at
    // its refined map, which the frame then takes. A frame's comparison needs only its neighbour's
    // map, so the frames whose neighbours are placed are compared together, tree level by tree level
    // (27 frames of the scale bench: 26 pairs in 6 batches): the same pairs with the same inputs as
    // one at a time, so the same transforms, while a pool runs a batch's pairs side by side.
    //
    // Only a frame without a limb of its own can be left unplaced. The chain's choice among the frames
    // before it that were placed is the choice among those not yet known to be unplaced, as long as
    // that choice is not one whose fate is open: leaving out a frame that is not the one chosen does
    // not change which one is (chooseNeighbour keeps the first best from the end). So a frame's
    // neighbour is settled once the choice falls on a frame that is done or has its own limb.
    const position = new Map(outward.map((i, k) => [i, k]));
    const done = new Set([referenceIndex]);
    const neighbourOf = new Map<number, number>();
    while (done.size < frames.length) {
      const pairs: [number, number][] = [];
      for (const i of outward) {
        if (done.has(i)) continue;
        let neighbour = neighbourOf.get(i);
        if (neighbour === undefined) {
          const candidates = [referenceIndex, ...outward.slice(0, position.get(i)!).filter((j) => !(done.has(j) && result[j].method === "failed"))];
          neighbour = chooseNeighbour(validAtStart, i, candidates, overlap);
          if (!done.has(neighbour) && frames[neighbour].limbAssumed) continue;
          neighbourOf.set(i, neighbour);
        }
        if (done.has(neighbour)) pairs.push([i, neighbour]);
      }
      if (pairs.length === 0) throw new ImagingError("bad-parameter", "registration: no frame's neighbour is placed (the chain's order is broken)");
      const outcomes = yield* comparePairs(pairs, pairs.map(([, n]) => result[n].masterToFrame));
      pairs.forEach(([i, neighbour], k) => {
        const outcome = outcomes[k];
        if (outcome.ok) result[i] = { masterToFrame: outcome.masterToFrame, peak: outcome.peak, neighbour, method: "corona", similarity: outcome.similarity };
        else if (!frames[i].limbAssumed) result[i] = { masterToFrame: start[i], peak: NaN, neighbour: -1, method: "limb", reason: outcome.detail };
        else result[i] = { masterToFrame: start[i], peak: NaN, neighbour: -1, method: "failed", reason: `${outcome.detail}, and its lunar limb could not be found either` };
        done.add(i);
      });
    }
    return finishRegistration(frames, options, referenceIndex, result);
  }
  const neighbourOf = new Map(chosen);
  const outcomeOf = new Map<number, RegistrationPairOutcome>();
  (yield* comparePairs(outward.map((i) => [i, chosen.get(i)!]))).forEach((o, k) => outcomeOf.set(outward[k], o));
  // A frame with its own limb is always placed (on the corona, or by the limb); one without it
  // only when its comparison stands, which is known once its neighbour is known to be placed.
  const settled = new Set([referenceIndex]);
  const isPlaced = (j: number): boolean | undefined => (j === referenceIndex || !frames[j].limbAssumed ? true : settled.has(j) ? outcomeOf.get(j)!.ok : undefined);
  for (;;) {
    const again: number[] = [];
    for (const [k, i] of outward.entries()) {
      if (settled.has(i)) continue;
      const placed = isPlaced(neighbourOf.get(i)!);
      if (placed === undefined) continue;
      if (placed) {
        settled.add(i);
        continue;
      }
      // Its neighbour could not be placed: compare it with the placed frame before it that it shares
      // the most with, as soon as it is known which frames before it are placed.
      const before = [referenceIndex, ...outward.slice(0, k)];
      if (before.some((j) => isPlaced(j) === undefined)) continue;
      neighbourOf.set(i, chooseNeighbour(validAtStart, i, before.filter((j) => isPlaced(j)), overlap));
      again.push(i);
    }
    if (again.length === 0) break;
    (yield* comparePairs(again.map((i) => [i, neighbourOf.get(i)!]))).forEach((o, k) => {
      outcomeOf.set(again[k], o);
      settled.add(again[k]);
    });
  }
  // Down the tree: each frame's neighbour comes before it in the outward order, its transform made.
  // `heldAt` is where each comparison held the neighbour.
  const heldAt = new Map(outward.map((i) => [i, start[neighbourOf.get(i)!]]));
  const composeDown = () => {
    for (const i of outward) {
      const neighbour = neighbourOf.get(i)!;
      const outcome = outcomeOf.get(i)!;
      if (!outcome.ok) continue;
      const placed = result[neighbour].masterToFrame;
      const held = heldAt.get(i)!;
      // T_i = m_i o H_n^-1 o T_n; when n is placed where it was held (the reference, or a frame placed by its limb) that is m_i itself.
      result[i] = { masterToFrame: placed === held ? outcome.masterToFrame : composeAffine(composeAffine(outcome.masterToFrame, invertAffine(held)), placed), peak: outcome.peak, neighbour, method: "corona", similarity: outcome.similarity };
    }
  };
  for (const i of outward) {
    const outcome = outcomeOf.get(i)!;
    if (outcome.ok) {
      result[i] = { ...result[i], method: "corona" };
    } else if (!frames[i].limbAssumed) {
      // The limb (and the ephemeris, when offsets are given) still places a frame whose limb was found.
      result[i] = { masterToFrame: start[i], peak: NaN, neighbour: -1, method: "limb", reason: outcome.detail };
    } else {
      result[i] = { masterToFrame: start[i], peak: NaN, neighbour: -1, method: "failed", reason: `${outcome.detail}, and its lunar limb could not be found either` };
    }
  }
  composeDown();
  // The second round. A comparison's answer follows where the neighbour is held, but not wholly:
  // measured on the scale bench's frames, a neighbour held 0.5 px off moved the answer by 0.46 to
  // 0.50 px. Held at its limb-fit start (up to 1.4 px off its place there), the relation came out
  // up to 0.07 px off, and such errors add up down the tree (27 frames: 0.105 px RMS, where the chain
  // gave 0.040). So each frame whose neighbour was placed on the corona is compared again, all at
  // once, with the neighbour held at its composed map (now within about 0.1 px); the relations found
  // then are composed down the tree as before. A frame compared with the reference, or with a frame
  // placed by its limb, had its neighbour at its place already.
  //
  // The frame starts this comparison where the first round started it relative to its neighbour (its
  // own limb-fit start, moved with the neighbour), not at its composed map. A comparison that has
  // converged ends where it ends from either start; one that stops at its iteration limit ends where
  // its last steps took it, and started at the composed map it would add a second round of steps to
  // the first's. That is what happens before the offsets are known (the plan's first registration,
  // a pedestal of hundreds of DN in the counts): log(I / t) of two exposures is then not the same
  // corona moved, and every step moves the frame a few hundredths of a pixel further, each pair to
  // its limit. Started at the composed maps, the 8-frame ladder of real-brackets.test.ts ("a passing
  // cloud") came out up to 2.4 px off the truth where the chain was 1.3 px off, the offsets and the
  // clouded frame's transmission solved from that registration came out worse (0.552 for 0.550,
  // the chain 0.5506), and the seam figure rose from 0.0012 to 0.0027. Started as in the first
  // round: at most 1.4 px off, 0.735 px RMS (the chain 0.76), seam figure 0.00095.
  const composed = result.map((r) => r.masterToFrame);
  const again = outward.filter((i) => outcomeOf.get(i)!.ok && composed[neighbourOf.get(i)!] !== start[neighbourOf.get(i)!]);
  if (again.length > 0) {
    const second = yield {
      count: again.length,
      task: (k) => {
        const i = again[k];
        const n = neighbourOf.get(i)!;
        // Frame i starts from what is known of it apart from the first round's answer (see above): its
        // limb-fit start where the first round started it relative to n (carried along with n to where
        // n is now held), and where n has no limb of its own (it took the reference's, so its start
        // says nothing of it), its own start as it is. A frame without a limb of its own has nothing
        // but that answer, and starts at its composed map. All these are within a pixel or two.
        const ownStart = frames[n].limbAssumed ? start[i] : composeAffine(composeAffine(start[i], invertAffine(start[n])), composed[n]);
        return { ...pairTask(i, n, onWide.has(i) ? wide! : region), start: frames[i].limbAssumed ? composed[i] : ownStart, neighbourStart: composed[n], searchTranslation: false };
      },
    };
    second.forEach((o, k) => {
      // Should the second comparison fail, the first one stands.
      if (!o.ok) return;
      // The peak reported stays the first round's (the second has no translation search).
      outcomeOf.set(again[k], { ...o, peak: (outcomeOf.get(again[k]) as { peak: number }).peak });
      heldAt.set(again[k], composed[neighbourOf.get(again[k])!]);
    });
    composeDown();
  }
  return finishRegistration(frames, options, referenceIndex, result);
}

/** The registration as found, in "moon" mode with each frame's anchor moved onto the reference's. */
function finishRegistration(frames: RegistrationFrame[], options: RegistrationOptions, referenceIndex: number, result: FrameRegistration[]): Registration {
  if (options.mode === "moon") {
    // Keep rotation and scale from the corona; put each frame's anchor (Moon, or Sun by ephemeris) onto the reference's.
    const refAnchor = computeAnchor(frames[referenceIndex]);
    frames.forEach((f, i) => {
      // An assumed limb is the reference's, not this frame's Moon: such a frame keeps its corona registration.
      if (f.limbAssumed) return;
      const m = result[i].masterToFrame;
      const a = computeAnchor(f);
      result[i].masterToFrame = { a: m.a, b: m.b, tx: a.x - (m.a * refAnchor.x - m.b * refAnchor.y), ty: a.y - (m.b * refAnchor.x + m.a * refAnchor.y) };
    });
  }
  return { referenceIndex, frames: result };
}
