// Worker thread of the flow's plan (plan-stage.ts): one plan, then it is terminated.
import { parentPort } from "node:worker_threads";
import { describePlanFault, planFromFiles, type PlanInput, type PlanMessage } from "./plan-stage";

parentPort?.once("message", async (input: PlanInput) => {
  let last = -1;
  let lastStage = "";
  try {
    const { plan, sky } = await planFromFiles(input, (stage, fraction, frames) => {
      // Progress at most every 1 %: messages are cheap, but not free.
      if (stage === lastStage && fraction - last < 0.01 && fraction !== 1 && !frames) return;
      last = fraction;
      lastStage = stage;
      parentPort?.postMessage({ kind: "progress", stage, fraction, frames } satisfies PlanMessage);
    });
    parentPort?.postMessage({ kind: "done", plan, sky } satisfies PlanMessage);
  } catch (err) {
    parentPort?.postMessage(describePlanFault(err));
  }
});
