// A small synthetic bracket written to a temporary folder by the same writers as
// scripts/synth.ts (TIFF, JPEG, FITS and DNG of each frame, truth.json), and
// what the tests need to compare a reduction with the scene that made it.
import { mkdtempSync, readdirSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { createModelBracket } from "@/scripts/lib-synth/from-model";
import { writeSyntheticBracket } from "@/scripts/lib-synth/write-bracket";
import type { SynthFormat } from "@/scripts/lib-synth/types";
import { applyAffine, invertAffine, toAffine, type SimilarityTransform } from "@/lib/imaging/similarity";
import { sampleBilinear } from "@/lib/imaging/limb-fit";

export const FIXTURE_WIDTH = 320;
export const FIXTURE_HEIGHT = 256;
export const FIXTURE_FRAMES = 5;
export const FIXTURE_SEED = 3;

export interface BracketFixture {
  dir: string;
  filesOf: (format: SynthFormat) => string[];
  exposuresS: number[];
  captureTimesMs: number[];
  truth: {
    radiance: Float32Array[];
    transforms: SimilarityTransform[];
    moonScene: { x: number; y: number }[];
    moonRadiusPx: number;
    sunCentre: { x: number; y: number };
    sunRadiusPx: number;
    blackLevel: number;
    whiteLevel: number;
  };
}

export async function writeBracketFixture(parent = mkdtempSync(join(tmpdir(), "crownlight-runner-"))): Promise<BracketFixture> {
  const dir = join(parent, "bracket");
  const bracket = createModelBracket({ width: FIXTURE_WIDTH, height: FIXTURE_HEIGHT, frames: FIXTURE_FRAMES, seed: FIXTURE_SEED });
  const written = await writeSyntheticBracket(bracket, dir, ["tiff", "jpeg", "fits", "dng"], 180);
  const truth = bracket.truth as unknown as BracketFixture["truth"];
  return {
    dir,
    filesOf: (format) => written.map((w) => join(dir, w.files[format]!)),
    exposuresS: written.map((w) => w.exposureS),
    captureTimesMs: written.map((w) => w.captureTimeMs),
    truth: { ...truth, radiance: bracket.radiance!, blackLevel: bracket.blackLevel, whiteLevel: bracket.whiteLevel },
  };
}

/** An exposures CSV for the given files, in the fixture's order. */
export function writeExposuresCsv(path: string, files: string[], exposuresS: number[]): string {
  const rows = files.map((f, k) => `${f.split("/").pop()},${exposuresS[k]}`);
  writeFileSync(path, `file,exposure_s\n${rows.join("\n")}\n`);
  return path;
}

/** Entries beside `outDir` whose names show a run's staging folder. */
export function listStagingLeftovers(outDir: string): string[] {
  return readdirSync(dirname(outDir)).filter((name) => name.includes(".partial"));
}

/**
 * Pairs of (master, truth) green-plane values at master pixels a frame exposed
 * well, judged from the truth itself: some exposure puts the pixel between 5 %
 * and 80 % of the sensor's range. Pixels near any lunar limb (the Moon moves
 * between frames), inside 1.2 solar radii (steep limb gradients make the
 * bilinear sampling of the truth itself inexact) and within 8 px of the edge
 * (frames are shifted by up to 3 px) are left out.
 */
export function collectWellExposedPairs(master: Float32Array, fixture: BracketFixture, referenceIndex: number): { master: number; truth: number }[] {
  const { truth } = fixture;
  const range = truth.whiteLevel - truth.blackLevel;
  const masterToScene = invertAffine(toAffine(truth.transforms[referenceIndex], FIXTURE_WIDTH, FIXTURE_HEIGHT));
  const pairs: { master: number; truth: number }[] = [];
  for (let y = 8; y < FIXTURE_HEIGHT - 8; y++) {
    for (let x = 8; x < FIXTURE_WIDTH - 8; x++) {
      const p = applyAffine(masterToScene, x, y);
      if (Math.hypot(p.x - truth.sunCentre.x, p.y - truth.sunCentre.y) < 1.2 * truth.sunRadiusPx) continue;
      if (truth.moonScene.some((m) => Math.hypot(p.x - m.x, p.y - m.y) < truth.moonRadiusPx + 6)) continue;
      const value = sampleBilinear(truth.radiance[1], FIXTURE_WIDTH, FIXTURE_HEIGHT, p.x, p.y);
      if (!fixture.exposuresS.some((t) => value * t > 0.05 * range && value * t < 0.8 * range)) continue;
      pairs.push({ master: master[y * FIXTURE_WIDTH + x], truth: value });
    }
  }
  return pairs;
}

/** Quantile q (0..1) of the values. */
export function quantile(values: number[], q: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.round(q * (sorted.length - 1))))];
}
