// Worker thread of a composite run from the worker (run-in-thread.ts): one
// composite, then it is terminated, so that the worker's main thread keeps
// renewing the job's lock while the numeric work runs.
import { parentPort } from "node:worker_threads";
import { isCompositeInputError } from "./errors";
import { runCompositeOnFiles, type RunCompositeOptions } from "./run-composite";
import type { ComposeThreadMessage } from "./run-in-thread";

parentPort?.once("message", async (options: Omit<RunCompositeOptions, "onProgress">) => {
  let last = -1;
  let lastStage = "";
  try {
    const { outDir, report } = await runCompositeOnFiles({
      ...options,
      onProgress: (stage, fraction) => {
        if (stage === lastStage && fraction - last < 0.02 && fraction !== 1) return;
        last = fraction;
        lastStage = stage;
        parentPort?.postMessage({ kind: "progress", stage, fraction } satisfies ComposeThreadMessage);
      },
    });
    parentPort?.postMessage({ kind: "done", outDir, report } satisfies ComposeThreadMessage);
  } catch (error) {
    parentPort?.postMessage({ kind: "fault", message: error instanceof Error ? error.message : String(error), isBadInput: isCompositeInputError(error) } satisfies ComposeThreadMessage);
  }
});
