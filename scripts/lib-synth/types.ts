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
}

export interface SynthBracket {
  width: number;
  height: number;
  blackLevel: number;
  whiteLevel: number;
  frames: SynthBracketFrame[];
  /** Serializable description of the scene, written to truth.json. */
  truth: Record<string, unknown>;
  /** Planes written to truth-radiance.fits (DN/s), when given. */
  radiance?: Float32Array[];
}

/** Says in every file that it is synthetic. */
export const SYNTH_MAKE = "Crownlight synthetic";
export const SYNTH_MODEL = "Synthetic bracket generator";
export const SYNTH_F_NUMBER = 8;
export const SYNTH_ISO = 100;
