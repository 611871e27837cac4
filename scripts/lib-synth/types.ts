// What the synthetic-bracket file writers take: frames of sensor data numbers
// (black level included, clipped at the white level), one plane per colour, and
// a truth record to store beside them. The pure model (lib/imaging/synth-model.ts)
// produces the frames; these writers only encode them.

export type SynthFormat = "tiff" | "jpeg" | "fits" | "dng";
export const SYNTH_FORMATS: readonly SynthFormat[] = ["tiff", "jpeg", "fits", "dng"];

export interface SynthBracketFrame {
  /** Base name without extension, e.g. "synthetic-01". */
  name: string;
  /** Data numbers including the black level; 1 or 3 planes. */
  planes: (Float32Array | Uint16Array)[];
  exposureS: number;
  captureTimeMs: number;
  /** This frame's own offset in DN when it differs from the bracket's blackLevel. */
  blackLevel?: number;
}

export interface SynthBracket {
  width: number;
  height: number;
  blackLevel: number;
  whiteLevel: number;
  frames: SynthBracketFrame[];
  /** Serializable description of the scene, written to truth.json. */
  truth: Record<string, unknown>;
  /**
   * How FITS and 16-bit TIFF files carry the sensor's offset: "subtracted" (the
   * default: files hold DN - black), "card" (FITS keeps the pedestal and states it
   * in a BLKLEVEL card; TIFF as unlabelled), "unlabelled" (the pedestal stays in
   * the data and nothing says so, as many astronomy cameras write).
   */
  offsetInFiles?: "subtracted" | "card" | "unlabelled";
  /** false: files carry no capture time (as TIFFs exported by a raw converter often do). Default true. */
  hasCaptureTimes?: boolean;
  /** Planes written to truth-radiance.fits (DN/s), when given. */
  radiance?: Float32Array[];
}

/** Says in every file that it is synthetic. */
export const SYNTH_MAKE = "Crownlight synthetic";
export const SYNTH_MODEL = "Synthetic bracket generator";
export const SYNTH_F_NUMBER = 8;
export const SYNTH_ISO = 100;
