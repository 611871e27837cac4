// A whole synthetic bracket on disk: the frames in each format, truth.json, and
// the scene radiance as truth-radiance.fits (float, DN/s) for checks of a merge.
import { mkdir, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { writeFitsFile } from "@/lib/media/fits-write";
import { SYNTH_MAKE, type SynthBracket, type SynthFormat } from "./types";
import { writeBracketFrames, type WrittenFrame } from "./write-frames";

export async function writeSyntheticBracket(bracket: SynthBracket, outDir: string, formats: readonly SynthFormat[], offsetMinutes = 0): Promise<WrittenFrame[]> {
  await mkdir(outDir, { recursive: true });
  const written = await writeBracketFrames(bracket, outDir, formats, offsetMinutes);
  if (bracket.radiance) {
    await writeFitsFile(join(outDir, "truth-radiance.fits"), {
      width: bracket.width,
      height: bracket.height,
      planes: bracket.radiance,
      cards: [
        { key: "BUNIT", value: "DN/s", comment: "scene radiance before the Moon and noise" },
        { key: "INSTRUME", value: SYNTH_MAKE, comment: "synthetic data, not an observation" },
      ],
    });
  }
  const truth = {
    synthetic: true,
    generator: SYNTH_MAKE,
    width: bracket.width,
    height: bracket.height,
    blackLevel: bracket.blackLevel,
    whiteLevel: bracket.whiteLevel,
    exifUtcOffsetMin: offsetMinutes,
    notes: "TIFF and JPEG hold (DN - black) / (white - black) as 16-bit linear and 8-bit sRGB; FITS holds DN - black; DNG holds raw DN.",
    frames: written.map((frame) => ({ ...frame, captureTimeUtc: new Date(frame.captureTimeMs).toISOString() })),
    radianceFile: bracket.radiance ? "truth-radiance.fits" : undefined,
    ...bracket.truth,
  };
  await writeFile(join(outDir, "truth.json"), `${JSON.stringify(truth, null, 2)}\n`);
  return written;
}
