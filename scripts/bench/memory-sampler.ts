// Peak resident memory of the whole process, sampled from a worker thread so
// that the samples keep coming while the main thread is busy in synchronous
// pipeline code (a timer on the main thread would not fire then). RSS is
// process-wide, so it includes every thread's memory.
import { Worker } from "node:worker_threads";

const SAMPLER_SOURCE = `
const { parentPort, workerData } = require("node:worker_threads");
let peak = 0;
const sample = () => { const rss = process.memoryUsage.rss(); if (rss > peak) peak = rss; };
const timer = setInterval(sample, workerData.intervalMs);
parentPort.on("message", (m) => {
  sample();
  if (m === "reset") peak = 0;
  else if (m === "stop") { clearInterval(timer); parentPort.postMessage(peak); parentPort.close(); }
  else parentPort.postMessage(peak);
});
`;

export interface MemorySampler {
  /** Peak RSS in bytes since the start or the last reset. */
  readPeakBytes: () => Promise<number>;
  reset: () => void;
  stop: () => Promise<number>;
}

export function startMemorySampler(intervalMs = 50): MemorySampler {
  const worker = new Worker(SAMPLER_SOURCE, { eval: true, workerData: { intervalMs } });
  const ask = (message: string) => new Promise<number>((resolve) => {
    worker.once("message", resolve);
    worker.postMessage(message);
  });
  return {
    readPeakBytes: () => ask("read"),
    reset: () => worker.postMessage("reset"),
    stop: async () => {
      const peak = await ask("stop");
      await worker.terminate();
      return peak;
    },
  };
}
