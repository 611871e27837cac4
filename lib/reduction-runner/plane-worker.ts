// Worker thread of the plane pool (plane-pool.ts): takes pieces of a kernel's
// run until none is left, on planes the calling thread shares with it. A piece
// that fails is marked so, and the calling thread does it again itself.
import { parentPort } from "node:worker_threads";
import { PLANE_KERNELS } from "@/lib/imaging/plane-kernels";
import { collectGarbage } from "./collect-garbage";
import { CONTROL, PIECE_DONE, PIECE_FAILED, type PlaneCollect, type PlaneJob, type PlaneWorkerReady } from "./plane-messages";

function takePieces(job: PlaneJob): void {
  const { control, bounds } = job;
  const kernel = PLANE_KERNELS.get(job.kernel);
  const pieces = bounds.length - 1;
  for (;;) {
    const k = Atomics.add(control, CONTROL.next, 1);
    if (k >= pieces) return;
    let status = PIECE_FAILED;
    try {
      if (kernel) {
        kernel.run(job.args as never, bounds[k], bounds[k + 1]);
        status = PIECE_DONE;
      }
    } catch {
      // The calling thread does the piece again, where an error keeps its class and message.
    }
    Atomics.store(control, CONTROL.status + k, status);
    if (status === PIECE_DONE) Atomics.add(control, CONTROL.byWorkers, 1);
    Atomics.add(control, CONTROL.finished, 1);
    Atomics.notify(control, CONTROL.finished);
  }
}

parentPort?.on("message", (message: PlaneJob | PlaneCollect) => {
  if ("collect" in message) {
    collectGarbage();
    Atomics.store(message.collect, 0, 1);
    Atomics.notify(message.collect, 0);
  } else takePieces(message);
});
parentPort?.postMessage({ ready: true } satisfies PlaneWorkerReady);
