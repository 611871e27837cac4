// Whether a frame can serve as a bias, dark or flat frame of its set: calibration
// works on the sensor's linear data, pixel for pixel, so the frame must hold more
// than 8 bits and match the set's light frames in size and colour planes. Checked
// when a frame is marked as a calibration frame, at ingest of a frame already
// marked, and before a reduction takes the set's calibration frames.
import { and, asc, eq, ne } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { frames, type FrameFlags, type FrameKind } from "@/db/schema";

export const CALIBRATION_KINDS = ["bias", "dark", "flat"] as const satisfies readonly FrameKind[];
export type CalibrationFrameKind = (typeof CALIBRATION_KINDS)[number];

export function isCalibrationKind(kind: FrameKind): kind is CalibrationFrameKind {
  return kind === "bias" || kind === "dark" || kind === "flat";
}

export interface FrameShape {
  originalFileName: string;
  format: string | null;
  width: number | null;
  height: number | null;
  bitDepth: number | null;
  /** Colour planes, recorded at ingest (flags.planeCount); unknown for frames ingested before it was. */
  planeCount?: number;
}

const FORMAT_WORDS: Record<string, string> = { jpeg: "JPEG", png: "PNG", tiff: "TIFF" };

function describePlanes(n: number): string {
  return n === 1 ? "one grey plane" : `${n} colour planes`;
}

/** The shape most of the frames share (ties: the first met), or null for none. */
function findCommonShape(others: FrameShape[]): FrameShape | null {
  const counts = new Map<string, { n: number; frame: FrameShape }>();
  for (const f of others) {
    if (f.width === null || f.height === null) continue;
    const key = `${f.width}x${f.height}`;
    const entry = counts.get(key) ?? { n: 0, frame: f };
    entry.n++;
    counts.set(key, entry);
  }
  let best: { n: number; frame: FrameShape } | null = null;
  for (const entry of counts.values()) if (!best || entry.n > best.n) best = entry;
  return best?.frame ?? null;
}

/**
 * The plane count most of the frames share, counting linear frames (more than 8 bits)
 * only when there are any, since only those are calibrated (ties: the first met);
 * undefined when no frame's count is known. The first frame met alone would depend
 * on the order rows come in, and a set may hold JPEGs beside its raws.
 */
function findCommonPlaneCount(frames: FrameShape[]): number | undefined {
  const known = frames.filter((f) => f.planeCount !== undefined);
  const linear = known.filter((f) => f.bitDepth === null || f.bitDepth > 8);
  const counts = new Map<number, number>();
  for (const f of linear.length > 0 ? linear : known) counts.set(f.planeCount!, (counts.get(f.planeCount!) ?? 0) + 1);
  let best: number | undefined;
  for (const [planes, n] of counts) if (best === undefined || n > counts.get(best)!) best = planes;
  return best;
}

/**
 * Why the frame cannot be a calibration frame of this kind, or null when it can.
 * `lights` are the set's ingested light frames; without any, the set's other
 * calibration frames stand in. Messages name the file and say what would do.
 */
export function findCalibrationFault(kind: CalibrationFrameKind, frame: FrameShape, lights: FrameShape[], otherCalibration: FrameShape[] = []): string | null {
  const name = frame.originalFileName;
  if (frame.bitDepth !== null && frame.bitDepth <= 8) {
    const format = FORMAT_WORDS[frame.format ?? ""] ?? "image";
    return `${name}: an 8-bit ${format} cannot serve as a ${kind} frame; calibration needs the sensor's own linear data (camera raw, 16-bit TIFF or FITS).`;
  }
  const reference = findCommonShape(lights);
  const against = reference ? "the light frames of this set" : "the other calibration frames of this set";
  const ref = reference ?? findCommonShape(otherCalibration);
  if (!ref || frame.width === null || frame.height === null) return null;
  if (frame.width !== ref.width || frame.height !== ref.height) {
    return `${name}: ${frame.width} x ${frame.height} pixels, but ${against} are ${ref.width} x ${ref.height}; a ${kind} frame must come from the same camera at the same size, uncropped.`;
  }
  const refPlanes = findCommonPlaneCount((reference ? lights : otherCalibration).filter((f) => f.width === ref.width && f.height === ref.height));
  if (frame.planeCount !== undefined && refPlanes !== undefined && frame.planeCount !== refPlanes) {
    return `${name}: ${describePlanes(frame.planeCount)}, but ${against} have ${describePlanes(refPlanes)}; a ${kind} frame must be recorded the same way as the light frames.`;
  }
  return null;
}

/** The shape of a frame row, with its plane count from the ingest flags. */
export function toFrameShape(row: { originalFileName: string; format: string | null; width: number | null; height: number | null; bitDepth: number | null; flags: FrameFlags | null }): FrameShape {
  return { originalFileName: row.originalFileName, format: row.format, width: row.width, height: row.height, bitDepth: row.bitDepth, planeCount: row.flags?.planeCount };
}

/** The fault of making this frame (already decoded) a calibration frame of its set, read against the set's other ingested frames. */
export async function findCalibrationFaultInSet(db: DbOrTx, setId: string, frameId: string, kind: CalibrationFrameKind, shape: FrameShape): Promise<string | null> {
  const others = await db
    .select({ originalFileName: frames.originalFileName, format: frames.format, width: frames.width, height: frames.height, bitDepth: frames.bitDepth, flags: frames.flags, kind: frames.kind })
    .from(frames)
    .where(and(eq(frames.bracketSetId, setId), ne(frames.id, frameId), eq(frames.ingestState, "ingested")))
    .orderBy(asc(frames.originalFileName), asc(frames.id));
  const lights = others.filter((o) => o.kind === "light").map(toFrameShape);
  const calibration = others.filter((o) => o.kind !== "light").map(toFrameShape);
  return findCalibrationFault(kind, shape, lights, calibration);
}
