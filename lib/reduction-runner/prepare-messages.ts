// Messages between the frame pool and its worker threads (prepare-pool.ts, prepare-worker.ts).
import type { DecodedFrame } from "@/lib/media";
import type { PreparedFrame } from "@/lib/imaging/pipeline";
import type { RegistrationPairOutcome, RegistrationPairTask } from "@/lib/imaging/register";
import type { LinearFrame, ReductionParams } from "@/lib/imaging/types";
import type { SpilledFile } from "./frame-spill";

/** Where a frame's planes are for a worker: the arrays themselves, or spilled files it reads (frame-spill.ts). */
export type PlaneSource = { planes: Float32Array[] } | { files: SpilledFile[] };

export type PrepareRequest =
  /**
   * Decode a file; with findOutliers, also the frame's part of the bracket's defect search;
   * with spillDir, the planes are written there (a frame spill's folder) instead of sent back.
   */
  | { kind: "decode"; id: number; path: string; name: string; findOutliers: boolean; spillDir?: string }
  /** prepareFrame of a frame whose planes come as `source` (the frame's own image field is left out). */
  | { kind: "prepare"; id: number; frame: Omit<LinearFrame, "image">; width: number; height: number; source: PlaneSource; params: ReductionParams }
  /** One pair comparison of a registration (refineRegistrationPair). */
  | { kind: "register-pair"; id: number; task: RegistrationPairTask };

export type PrepareReply =
  /** With `spilled`, the planes are in those files and decoded.image.planes holds empty arrays, one per plane. */
  | { id: number; ok: true; decoded: DecodedFrame; outliers?: Uint32Array; spilled?: SpilledFile[] }
  /** The prepared frame without its defect map (the caller's own frame holds it). */
  | { id: number; ok: true; prepared: PreparedFrame }
  | { id: number; ok: true; pair: RegistrationPairOutcome }
  | { id: number; ok: false };

/** Every pixel buffer of a reply, once each, to be moved rather than copied. */
export function collectTransferables(reply: PrepareReply): ArrayBuffer[] {
  if (!reply.ok || "pair" in reply) return [];
  const views: ArrayBufferView[] = [];
  if ("decoded" in reply) {
    views.push(...reply.decoded.image.planes);
    if (reply.outliers) views.push(reply.outliers);
  } else {
    const { linear, luminance } = reply.prepared;
    views.push(...linear.planes, linear.luminance, linear.clipped, linear.noiseFloor, luminance);
  }
  const buffers = new Set<ArrayBuffer>();
  for (const view of views) if (view.buffer instanceof ArrayBuffer) buffers.add(view.buffer);
  return [...buffers];
}
