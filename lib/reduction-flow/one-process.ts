// A stored reduction reduced again in this process alone (runReductionOnFiles),
// from the same inputs the flow fixes when it starts: the reference the flow's
// master is checked against, and a way to reduce a set without any worker.
import { mkdir } from "node:fs/promises";
import path from "node:path";
import type { DbOrTx } from "@/db/client";
import { runReductionOnFiles, type RunReductionOptions, type RunReductionResult } from "@/lib/reduction-runner/run-reduction";
import { bucketName, downloadObjectToFile } from "@/lib/storage";
import { gatherInputs } from "./reduction-flow";

/** Downloads the reduction's frames into `dir`/in and reduces them into `dir`/out. */
export async function reduceStoredInOneProcess(db: DbOrTx, reductionId: string, dir: string, extra: Pick<RunReductionOptions, "spill" | "onProgress"> = {}): Promise<RunReductionResult> {
  const inputs = await gatherInputs(db, reductionId);
  const inDir = path.join(dir, "in");
  await mkdir(inDir, { recursive: true });
  const fetch = async (f: { key: string; name: string }) => {
    const local = path.join(inDir, f.name);
    await downloadObjectToFile({ bucket: bucketName("originals"), key: f.key }, local);
    return local;
  };
  const files: string[] = [];
  for (const l of inputs.lights) files.push(await fetch(l));
  const calibrationFiles = { bias: [] as string[], dark: [] as string[], flat: [] as string[] };
  for (const c of inputs.calibration) calibrationFiles[c.kind].push(await fetch(c));
  const overrides = new Map<string, number>();
  for (const f of [...inputs.lights, ...inputs.calibration]) if (f.exposureS !== undefined) overrides.set(f.name, f.exposureS);
  const captureTimes = new Map<string, number>();
  for (const l of inputs.lights) if (l.captureTimeMs !== undefined) captureTimes.set(l.name, l.captureTimeMs);
  return runReductionOnFiles({
    files,
    outDir: path.join(dir, "out"),
    params: inputs.params,
    outputLongSidePx: inputs.outputLongSidePx,
    frameIds: Object.fromEntries(inputs.lights.map((l) => [l.name, l.frameId])),
    registration: inputs.registration,
    sky: inputs.sky,
    calibrationFiles: inputs.calibration.length > 0 ? calibrationFiles : undefined,
    exposureOverrides: overrides,
    captureTimeOverrides: captureTimes,
    exposureOverrideSource: inputs.exposureOverrideSource,
    iiifBaseUrl: inputs.iiifBaseUrl,
    ...extra,
  });
}
