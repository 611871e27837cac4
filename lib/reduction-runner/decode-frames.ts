// Files -> LinearFrames with their provenance: each file decoded by lib/media
// (format sniffed from content), the exposure taken from the photographer's
// override or from the file, never guessed. Every refusal names the file.
import { stat } from "node:fs/promises";
import { basename } from "node:path";
import { decodeFrame, type DecodedFrame, type MediaFormat } from "@/lib/media";
import type { LinearFrame } from "@/lib/imaging/types";
import { ReductionInputError } from "./errors";
import type { FrameSpill } from "./frame-spill";
import type { PooledDecode, PreparePool } from "./prepare-pool";

/** Frames decoded side by side: sharp already uses two threads per image, so more only adds memory. */
const DECODES_IN_FLIGHT = 2;

export type ExposureSource = "exif" | "fits-header" | "override";

export interface FrameProvenance {
  name: string;
  path: string;
  format: MediaFormat;
  bitDepth: number;
  width: number;
  height: number;
  planeCount: number;
  exposureS: number;
  exposureSource: ExposureSource;
  captureTimeMs?: number;
  /** Where the capture time came from: the file's own metadata, or the photographer (times typed or imported). */
  captureTimeSource?: "file" | "override";
  isTimeZoneAssumed?: boolean;
  instrument?: string;
}

export interface DecodedBracket {
  frames: LinearFrame[];
  provenance: FrameProvenance[];
  /** Per frame, its outliers (findFrameOutliers) when the pool searched it; undefined for a frame it did not. */
  outliers: (Uint32Array | undefined)[];
}

/** Decode in these worker threads instead of on the calling thread, each frame searched for defects there when asked. */
export interface DecodeInPool {
  pool: PreparePool;
  findOutliers: boolean;
}

/** Refuses a list the reduction cannot start from: fewer than two frames, or two files of one name. */
export function checkFileList(files: string[]): void {
  if (files.length < 2) {
    const named = files.length === 1 ? `: ${basename(files[0])} alone` : "";
    throw new ReductionInputError("too-few-frames", `a bracket needs at least 2 frames, got ${files.length}${named}`);
  }
  const seen = new Map<string, string>();
  for (const path of files) {
    const name = basename(path);
    if (seen.has(name)) throw new ReductionInputError("bad-option", `${name}: given twice (${seen.get(name)} and ${path}); frames are told apart by file name`);
    seen.set(name, path);
  }
}

/** Refuses a path that is missing or a folder; the decoder then reads the file itself. */
async function checkFrameFile(path: string, name: string): Promise<void> {
  try {
    if ((await stat(path)).isDirectory()) throw Object.assign(new Error(`${path} is a folder`), { code: "EISDIR" });
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const why = code === "ENOENT" ? "no such file" : code === "EISDIR" ? "it is a folder" : code === "EACCES" ? "permission denied" : String(code ?? error);
    throw new ReductionInputError("unreadable-file", `${name}: cannot read the file (${why})`, { cause: error });
  }
}

function describeInstrument(decoded: DecodedFrame): string | undefined {
  const { make, model, instrument } = decoded.metadata;
  if (instrument) return instrument;
  const parts = [make, model].filter(Boolean);
  return parts.length > 0 ? parts.join(" ") : undefined;
}

/** Refuses a bracket whose frames differ in size or colour planes, naming the odd one. */
export function checkSameShape(provenance: FrameProvenance[]): void {
  const first = provenance[0];
  for (const frame of provenance.slice(1)) {
    if (frame.width !== first.width || frame.height !== first.height || frame.planeCount !== first.planeCount) {
      throw new ReductionInputError(
        "size-mismatch",
        `${frame.name}: the frame is ${frame.width} x ${frame.height} with ${frame.planeCount} colour planes, but ${first.name} is ${first.width} x ${first.height} with ${first.planeCount}; a bracket's frames must all be one size`,
      );
    }
  }
}

/**
 * A decoded file as a bracket frame with its provenance: the exposure is the
 * photographer's when given, else the file's (NaN when neither: refused by the
 * caller, naming the files); likewise the capture time.
 */
export function describeDecodedFrame(d: DecodedFrame, path: string, exposureOverride: number | undefined, timeOverride: number | undefined): { frame: LinearFrame; provenance: FrameProvenance } {
  const exposureS = exposureOverride ?? d.metadata.exposureS ?? NaN;
  const captureTimeMs = timeOverride ?? d.metadata.captureTimeMs;
  const provenance: FrameProvenance = {
    name: d.name,
    path,
    format: d.format,
    bitDepth: d.bitDepth,
    width: d.image.width,
    height: d.image.height,
    planeCount: d.image.planes.length,
    exposureS,
    exposureSource: exposureOverride !== undefined ? "override" : d.format === "fits" ? "fits-header" : "exif",
    captureTimeMs,
    captureTimeSource: timeOverride !== undefined ? "override" : d.metadata.captureTimeMs !== undefined ? "file" : undefined,
    isTimeZoneAssumed: timeOverride !== undefined ? false : d.metadata.isTimeZoneAssumed,
    instrument: describeInstrument(d),
  };
  const frame: LinearFrame = {
    name: d.name,
    image: d.image,
    exposureS,
    blackLevel: d.blackLevel,
    blackLevelSource: d.blackLevelSource,
    whiteLevel: d.whiteLevel,
    encoding: d.encoding,
    captureTimeMs,
  };
  return { frame, provenance };
}

/** The refusal for frames without an exposure time, naming them and where the time was looked for. */
export function describeMissingExposure(missing: FrameProvenance[]): ReductionInputError {
  const where = missing[0].format === "fits" ? "no EXPTIME or EXPOSURE card" : "no EXIF ExposureTime";
  return new ReductionInputError(
    "missing-exposure",
    `${missing.map((p) => p.name).join(", ")}: no exposure time in the file (${where}); give one per file in an exposures CSV (columns file, exposure_s)`,
  );
}

/** Refuses a bracket that mixes 8-bit and linear frames, naming the odd one. */
export function checkSameEncoding(frames: Pick<LinearFrame, "name" | "encoding">[], provenance: FrameProvenance[]): void {
  const odd = frames.findIndex((f) => f.encoding !== frames[0].encoding);
  if (odd < 0) return;
  throw new ReductionInputError("size-mismatch", `${frames[odd].name}: the frame is ${provenance[odd].bitDepth}-bit ${frames[odd].encoding} but ${frames[0].name} is ${provenance[0].bitDepth}-bit ${frames[0].encoding}; a bracket must be all 8-bit or all linear`);
}

/**
 * Decodes every file (at most two at once) and attaches exposures. Overrides
 * are keyed by file name and win over the file's own value. In a pool, each
 * linear frame may also be searched for defects as it is decoded (see
 * calibrateBracket), both cores working.
 */
export async function decodeBracketFiles(
  files: string[],
  exposureOverrides: Map<string, number> = new Map(),
  onProgress?: (fraction: number) => void,
  inPool?: DecodeInPool,
  captureTimeOverrides: Map<string, number> = new Map(),
  spill?: FrameSpill,
): Promise<DecodedBracket> {
  checkFileList(files);
  for (const [name, exposureS] of exposureOverrides) {
    if (!(Number.isFinite(exposureS) && exposureS > 0)) throw new ReductionInputError("bad-exposure", `${name}: the exposure given, ${exposureS} s, is not a positive number of seconds`);
  }
  for (const [name, ms] of captureTimeOverrides) {
    if (!Number.isFinite(ms)) throw new ReductionInputError("missing-capture-time", `${name}: the capture time given is not a valid time`);
  }
  const described: ReturnType<typeof describeDecodedFrame>[] = new Array(files.length);
  const outliers: (Uint32Array | undefined)[] = new Array(files.length);
  let next = 0;
  let done = 0;
  const lanes = Array.from({ length: Math.min(DECODES_IN_FLIGHT, files.length) }, async () => {
    while (next < files.length) {
      const k = next++;
      const name = basename(files[k]);
      await checkFrameFile(files[k], name);
      // With a spill, the pool's thread writes the planes to its folder itself.
      const pooled: PooledDecode | undefined = await inPool?.pool.decode(files[k], name, inPool.findOutliers, spill?.dir);
      // Without a pool, or when a worker failed, the frame is decoded here (and a fault thrown as usual).
      const decoded = pooled?.decoded ?? (await decodeFrame(files[k], name));
      outliers[k] = pooled?.outliers;
      // Described before its pixels go: once spilled, even a look at the planes' count would read them all back.
      described[k] = describeDecodedFrame(decoded, files[k], exposureOverrides.get(decoded.name), captureTimeOverrides.get(decoded.name));
      // Each frame's pixels go to disk as soon as it is decoded: memory holds the frames in flight only.
      if (spill && pooled?.spilled) spill.adoptField(decoded.image, "planes", pooled.spilled);
      else if (spill) spill.spillField(decoded.image, "planes");
      onProgress?.(++done / files.length);
    }
  });
  await Promise.all(lanes);

  const provenance = described.map((x) => x.provenance);
  const missing = provenance.filter((p) => Number.isNaN(p.exposureS));
  if (missing.length > 0) throw describeMissingExposure(missing);
  checkSameShape(provenance);
  checkSameEncoding(described.map((x) => x.frame), provenance);
  const frames = described.map((x) => x.frame);
  return { frames, provenance, outliers };
}
