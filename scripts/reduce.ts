// Reduces a bracket from files on disk into a new output folder.
// Run: npm run reduce -- --out DIR [--register sun|moon|corona] [--site LAT,LON,ELEV | --site-file TRACK]
//   [--clock-offset SECONDS] [--north-angle DEG] [--filter mgn|nrgf] [--exposures FILE.csv]
//   [--scratch DIR] [--bias FILE]... [--dark FILE]... [--flat FILE]... FILE...
// Progress goes to stderr; exit 2 for bad input (the message names the file,
// line or option), 1 for anything else.
import { statSync } from "node:fs";
import { basename } from "node:path";
import { closeExifWriter } from "@/lib/media";
import { ReductionInputError } from "@/lib/reduction-runner/errors";
import { discardActiveStagingSync, isBadInputError, parseReduceArgs, parseSiteText, readExposuresCsv, readSiteTrackFile, runReductionOnFiles } from "@/lib/reduction-runner";

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
  const site = args.siteText !== undefined ? parseSiteText(args.siteText) : args.siteFile !== undefined ? await readSiteTrackFile(args.siteFile) : undefined;
  const params = {
    ...(args.filter ? { filter: args.filter } : {}),
    ...(args.recoverResponse ? { recoverResponse: true } : {}),
  };
  if (args.scratchDir !== undefined && !statSync(args.scratchDir, { throwIfNoEntry: false })?.isDirectory()) {
    throw new ReductionInputError("bad-option", `--scratch: ${args.scratchDir} is not a folder`);
  }
  const { outDir, report, scratch } = await runReductionOnFiles({
    files: args.files,
    outDir: args.outDir,
    params,
    exposureOverrides,
    exposureOverrideSource: args.exposuresCsv ? basename(args.exposuresCsv) : undefined,
    registration: args.registration,
    sky: { site, clockOffsetS: args.clockOffsetS, northAngleDeg: args.northAngleDeg, camera: args.camera },
    calibrationFiles: args.calibrationFiles,
    scratchDir: args.scratchDir,
    onProgress: createProgressPrinter(),
  });
  const overall = report.overall as { referenceFrame: string; dynamicRangeStops: number; sky: { plateScaleArcsecPerPx?: number; northAngleDeg?: number; pAngleDeg?: number } };
  console.log(`${report.frames.length} frames reduced into ${outDir} (reference ${overall.referenceFrame}, ${overall.dynamicRangeStops} stops, ${report.timingsMs.total} ms)`);
  for (const left of report.framesLeftOut) console.log(`left out ${left.name}: ${left.reason}`);
  if (scratch.preparedFrames !== "in-memory") {
    const gb = (scratch.writtenBytes / 1024 ** 3).toFixed(1);
    console.log(scratch.preparedFrames === "made-again"
      ? `frames kept on local disk between stages (${gb} GB); their linearized arrays made again when read (${scratch.framesMadeAgain} times), as the scratch disk had no room for them`
      : `frames kept on local disk between stages, with their linearized arrays (${gb} GB)`);
  }
  for (const note of report.notes.slice(0, report.notes.length - 2)) console.log(note);
  const { sky } = overall;
  if (sky.plateScaleArcsecPerPx !== undefined) {
    console.log(`plate scale ${sky.plateScaleArcsecPerPx} arcsec/px, P ${sky.pAngleDeg} deg, celestial north ${sky.northAngleDeg} deg counter-clockwise from image up`);
  }
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
    // The library's messages are for people using the app too; here the options that help can be named.
    const code = (error as { code?: string }).code;
    if (code === "bad-site") process.stderr.write("give the site with --site LAT,LON,ELEV or --site-file TRACK (GPX or CSV)\n");
    if (code === "missing-capture-time") process.stderr.write("give each frame's capture time in its file, or reduce with --register corona or --register moon (no WCS then)\n");
    process.exitCode = isBadInputError(error) ? 2 : 1;
  })
  .finally(() => closeExifWriter());
