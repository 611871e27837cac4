// runCompositeOnFiles on a worker thread of its own (compose-thread.ts): the
// caller's event loop stays free (a queue's lock renewal, progress writes).
import { startTypeScriptWorker } from "@/lib/reduction-runner/prepare-pool";
import { CompositeInputError } from "./errors";
import type { CompositeReport, RunCompositeOptions } from "./run-composite";

export type ComposeThreadMessage =
  | { kind: "progress"; stage: string; fraction: number }
  | { kind: "done"; outDir: string; report: CompositeReport }
  | { kind: "fault"; message: string; isBadInput: boolean };

/** The composite's result; a fault in the input comes back as a CompositeInputError (with the thread's message), any other as an Error. */
export function runCompositeInThread(options: RunCompositeOptions): Promise<{ outDir: string; report: CompositeReport }> {
  const { onProgress, ...rest } = options;
  const worker = startTypeScriptWorker(new URL("./compose-thread.ts", import.meta.url));
  return new Promise((resolve, reject) => {
    let settled = false;
    const settle = (fn: () => void) => {
      if (settled) return;
      settled = true;
      void worker.terminate();
      fn();
    };
    worker.on("message", (m: ComposeThreadMessage) => {
      if (m.kind === "progress") onProgress?.(m.stage, m.fraction);
      else if (m.kind === "done") settle(() => resolve({ outDir: m.outDir, report: m.report }));
      else settle(() => reject(m.isBadInput ? new CompositeInputError("not-a-master", m.message) : new Error(m.message)));
    });
    worker.on("error", (error) => settle(() => reject(error)));
    worker.on("exit", (code) => settle(() => reject(new Error(`the composite's thread ended (exit code ${code}) before it finished`))));
    worker.postMessage(rest);
  });
}
