// Peak resident memory of the whole process, sampled from a worker thread so
// that the samples keep coming while the main thread is busy in synchronous
// pipeline code (a timer on the main thread would not fire then). RSS is
// process-wide, so it includes every thread's memory.
import { Worker } from "node:worker_threads";

const SAMPLER_SOURCE = `
const { parentPort, workerData } = require("node:worker_threads");
let peak = 0;
const marks = [];
// Shared with the main thread: the peak since the last take, in KiB, which the main
// thread reads and clears synchronously (from a progress callback inside synchronous work).
const shared = new Int32Array(workerData.shared);
const sample = () => {
  const rss = process.memoryUsage.rss();
  if (rss > peak) peak = rss;
  const kib = Math.ceil(rss / 1024);
  for (let seen = Atomics.load(shared, 0); kib > seen; seen = Atomics.load(shared, 0)) {
    if (Atomics.compareExchange(shared, 0, seen, kib) === seen) break;
  }
};
const timer = setInterval(sample, workerData.intervalMs);
parentPort.on("message", (m) => {
  sample();
  if (m && typeof m === "object" && "mark" in m) { marks.push([m.mark, peak]); peak = 0; }
  else if (m === "marks") parentPort.postMessage(marks.splice(0));
  else if (m === "reset") peak = 0;
  else if (m === "stop") { clearInterval(timer); parentPort.postMessage(peak); parentPort.close(); }
  else parentPort.postMessage(peak);
});
`;

export interface MemorySampler {
  /** Peak RSS in bytes since the start or the last reset. */
  readPeakBytes: () => Promise<number>;
  reset: () => void;
  /**
   * Peak RSS in bytes since the start or the last take (the current RSS included),
   * and starts a new span: synchronous, so that a progress callback can close one
   * stage's span while the main thread is busy.
   */
  takeSpanPeakBytes: () => number;
  /**
   * Closes a stretch: keeps its peak under the label and starts the next one. Sent
   * without waiting, so that synchronous code (a progress callback) can call it.
   */
  mark: (label: string) => void;
  /** The stretches marked so far, [label, peak bytes] in order (and forgets them). */
  readMarks: () => Promise<[string, number][]>;
  stop: () => Promise<number>;
}

export function startMemorySampler(intervalMs = 50): MemorySampler {
  const shared = new SharedArrayBuffer(4);
  const span = new Int32Array(shared);
  const worker = new Worker(SAMPLER_SOURCE, { eval: true, workerData: { intervalMs, shared } });
  const ask = <T = number>(message: string) => new Promise<T>((resolve) => {
    worker.once("message", resolve);
    worker.postMessage(message);
  });
  return {
    readPeakBytes: () => ask("read"),
    reset: () => worker.postMessage("reset"),
    takeSpanPeakBytes: () => {
      const now = process.memoryUsage.rss();
      return Math.max(now, Atomics.exchange(span, 0, Math.ceil(now / 1024)) * 1024);
    },
    mark: (label) => worker.postMessage({ mark: label }),
    readMarks: () => ask<[string, number][]>("marks"),
    stop: async () => {
      const peak = await ask("stop");
      await worker.terminate();
      return peak;
    },
  };
}
