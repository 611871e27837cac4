// Writes a synthetic eclipse bracket (frames in TIFF, JPEG, FITS and DNG, plus
// truth.json) for tests and the demo. Every file says it is synthetic.
// Run: npx tsx scripts/synth.ts --out DIR [--width W --height H --frames N --seed S --formats tiff,jpeg,fits,dng]
import { closeExifWriter } from "@/lib/media/exif-write";
import { computeExposureLadder, createModelBracket } from "./lib-synth/from-model";
import { parseSynthArgs } from "./lib-synth/parse-args";
import { writeSyntheticBracket } from "./lib-synth/write-bracket";

async function main(): Promise<void> {
  const args = parseSynthArgs(process.argv.slice(2));
  const started = Date.now();
  const ladder = computeExposureLadder(args.frames, 1 / 2000, args.longestS);
  const bracket = createModelBracket({
    width: args.width, height: args.height, frames: args.frames * args.repeat, seed: args.seed,
    exposuresS: ladder.flatMap((t) => Array.from({ length: args.repeat }, () => t)), isRealCamera: args.camera === "real",
  });
  const modelledMs = Date.now() - started;
  const written = await writeSyntheticBracket(bracket, args.outDir, args.formats, args.utcOffsetMin);
  for (const frame of written) console.log(`${frame.name}  ${frame.exposureS} s  ${Object.values(frame.files).join(" ")}`);
  console.log(`${written.length} frames in ${args.outDir} (model ${modelledMs} ms, total ${Date.now() - started} ms); truth in truth.json`);
}

main()
  .catch((error: unknown) => {
    console.error(error instanceof Error ? error.message : error);
    process.exitCode = 1;
  })
  .finally(() => closeExifWriter());
