// Words for a reduction's parameters, states and stages, shared by the form,
// the list, the progress and the page.

export const REGISTRATION_LABELS: Record<string, string> = {
  sun: "The Sun's centre (recommended)",
  moon: "The Moon's limb (for prominence layers)",
  corona: "The corona itself",
};

export const REGISTRATION_SHORT: Record<string, string> = { sun: "Sun's centre", moon: "Moon's limb", corona: "Corona" };

export const FILTER_LABELS: Record<string, string> = {
  mgn: "MGN: multi-scale Gaussian normalization",
  nrgf: "NRGF: normalizing radial graded filter",
};

export function OUTPUT_SIZE_LABEL(longSidePx: number): string {
  return longSidePx === 0 ? "Full size" : `At most ${longSidePx} px on the long side`;
}

export const STATE_TONES = { queued: "neutral", running: "accent", done: "ok", failed: "danger" } as const;

const STAGES: Record<string, string> = {
  fetch: "Fetching frames",
  start: "Starting",
  calibration: "Combining the calibration frames",
  survey: "Checking the bracket for sensor defects",
  decode: "Decoding frames",
  sky: "Working out the sky geometry",
  linearize: "Linearizing",
  "limb-fit": "Fitting the lunar limb",
  limb: "Fitting the lunar limb",
  register: "Registering frames",
  levels: "Measuring each frame's offset and light",
  response: "Recovering the camera response",
  "merge-pilot": "Merging, first pass",
  merge: "Merging",
  renditions: "Rendering",
  "write-master": "Writing the master FITS",
  "write-renditions": "Writing renditions",
  tiles: "Cutting tiles",
  summary: "Measuring profile and coverage",
  store: "Storing the outputs",
  // A composite's stages (lib/imaging/composite.ts, lib/composite-runner).
  read: "Reading the masters",
  measure: "Measuring each master's noise",
  match: "Matching the masters' positions and brightness",
  write: "Writing the outputs",
  done: "Finished",
};

/** A stage's name for people; unknown stages are shown as they come. */
export function describeStage(stage: string | null): string {
  if (!stage) return "Waiting for a worker";
  return STAGES[stage] ?? stage;
}

/** What a stage that works frame by frame counts. */
const FRAME_STAGES: Record<string, string> = {
  fetch: "Frames fetched",
  decode: "Frames decoded",
  limb: "Frames measured",
  register: "Frames made ready to register",
  "merge-pilot": "Frames merged in the first pass",
  merge: "Frames merged",
};

/** "Frames measured: 41 of 120" for a stage that works frame by frame, else null. */
export function describeStageFrames(stage: string | null, frames: { done: number; total: number } | null): string | null {
  if (!stage || !frames || !(frames.total > 0)) return null;
  return `${FRAME_STAGES[stage] ?? "Frames done"}: ${frames.done} of ${frames.total}`;
}

/** Stage-log names of report.json's timings. */
const TIMINGS: Record<string, string> = {
  decode: "Decode and limb fits",
  "sky-geometry": "Sky geometry",
  "linearize-and-limb": "Linearize and limb fits",
  register: "Register",
  levels: "Offsets and transmissions",
  response: "Camera response",
  "warp-and-merge": "Warp and merge",
  renditions: "Renditions",
  reduce: "Reduction in all",
  "write-master": "Master FITS",
  "write-renditions": "Rendition files and previews",
  tiles: "Tiles",
  summary: "Profile and coverage",
  total: "Total",
};

export function describeTiming(stage: string): string {
  return TIMINGS[stage] ?? stage;
}

export const MOON_SOURCES: Record<string, string> = {
  "own-fit": "The reference frame's own limb fit",
  path: "The Moon's path fitted through the bracket",
  "own-doubtful-fit": "The reference frame's own limb fit (doubtful)",
};
