// Worker thread of the frame pool (prepare-pool.ts): decodes a file (and, when
// asked, searches it for the bracket's defects and writes its planes to a frame
// spill's folder), runs lib/imaging's
// prepareFrame on a frame, or compares one pair of a registration, then hands
// every array back by transfer, so nothing is copied. Any fault is answered with ok: false and the caller redoes the work
// on its own thread, where the error keeps its class and message.
import { join } from "node:path";
import { parentPort, threadId } from "node:worker_threads";
import { findFrameOutliers } from "@/lib/imaging/calibrate-defects";
import { prepareFrame } from "@/lib/imaging/pipeline";
import { refineRegistrationPair } from "@/lib/imaging/register";
import { createSrgbDecodeTable } from "@/lib/imaging/srgb";
import type { LinearFrame } from "@/lib/imaging/types";
import { decodeFrame } from "@/lib/media";
import { collectGarbage } from "./collect-garbage";
import { readSpilledFile, writeSpilledFile } from "./frame-spill";
import { collectTransferables, type PlaneSource, type PrepareReply, type PrepareRequest } from "./prepare-messages";

function readPlanes(source: PlaneSource): Float32Array[] {
  if ("planes" in source) return source.planes;
  return source.files.map((file) => readSpilledFile(file) as Float32Array);
}

async function handle(request: PrepareRequest): Promise<PrepareReply> {
  if (request.kind === "decode") {
    const decoded = await decodeFrame(request.path, request.name);
    const frame: LinearFrame = { name: decoded.name, image: decoded.image, exposureS: NaN, blackLevel: decoded.blackLevel, whiteLevel: decoded.whiteLevel, encoding: decoded.encoding };
    const outliers = request.findOutliers && decoded.encoding === "linear" ? findFrameOutliers(frame) : undefined;
    if (!request.spillDir) return { id: request.id, ok: true, decoded, outliers };
    // Packed and written here, so that the calling thread neither packs nor writes while this thread decodes the next frame.
    const { planes } = decoded.image;
    const spilled = planes.map((plane, c) => writeSpilledFile(join(request.spillDir!, `decoded-${threadId}-${request.id}-${c}.bin`), plane));
    return { id: request.id, ok: true, decoded: { ...decoded, image: { ...decoded.image, planes: planes.map(() => new Float32Array(0)) } }, outliers, spilled };
  }
  if (request.kind === "register-pair") return { id: request.id, ok: true, pair: refineRegistrationPair(request.task) };
  const { frame, width, height, source, params } = request;
  // Planes read when looked at, as a spilled frame's are: linearizing reads them once and lets them
  // go once the luminance is made, so they do not sit beside the limb fit (288 MB at 24 megapixels).
  const whole: LinearFrame = { ...frame, image: { width, height, get planes() { return readPlanes(source); } } };
  const prepared = prepareFrame(whole, params, whole.encoding === "srgb8" ? createSrgbDecodeTable() : undefined);
  // The defect map is the caller's (one map may serve every frame): it is not sent back.
  prepared.linear.masked = undefined;
  return { id: request.id, ok: true, prepared };
}

// Each task's inputs (a pair's two registration images, a frame's planes, copied here or read
// from disk) and its intermediate arrays are garbage once it is answered. V8 collects a thread's
// ArrayBuffers only once some tens of MB more are held than after its last collection, and a
// thread that allocates little between tasks reaches that late. Measured on 30 frames of
// 900 x 600 (the memory test's): a peak of 456 MiB without this collection, 402 to 413 with it
// (10 frames: 381 to 417). A full collection of this small heap takes milliseconds beside a
// task's hundreds.
parentPort?.on("message", (request: PrepareRequest) => {
  handle(request).then(
    (reply) => parentPort?.postMessage(reply, collectTransferables(reply)),
    () => parentPort?.postMessage({ id: request.id, ok: false } satisfies PrepareReply),
  ).finally(collectGarbage);
});
