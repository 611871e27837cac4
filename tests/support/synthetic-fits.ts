// Small synthetic brackets as FITS files (our own generator, lib/imaging), with
// EXPTIME and DATE-OBS so that ingest finds exposures and times.
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { encodeFits } from "@/lib/media/fits-write";

export interface FitsFile {
  name: string;
  bytes: Uint8Array<ArrayBuffer>;
}

export interface SyntheticFitsOptions {
  width: number;
  height: number;
  exposuresS: number[];
  seed: number;
  /** UTC start of the first frame; default mid-totality at Luxor (10:04:30 UTC, DESIGN.md section 7). */
  captureStartMs?: number;
  frameIntervalS?: number;
  prefix?: string;
}

export function makeSyntheticFitsBracket(o: SyntheticFitsOptions): FitsFile[] {
  const { frames } = synthesizeBracket({
    width: o.width,
    height: o.height,
    channels: 1,
    exposuresS: o.exposuresS,
    sunRadiusPx: Math.round(Math.min(o.width, o.height) / 6),
    seed: o.seed,
    whiteLevel: 16383,
    captureStartMs: o.captureStartMs ?? Date.UTC(2027, 7, 2, 10, 4, 30),
    frameIntervalS: o.frameIntervalS ?? 2,
  });
  return frames.map((f, i) => ({
    name: `${o.prefix ?? "frame"}-${String(i + 1).padStart(2, "0")}.fits`,
    bytes: new Uint8Array(
      encodeFits({
        width: o.width,
        height: o.height,
        planes: [Uint16Array.from(f.planes[0])],
        cards: [
          { key: "EXPTIME", value: f.exposureS, comment: "seconds" },
          { key: "DATE-OBS", value: new Date(f.captureTimeMs).toISOString().replace("Z", "") },
          { key: "SATURATE", value: 16383 },
          { key: "INSTRUME", value: "Crownlight synthetic" },
        ],
      }),
    ),
  }));
}

/** A plain 16-bit FITS frame with a pattern that differs by seed (so no two are duplicates). */
export function makePatternFits(width: number, height: number, seed: number, exposureS = 0.01): Uint8Array<ArrayBuffer> {
  const plane = new Uint16Array(width * height);
  for (let i = 0; i < plane.length; i++) plane[i] = 500 + ((i * 31 + seed * 7919) % 12000);
  return new Uint8Array(
    encodeFits({
      width,
      height,
      planes: [plane],
      cards: [
        { key: "EXPTIME", value: exposureS, comment: "seconds" },
        { key: "DATE-OBS", value: new Date(Date.UTC(2027, 7, 2, 10, 5, 0) + seed * 1000).toISOString().replace("Z", "") },
        { key: "INSTRUME", value: "Crownlight synthetic" },
      ],
    }),
  );
}
