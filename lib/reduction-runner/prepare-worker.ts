// Worker thread of the frame pool (prepare-pool.ts): decodes one file and runs
// lib/imaging's prepareFrame on it, then hands every plane back by transfer, so
// nothing is copied. Any fault is answered with ok: false and the caller redoes
// the frame on its own thread, where the error keeps its class and message.
import { parentPort } from "node:worker_threads";
import { decodeFrame } from "@/lib/media";
import { prepareFrame } from "@/lib/imaging/pipeline";
import { createSrgbDecodeTable } from "@/lib/imaging/srgb";
import type { LinearFrame } from "@/lib/imaging/types";
import { collectTransferables, type PrepareReply, type PrepareRequest } from "./prepare-messages";

async function handle(request: PrepareRequest): Promise<PrepareReply> {
  const decoded = await decodeFrame(request.path, request.name);
  const exposureS = request.exposureOverrideS ?? decoded.metadata.exposureS;
  if (!(exposureS !== undefined && Number.isFinite(exposureS) && exposureS > 0)) return { id: request.id, ok: true, decoded };
  const frame: LinearFrame = {
    name: decoded.name, image: decoded.image, exposureS, blackLevel: decoded.blackLevel, whiteLevel: decoded.whiteLevel, blackLevelSource: decoded.blackLevelSource,
    encoding: decoded.encoding, captureTimeMs: decoded.metadata.captureTimeMs,
  };
  try {
    const responseTable = frame.encoding === "srgb8" ? createSrgbDecodeTable() : undefined;
    return { id: request.id, ok: true, decoded, prepared: prepareFrame(frame, request.params, responseTable), preparedExposureS: exposureS };
  } catch {
    // A frame the pipeline refuses (no limb, bad levels) is prepared again by the
    // pipeline itself, which throws its own error in its own order.
    return { id: request.id, ok: true, decoded };
  }
}

parentPort?.on("message", (request: PrepareRequest) => {
  handle(request).then(
    (reply) => parentPort?.postMessage(reply, collectTransferables(reply)),
    () => parentPort?.postMessage({ id: request.id, ok: false } satisfies PrepareReply),
  );
});
