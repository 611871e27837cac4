// Shared shapes of the pure pipeline. Pixel data are row-major Float32Array
// planes, one per colour (1 for grey, 3 for RGB), in linear light unless a name
// says otherwise. Coordinates are in pixels with (0, 0) at the centre of the
// top-left pixel, x to the right, y down.

export interface PlaneImage {
  width: number;
  height: number;
  /** One plane per colour, each of length width * height. */
  planes: Float32Array[];
}

/**
 * Set (not enumerable) on a PlaneImage whose planes are read from disk when
 * touched (frame-spill.ts, the flow's work files): the planes' lengths, so that
 * checking a frame's shape reads none of them.
 */
export const PLANE_LENGTHS: unique symbol = Symbol("crownlight.planeLengths");

/** The lengths of an image's planes, without reading planes kept on disk. */
export function readPlaneLengths(image: PlaneImage): readonly number[] {
  return (image as PlaneImage & { [PLANE_LENGTHS]?: readonly number[] })[PLANE_LENGTHS] ?? image.planes.map((p) => p.length);
}

/** Marks `obj` (an image whose planes are now read when touched) with their lengths; `undefined` removes the mark. */
export function markPlaneLengths(obj: object, lengths: readonly number[] | undefined): void {
  if (lengths) Object.defineProperty(obj, PLANE_LENGTHS, { value: lengths, configurable: true, enumerable: false, writable: true });
  else delete (obj as { [PLANE_LENGTHS]?: unknown })[PLANE_LENGTHS];
}

/** What the pipeline needs of one decoded frame; lib/media produces it. */
export interface LinearFrame {
  /** A name that error messages use: the file name. */
  name: string;
  image: PlaneImage;
  /** Exposure time in seconds; the caller refuses a frame without one. */
  exposureS: number;
  /** Data numbers: black level (pedestal) and the saturation level, in the plane's units. */
  blackLevel: number;
  whiteLevel: number;
  /**
   * "linear" for raw, 16-bit TIFF and FITS data; "srgb8" for 8-bit encoded
   * input (JPEG, 8-bit PNG or TIFF) whose values are 0..255 codes.
   */
  encoding: "linear" | "srgb8";
  /** Capture time in UTC milliseconds since the epoch, when known. */
  captureTimeMs?: number;
  /**
   * Sensor defects at fixed positions (hot, stuck, dead pixels), 1 = masked: left
   * out of the limb fit, registration and merge, never interpolated into the data.
   */
  badPixels?: Uint8Array;
  /**
   * Pixels that reached the sensor's white level before calibration, 1 = saturated.
   * Calibrated planes (offset subtracted, divided by a flat) no longer show where the
   * sensor clipped, so the calibration step hands the mask on; it counts as clipped.
   */
  saturated?: Uint8Array;
  /** Where blackLevel came from; "calibrated" when bias or dark frames were already subtracted from the planes. */
  blackLevelSource?: BlackLevelSource;
}

/**
 * The offset (bias pedestal) of a linear frame, in order of preference:
 * subtracted with bias or dark masters ("calibrated"), read from the file's own
 * cards or tags ("file"), solved from the bracket ("solved"), or none known
 * ("none": taken as zero and named in the report).
 */
export type BlackLevelSource = "calibrated" | "file" | "solved" | "none";

export type RegistrationMode = "moon" | "corona";
export type StructureFilter = "mgn" | "nrgf";

export interface ReductionParams {
  registration: RegistrationMode;
  filter: StructureFilter;
  /** 8-bit input: recover the camera response from the bracket instead of assuming sRGB. */
  recoverResponse: boolean;
  /** Fraction of the white level at and above which a pixel counts as clipped. */
  clipFraction: number;
  /**
   * Weight of local structure in the structure rendition, 0.05 (gentle) to 1
   * (strongest); default 0.3. MGN: h = 1 - strength (the default keeps h = 0.7
   * of Morgan and Druckmueller 2014). NRGF: strength x NRGF + (1 - strength) x
   * the gamma-stretched overall image (see blendWithGlobalImage in radial.ts).
   */
  filterStrength?: number;
  /** Optional per-frame Moon-minus-Sun offset in master pixels (x right, y down), keyed by frame name. */
  moonMinusSunPx?: Record<string, { dx: number; dy: number }>;
}

export const DEFAULT_REDUCTION_PARAMS: ReductionParams = {
  registration: "corona",
  filter: "mgn",
  recoverResponse: false,
  clipFraction: 0.92,
  filterStrength: 0.3,
};

/** Allowed range of ReductionParams.filterStrength (the same as the start form's). */
export const FILTER_STRENGTH_RANGE = { min: 0.05, max: 1 } as const;

/** Frames done of the frames a per-frame stage handles ("frames measured 41 of 120"). */
export interface FrameCount {
  done: number;
  total: number;
}

export type ProgressFn = (stage: string, fraction: number, frames?: FrameCount) => void;

// The pipeline's result shapes live beside reduceBracket; re-exported here so
// that callers can import every contract type from one module.
export type { FrameReport, ReductionResult } from "./pipeline";
