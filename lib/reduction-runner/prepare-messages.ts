// Messages between the frame pool and its worker threads (prepare-pool.ts, prepare-worker.ts).
import type { DecodedFrame } from "@/lib/media";
import type { PreparedFrame } from "@/lib/imaging/pipeline";
import type { ReductionParams } from "@/lib/imaging/types";

export interface PrepareRequest {
  id: number;
  path: string;
  name: string;
  /** The photographer's exposure, which wins over the file's. */
  exposureOverrideS?: number;
  params: ReductionParams;
}

export type PrepareReply =
  | { id: number; ok: true; decoded: DecodedFrame; prepared?: PreparedFrame; preparedExposureS?: number }
  | { id: number; ok: false };

/** Every pixel buffer of a reply, once each, to be moved rather than copied. */
export function collectTransferables(reply: PrepareReply): ArrayBuffer[] {
  if (!reply.ok) return [];
  const views: ArrayBufferView[] = [...reply.decoded.image.planes];
  if (reply.prepared) {
    const { linear, luminance } = reply.prepared;
    views.push(...linear.planes, linear.luminance, linear.clipped, linear.noiseFloor, luminance);
  }
  const buffers = new Set<ArrayBuffer>();
  for (const view of views) if (view.buffer instanceof ArrayBuffer) buffers.add(view.buffer);
  return [...buffers];
}
