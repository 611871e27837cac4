// Header of the master FITS file: what we know about the merge, written as cards.
// Pixel coordinates in cards follow FITS (WCS Paper I, Greisen and Calabretta
// 2002, section 2.1.4): the centre of the first pixel is (1, 1), so ours (0-based
// centres) are written plus one. Time cards follow FITS 4.0 section 9.4.3
// (DATE-BEG, DATE-AVG, DATE-END, TIMESYS). XPOSURE and NCOMBINE are the usual
// solar and archive conventions for accumulated exposure and frame count; the
// keys of the Moon's disk and the image centre are ours (no convention exists).
// The helioprojective WCS (helio-wcs.ts) is written when the reduction was given
// the observer's site and the frames' times; without them a HISTORY card says so,
// and no WCS keys are written rather than guessed ones.
import type { FitsCard } from "@/lib/media";
import { buildHelioWcsCards, type HelioGeometry } from "./helio-wcs";
import type { ReductionResult } from "@/lib/imaging/pipeline";
import type { ReductionParams } from "@/lib/imaging/types";

export interface MasterFrameProvenance {
  name: string;
  exposureS: number;
  exposureSource: string;
  captureTimeMs?: number;
}

export interface MasterHeaderInput {
  result: ReductionResult;
  frames: MasterFrameProvenance[];
  encoding: "linear" | "srgb8";
  instrument?: string;
  createdMs: number;
  /** The runner's registration: "sun" runs the pipeline's "moon" mode on ephemeris Sun anchors. */
  registrationMode?: "sun" | "moon" | "corona";
  /** Sky geometry for the WCS, when the site and times were given. */
  helio?: HelioGeometry;
}

/** ISO 8601 with milliseconds and no zone letter, the FITS datetime form (section 9.1.1). */
export function formatFitsDateTime(ms: number): string {
  return new Date(ms).toISOString().replace(/Z$/, "");
}

function round(value: number, digits: number): number {
  return Number(value.toFixed(digits));
}

/** "key = value" texts of every parameter, nested objects flattened with dots. */
export function describeParameters(params: ReductionParams): string[] {
  const out: string[] = [];
  const walk = (prefix: string, value: unknown) => {
    if (value !== null && typeof value === "object") {
      for (const [k, v] of Object.entries(value)) walk(prefix ? `${prefix}.${k}` : k, v);
    } else if (value !== undefined) out.push(`${prefix} = ${String(value)}`);
  };
  walk("", params);
  return out;
}

/** Capture span of the bracket: first start, exposure-midpoint average, last end. Undefined unless every frame has a time. */
export function computeCaptureSpan(frames: MasterFrameProvenance[]): { begMs: number; avgMs: number; endMs: number } | undefined {
  if (frames.length === 0 || frames.some((f) => f.captureTimeMs === undefined)) return undefined;
  const starts = frames.map((f) => f.captureTimeMs!);
  const ends = frames.map((f) => f.captureTimeMs! + f.exposureS * 1000);
  const mids = frames.map((f, i) => (starts[i] + ends[i]) / 2);
  return { begMs: Math.min(...starts), avgMs: mids.reduce((s, m) => s + m, 0) / mids.length, endMs: Math.max(...ends) };
}

export function buildMasterCards(input: MasterHeaderInput): { cards: FitsCard[]; history: string[] } {
  const { result, frames, encoding } = input;
  const { overall } = result;
  const exposures = frames.map((f) => f.exposureS);
  const cards: FitsCard[] = [
    { key: "BUNIT", value: encoding === "linear" ? "DN/s" : "relative", comment: encoding === "linear" ? "data numbers per second above black" : "relative light per second (8-bit input)" },
    { key: "EXPTIME", value: 1, real: true, comment: "[s] values are normalized to 1 s of exposure" },
    { key: "XPOSURE", value: round(exposures.reduce((s, t) => s + t, 0), 9), comment: "[s] sum of the merged frames' exposures" },
    { key: "TEXPMIN", value: Math.min(...exposures), comment: "[s] shortest exposure merged" },
    { key: "TEXPMAX", value: Math.max(...exposures), comment: "[s] longest exposure merged" },
    { key: "NCOMBINE", value: frames.length, comment: "frames merged" },
  ];
  const span = computeCaptureSpan(frames);
  if (span) {
    cards.push(
      { key: "TIMESYS", value: "UTC" },
      { key: "DATE-BEG", value: formatFitsDateTime(span.begMs), comment: "start of the first exposure" },
      { key: "DATE-AVG", value: formatFitsDateTime(span.avgMs), comment: "mean of the exposures' midpoints" },
      { key: "DATE-END", value: formatFitsDateTime(span.endMs), comment: "end of the last exposure" },
    );
  }
  const { width, height } = result.master;
  cards.push(
    { key: "IMCENX", value: (width + 1) / 2, real: true, comment: "image centre x, FITS pixels (1-based)" },
    { key: "IMCENY", value: (height + 1) / 2, real: true, comment: "image centre y, FITS pixels (1-based)" },
    { key: "MOONX", value: round(overall.moonCentre.x + 1, 3), real: true, comment: "Moon centre x at the reference frame, FITS pixels" },
    { key: "MOONY", value: round(overall.moonCentre.y + 1, 3), real: true, comment: "Moon centre y at the reference frame, FITS pixels" },
    { key: "MOONR", value: round(overall.moonRadiusPx, 3), real: true, comment: "[pixel] Moon radius at the reference frame" },
  );
  if (overall.sunCentre) {
    cards.push(
      { key: "SUNX", value: round(overall.sunCentre.x + 1, 3), real: true, comment: "Sun centre x, FITS pixels (ephemeris offset)" },
      { key: "SUNY", value: round(overall.sunCentre.y + 1, 3), real: true, comment: "Sun centre y, FITS pixels (ephemeris offset)" },
    );
  }
  cards.push(
    { key: "DYNRANGE", value: round(overall.dynamicRangeStops, 3), real: true, comment: "[stop] 99.9th over 0.1th percentile, well exposed" },
    { key: "REFFRAME", value: overall.referenceFrame.slice(0, 68), comment: "frame the master is registered to" },
    { key: "REGMODE", value: input.registrationMode ?? overall.parameters.registration, comment: "registered on the Sun, the Moon's limb or the corona" },
  );
  if (input.helio && span) cards.push(...buildHelioWcsCards(input.helio, span.begMs));
  if (input.instrument) cards.push({ key: "INSTRUME", value: input.instrument.replace(/[^\x20-\x7e]/g, "?").slice(0, 68) });
  cards.push(
    { key: "CREATOR", value: overall.pipelineVersion, comment: "software that made this file" },
    { key: "DATE", value: formatFitsDateTime(input.createdMs), comment: "UTC time this file was written" },
  );
  if (result.master.planes.length === 3) cards.push({ key: "COMMENT", comment: "Planes along NAXIS3: 1 red, 2 green, 3 blue (linear light)." });

  const history = [
    `Merged by ${overall.pipelineVersion}.`,
    ...describeParameters(overall.parameters).map((p) => `Parameter ${p}`),
    ...frames.map((f, i) => `Frame ${i + 1}: ${f.name}, exposure ${f.exposureS} s from ${f.exposureSource}${f.captureTimeMs === undefined ? "" : `, start ${formatFitsDateTime(f.captureTimeMs)} UTC`}`),
    ...describeSkyHistory(input),
  ];
  return { cards, history };
}

function describeSkyHistory(input: MasterHeaderInput): string[] {
  const lines: string[] = [];
  if (input.registrationMode === "sun") {
    lines.push("Registered on the Sun: each frame's lunar limb moved by the ephemeris Moon-minus-Sun offset at its mid-exposure (topocentric, lib/astro).");
  }
  if (!input.helio) {
    lines.push("No WCS: no observer site and capture times were given, so plate scale, P angle and the Sun's centre are unknown; coordinates above are pixels only.");
    return lines;
  }
  lines.push(
    "WCS: FITS rows are stored top row first (row 1 is the top of the PNG renditions); PC carries that flip, so HPLT grows toward solar north.",
    `Plate scale from the Moon's semi-diameter over the limb radius; north angle ${input.helio.northAngleDeg.toFixed(3)} deg; the Moon silhouette is the reference frame's.`,
  );
  return lines;
}
