// Reduces a bracket from files on disk into a new output folder.
// Run: npm run reduce -- --out DIR [--register moon|corona] [--filter mgn|nrgf] [--exposures FILE.csv] FILE...
// Progress goes to stderr; exit 2 for bad input (the message names the file,
// line or option), 1 for anything else.
import { basename } from "node:path";
import { closeExifWriter } from "@/lib/media";
import { discardActiveStagingSync, isBadInputError, parseReduceArgs, readExposuresCsv, runReductionOnFiles } from "@/lib/reduction-runner";

/** One stderr line per stage, and one each time a stage passes another 10 %. */
function createProgressPrinter(): (stage: string, fraction: number) => void {
  let lastStage = "";
  let lastTenth = -1;
  return (stage, fraction) => {
    const tenth = Math.floor(fraction * 10);
    if (stage === lastStage && tenth === lastTenth) return;
    lastStage = stage;
    lastTenth = tenth;
    process.stderr.write(`${stage.padEnd(20)} ${String(Math.round(fraction * 100)).padStart(3)} %\n`);
  };
}

async function main(): Promise<void> {
  const args = parseReduceArgs(process.argv.slice(2));
  const exposureOverrides = args.exposuresCsv ? await readExposuresCsv(args.exposuresCsv) : undefined;
  const params = {
    ...(args.registration ? { registration: args.registration } : {}),
    ...(args.filter ? { filter: args.filter } : {}),
    ...(args.recoverResponse ? { recoverResponse: true } : {}),
  };
  const { outDir, report } = await runReductionOnFiles({
    files: args.files,
    outDir: args.outDir,
    params,
    exposureOverrides,
    exposureOverrideSource: args.exposuresCsv ? basename(args.exposuresCsv) : undefined,
    onProgress: createProgressPrinter(),
  });
  const overall = report.overall as { referenceFrame: string; dynamicRangeStops: number };
  console.log(`${report.frames.length} frames reduced into ${outDir} (reference ${overall.referenceFrame}, ${overall.dynamicRangeStops} stops, ${report.timingsMs.total} ms)`);
}

for (const signal of ["SIGINT", "SIGTERM"] as const) {
  process.on(signal, () => {
    // Nothing half-written stays behind: the unfinished output folder goes with the process.
    discardActiveStagingSync();
    process.stderr.write(`stopped by ${signal}; nothing was written\n`);
    process.exit(130);
  });
}

main()
  .catch((error: unknown) => {
    process.stderr.write(`${error instanceof Error ? error.message : String(error)}\n`);
    process.exitCode = isBadInputError(error) ? 2 : 1;
  })
  .finally(() => closeExifWriter());
