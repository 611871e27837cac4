// The benchmark's bracket: 9 frames of 6000 x 4000 16-bit TIFF from the synthetic
// model, written once under the ignored .cache/ folder and reused.
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { createModelBracket } from "../lib-synth/from-model";
import { writeSyntheticBracket } from "../lib-synth/write-bracket";

export const BENCH_WIDTH = 6000;
export const BENCH_HEIGHT = 4000;
export const BENCH_FRAMES = 9;
export const BENCH_SEED = 7;

export interface BenchBracket {
  dir: string;
  files: string[];
  exposuresS: number[];
  /** Seconds spent making it now; 0 when it came from the cache. */
  madeS: number;
}

export async function prepareBenchBracket(cacheRoot: string): Promise<BenchBracket> {
  const dir = join(cacheRoot, `bench-bracket-${BENCH_WIDTH}x${BENCH_HEIGHT}-${BENCH_FRAMES}-seed${BENCH_SEED}`);
  const listPath = join(dir, "frames.json");
  if (existsSync(listPath)) {
    const list = JSON.parse(readFileSync(listPath, "utf8")) as { files: string[]; exposuresS: number[] };
    return { dir, files: list.files.map((f) => join(dir, f)), exposuresS: list.exposuresS, madeS: 0 };
  }
  const started = performance.now();
  const bracket = createModelBracket({ width: BENCH_WIDTH, height: BENCH_HEIGHT, frames: BENCH_FRAMES, seed: BENCH_SEED });
  bracket.radiance = undefined; // 288 MB of truth the benchmark does not read
  const written = await writeSyntheticBracket(bracket, dir, ["tiff"]);
  const files = written.map((w) => w.files.tiff!);
  const exposuresS = written.map((w) => w.exposureS);
  writeFileSync(join(dir, "exposures.csv"), `file,exposure_s\n${files.map((f, k) => `${f},${exposuresS[k]}`).join("\n")}\n`);
  // Written last: its presence means the cache is complete.
  writeFileSync(listPath, JSON.stringify({ files, exposuresS }));
  return { dir, files: files.map((f) => join(dir, f)), exposuresS, madeS: (performance.now() - started) / 1000 };
}
