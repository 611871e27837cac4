// Worker threads that share the renditions' per-pixel steps and blurs with the
// calling thread (a PlaneRunner for lib/imaging, see plane-runner.ts): the
// planes live in SharedArrayBuffers, a run's pieces (ranges of rows, columns or
// pixels) are taken by whichever thread is free, and the calling thread takes
// them too and waits, blocked, until all are done, so that lib/imaging's code
// stays synchronous. A kernel's units are independent, so the result is the
// same bit for bit whoever does which piece; a worker that cannot start takes
// none, and a piece a worker could not do is done again by the calling thread:
// the pool only ever makes a reduction faster, never different. (A worker whose
// thread ended inside a piece would leave the caller waiting; a kernel's error is
// caught in the worker, so only the end of the process ends one there.)
// Shared memory comes back only with a full garbage collection (collect-garbage.ts),
// so the pool hands out again what lib/imaging releases, and trim and close collect.
import type { Worker } from "node:worker_threads";
import type { PlaneKernel, PlaneRunner } from "@/lib/imaging/plane-runner";
import { collectGarbage } from "./collect-garbage";
import { CONTROL, PIECE_DONE, PIECE_FAILED, type PlaneCollect, type PlaneJob } from "./plane-messages";
import { startTypeScriptWorker } from "./prepare-pool";

/** Worker threads beside the calling thread: the machines have two cores, and the caller works too. */
export const PLANE_WORKERS = 1;

/**
 * How long trim waits for each worker's collection (a worker that failed to start
 * is known as such only once this thread's events run), and in all, ms.
 */
const COLLECT_WAIT_MS = 1000;
const TRIM_WAIT_MS = 1500;

export interface PlanePoolOptions {
  /** Worker threads; default PLANE_WORKERS. 0 gives a pool whose calling thread does everything. */
  workers?: number;
  /** Pieces a run is cut into, per thread working (a thread done early takes another); default 6. */
  piecesPerThread?: number;
  /**
   * false: the calling thread takes only the pieces no worker has taken after a
   * while (tests, so that every piece goes through a worker). Default true.
   */
  callerWorks?: boolean;
}

export interface PlanePoolCounts {
  /** Pieces the calling thread did, and the workers. */
  byCaller: number;
  byWorkers: number;
  /** Runs done whole on the calling thread (no worker, one piece, or an argument not in shared memory). */
  alone: number;
  /** Pieces a worker could not do, done again by the calling thread. */
  redone: number;
  /** Time spent giving memory back between phases (trim), ms. */
  trimMs: number;
}

export interface PlanePool extends PlaneRunner {
  /** Resolves with the number of workers up once each has started or failed to; runs before that use the threads already up. */
  ready(): Promise<number>;
  counts(): PlanePoolCounts;
  close(): Promise<void>;
}

interface Lane {
  worker: Worker;
  isDead: boolean;
  started: Promise<boolean>;
}

function startLane(): Lane {
  let settle!: (up: boolean) => void;
  const started = new Promise<boolean>((resolve) => { settle = resolve; });
  let worker: Worker;
  try {
    worker = startTypeScriptWorker(new URL("./plane-worker.ts", import.meta.url));
  } catch {
    settle(false);
    return { worker: undefined as unknown as Worker, isDead: true, started };
  }
  const lane: Lane = { worker, isDead: false, started };
  const fail = () => {
    lane.isDead = true;
    settle(false);
  };
  worker.once("message", () => settle(true));
  worker.on("error", fail);
  worker.on("exit", fail);
  return lane;
}

/** True when every typed array among the arguments (or in a list among them) lives in shared memory. */
function isAllShared(args: unknown): boolean {
  if (typeof args !== "object" || args === null) return true;
  for (const value of Object.values(args)) {
    const views = Array.isArray(value) ? value : [value];
    for (const v of views) if (ArrayBuffer.isView(v) && !(v.buffer instanceof SharedArrayBuffer)) return false;
  }
  return true;
}

export function createPlanePool(options: PlanePoolOptions = {}): PlanePool {
  const lanes = Array.from({ length: options.workers ?? PLANE_WORKERS }, startLane);
  const piecesPerThread = Math.max(1, Math.floor(options.piecesPerThread ?? 6));
  const callerWorks = options.callerWorks ?? true;
  const counts: PlanePoolCounts = { byCaller: 0, byWorkers: 0, alone: 0, redone: 0, trimMs: 0 };
  // Shared memory this pool handed out, and what was given back, by byte length, to hand out again.
  const own = new WeakSet<SharedArrayBuffer>();
  const spare = new Map<number, SharedArrayBuffer[]>();
  const spareSet = new Set<SharedArrayBuffer>();
  const sharedBuffer = (bytes: number, written = false): SharedArrayBuffer => {
    const reused = spare.get(bytes)?.pop();
    if (!reused) {
      const buffer = new SharedArrayBuffer(bytes);
      own.add(buffer);
      return buffer;
    }
    spareSet.delete(reused);
    // Eight bytes at a time: a fill of shared memory goes element by element.
    if (!written) {
      const words = Math.floor(bytes / 8);
      new Float64Array(reused, 0, words).fill(0);
      new Uint8Array(reused, 8 * words).fill(0);
    }
    return reused;
  };
  // Each worker drops its own references to the planes (its last jobs' arguments) first, then this thread.
  const giveBack = () => {
    spare.clear();
    spareSet.clear();
    for (const lane of lanes.filter((l) => !l.isDead)) {
      const done = new Int32Array(new SharedArrayBuffer(4));
      lane.worker.postMessage({ collect: done } satisfies PlaneCollect);
      // A worker still starting (or gone) does not hold the renditions up.
      Atomics.wait(done, 0, 0, COLLECT_WAIT_MS);
    }
    collectGarbage();
  };

  /** The calling thread takes pieces of the run until none is left. */
  const takePieces = <A>(kernel: PlaneKernel<A>, args: A, control: Int32Array, bounds: Int32Array): void => {
    const pieces = bounds.length - 1;
    for (;;) {
      const k = Atomics.add(control, CONTROL.next, 1);
      if (k >= pieces) return;
      try {
        kernel.run(args, bounds[k], bounds[k + 1]);
      } finally {
        // Counted finished even when it throws, so that the wait below ends; the error then goes to the caller.
        Atomics.store(control, CONTROL.status + k, PIECE_DONE);
        Atomics.add(control, CONTROL.finished, 1);
      }
      counts.byCaller++;
    }
  };

  return {
    float32: (length, written) => new Float32Array(sharedBuffer(4 * length, written)),
    float64: (length, written) => new Float64Array(sharedBuffer(8 * length, written)),
    uint8: (length, written) => new Uint8Array(sharedBuffer(length, written)),
    uint16: (length, written) => new Uint16Array(sharedBuffer(2 * length, written)),
    release(...arrays) {
      for (const a of arrays) {
        const buffer = a?.buffer;
        // Only whole buffers of this pool, each once.
        if (!(buffer instanceof SharedArrayBuffer) || !own.has(buffer) || spareSet.has(buffer) || a!.byteLength !== buffer.byteLength) continue;
        spareSet.add(buffer);
        const list = spare.get(buffer.byteLength) ?? [];
        list.push(buffer);
        spare.set(buffer.byteLength, list);
      }
    },
    run(kernel, args, units) {
      if (units <= 0) return;
      const alive = lanes.filter((l) => !l.isDead);
      const pieces = Math.min(units, (alive.length + 1) * piecesPerThread);
      if (alive.length === 0 || pieces < 2 || !isAllShared(args)) {
        counts.alone++;
        kernel.run(args, 0, units);
        return;
      }
      const bounds = new Int32Array(pieces + 1);
      for (let k = 0; k <= pieces; k++) bounds[k] = Math.floor((k * units) / pieces);
      const control = new Int32Array(new SharedArrayBuffer(4 * (CONTROL.status + pieces)));
      const job: PlaneJob = { kernel: kernel.name, args, control, bounds };
      for (const lane of alive) lane.worker.postMessage(job);
      if (callerWorks) takePieces(kernel, args, control, bounds);
      for (;;) {
        const finished = Atomics.load(control, CONTROL.finished);
        if (finished >= pieces) break;
        // A caller that leaves the pieces to the workers still takes those none has taken in a second (a worker gone).
        if (Atomics.wait(control, CONTROL.finished, finished, callerWorks ? undefined : 1000) === "timed-out") takePieces(kernel, args, control, bounds);
      }
      counts.byWorkers += Atomics.load(control, CONTROL.byWorkers);
      for (let k = 0; k < pieces; k++) {
        if (Atomics.load(control, CONTROL.status + k) !== PIECE_FAILED) continue;
        counts.redone++;
        kernel.run(args, bounds[k], bounds[k + 1]);
      }
    },
    async ready() {
      const up = await Promise.all(lanes.map((l) => l.started));
      return up.filter(Boolean).length;
    },
    counts: () => ({ ...counts }),
    trim() {
      let bytes = 0;
      for (const buffer of spareSet) bytes += buffer.byteLength;
      if (bytes === 0) return;
      const started = performance.now();
      const before = process.memoryUsage.rss();
      giveBack();
      // The collection leaves the freeing to a background thread: wait until most of the memory
      // has gone (at most TRIM_WAIT_MS), so that the next phase's planes are not made beside it.
      const sleep = new Int32Array(new SharedArrayBuffer(4));
      while (process.memoryUsage.rss() > before - bytes / 2 && performance.now() - started < TRIM_WAIT_MS) Atomics.wait(sleep, 0, 0, 5);
      counts.trimMs += performance.now() - started;
    },
    async close() {
      await Promise.all(lanes.filter((l) => l.worker).map((l) => l.worker.terminate()));
      // What the renditions let go (kept for reuse or not) is given back before the outputs are written.
      spare.clear();
      spareSet.clear();
      collectGarbage();
    },
  };
}
