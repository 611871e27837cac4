// The calibration frames a reduction takes: every ingested, included bias, dark and
// flat frame of the bracket set, whatever its group (a set is one kit, so one
// sensor; calibration frames are often taken before or after the eclipse and land
// in groups of their own).
import { and, asc, eq, inArray } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { frames, type FrameFlags } from "@/db/schema";
import { CALIBRATION_KINDS, findCalibrationFault, toFrameShape, type CalibrationFrameKind } from "@/lib/bracket-sets/calibration-check";

export interface CalibrationFrameRow {
  id: string;
  kind: CalibrationFrameKind;
  originalFileName: string;
  originalKey: string;
  exposureS: number | null;
  exposureSource: string | null;
  format: string | null;
  width: number | null;
  height: number | null;
  bitDepth: number | null;
  flags: FrameFlags;
}

export async function findCalibrationFrames(db: DbOrTx, setId: string): Promise<CalibrationFrameRow[]> {
  const rows = await db
    .select({
      id: frames.id, kind: frames.kind, originalFileName: frames.originalFileName, originalKey: frames.originalKey, exposureS: frames.exposureS, exposureSource: frames.exposureSource,
      format: frames.format, width: frames.width, height: frames.height, bitDepth: frames.bitDepth, flags: frames.flags,
    })
    .from(frames)
    .where(and(eq(frames.bracketSetId, setId), inArray(frames.kind, [...CALIBRATION_KINDS]), eq(frames.included, true), eq(frames.ingestState, "ingested")))
    .orderBy(asc(frames.kind), asc(frames.originalFileName), asc(frames.id));
  return rows.map((r) => ({ ...r, kind: r.kind as CalibrationFrameKind }));
}

/**
 * The first reason why one of the calibration frames cannot serve the chosen light
 * frames (another size, other planes, 8-bit), or null. Catches what the checks at
 * marking and ingest could not: light frames that arrived after the calibration frames.
 */
export function findCalibrationMismatch(
  lights: { originalFileName: string; format: string | null; width: number | null; height: number | null; bitDepth: number | null; flags: FrameFlags | null }[],
  calibration: CalibrationFrameRow[],
): string | null {
  const lightShapes = lights.map(toFrameShape);
  for (const c of calibration) {
    const fault = findCalibrationFault(c.kind, toFrameShape(c), lightShapes);
    if (fault) return fault;
  }
  return null;
}
