// Benchmark of a full reduction: 9 frames of 6000 x 4000 16-bit TIFF (made once,
// cached in .cache/), reduced by the runner. Prints stage times, peak memory and
// two ratios measured in this same run, never against stored numbers:
//  (a) reduction time over a floor: sharp decoding the same frames plus sharp
//      tiling one rendition (what any reduction must at least do);
//  (b) our 8-bit merge over OpenCV's MergeDebevec (python3-opencv) on the same
//      codes, each side timed around the merge alone.
// Run: npm run bench            (the gallery: npm run bench -- gallery; print bundles: npm run bench -- export;
//      brackets of 9, 27 and 81 frames, each reduced in a watched process: npm run bench -- scale;
//      a composite of three 24-megapixel masters: npm run bench -- compose)
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { basename, join } from "node:path";
import { decodeFrame } from "@/lib/media";
import { mergeCodesLikeOpenCv } from "@/lib/imaging/merge";
import { encodeSrgb } from "@/lib/imaging/srgb";
import { readExposuresCsv, runReductionOnFiles } from "@/lib/reduction-runner";
import { prepareBenchBracket, BENCH_FRAMES, BENCH_HEIGHT, BENCH_WIDTH } from "./bench/bench-bracket";
import { measureFloorMs } from "./bench/floor";
import { startMemorySampler } from "./bench/memory-sampler";
import { mergeWithOpenCvDebevec } from "./bench/opencv-merge";

/** Memory is printed in GiB (2^30 bytes), with decimal GB (10^9) beside the reduction's peak, whose target is 2 GB. */
const GiB = 1024 ** 3;

/** The bracket as 8-bit sRGB codes, as a camera's JPEGs would hold it. */
async function makeCodes(files: string[]): Promise<{ planes: Uint8Array[][]; interleaved: Uint8Array[] }> {
  const table = new Uint8Array(65536);
  for (let v = 0; v < 65536; v++) table[v] = Math.round(255 * encodeSrgb(v / 65535));
  const planes: Uint8Array[][] = [];
  const interleaved: Uint8Array[] = [];
  for (const file of files) {
    const decoded = await decodeFrame(file, basename(file));
    const n = decoded.image.width * decoded.image.height;
    const framePlanes = decoded.image.planes.map((p) => {
      const out = new Uint8Array(n);
      for (let i = 0; i < n; i++) out[i] = table[p[i]];
      return out;
    });
    const mixed = new Uint8Array(n * 3);
    for (let i = 0; i < n; i++) for (let c = 0; c < 3; c++) mixed[i * 3 + c] = framePlanes[c][i];
    planes.push(framePlanes);
    interleaved.push(mixed);
  }
  return { planes, interleaved };
}

async function main(): Promise<void> {
  const bracket = await prepareBenchBracket(join(process.cwd(), ".cache"));
  const scratch = mkdtempSync(join(tmpdir(), "crownlight-bench-"));
  try {
    const sampler = startMemorySampler();
    const exposureOverrides = await readExposuresCsv(join(bracket.dir, "exposures.csv"));
    const outDir = join(scratch, "reduction");
    const cpuBefore = process.cpuUsage();
    const started = performance.now();
    const { report } = await runReductionOnFiles({ files: bracket.files, outDir, exposureOverrides, exposureOverrideSource: "exposures.csv" });
    const wallMs = performance.now() - started;
    const cpu = process.cpuUsage(cpuBefore);
    const peakBytes = await sampler.readPeakBytes();

    const floor = await measureFloorMs(bracket.files, join(outDir, "natural.png"), scratch);
    const floorMs = floor.decodeMs + floor.tileMs;

    const codes = await makeCodes(bracket.files);
    const linear = Float64Array.from({ length: 256 }, (_, z) => z);
    let mergeStarted = performance.now();
    for (let c = 0; c < 3; c++) mergeCodesLikeOpenCv(codes.planes.map((f) => f[c]), bracket.exposuresS, linear);
    const oursMergeMs = performance.now() - mergeStarted;
    mergeStarted = performance.now();
    const opencv = mergeWithOpenCvDebevec(codes.interleaved, BENCH_WIDTH, BENCH_HEIGHT, bracket.exposuresS);
    const opencvRoundTripMs = performance.now() - mergeStarted;
    const overallPeakBytes = await sampler.stop();

    const stages = report.timingsMs;
    const cpuS = (cpu.user + cpu.system) / 1e6;
    console.log(`\nCrownlight benchmark: ${BENCH_FRAMES} frames of ${BENCH_WIDTH} x ${BENCH_HEIGHT} 16-bit TIFF${bracket.madeS ? ` (made in ${bracket.madeS.toFixed(0)} s)` : " (cached)"}\n`);
    console.log("stage                         ms");
    for (const [stage, ms] of Object.entries(stages)) console.log(`  ${stage.padEnd(24)} ${String(ms).padStart(8)}`);
    console.log(`\nCPU ${cpuS.toFixed(1)} s over ${(wallMs / 1000).toFixed(1)} s wall: ${(cpuS / (wallMs / 1000)).toFixed(2)} cores busy on average`);
    console.log(`peak RSS during the reduction ${(peakBytes / GiB).toFixed(2)} GiB = ${(peakBytes / 1e9).toFixed(2)} GB (whole process, all threads); during the whole benchmark ${(overallPeakBytes / GiB).toFixed(2)} GiB`);
    console.log(`floor: sharp decode ${floor.decodeMs.toFixed(0)} ms + sharp tiling of one rendition ${floor.tileMs.toFixed(0)} ms = ${floorMs.toFixed(0)} ms`);
    console.log(`(a) reduction / floor = ${(wallMs / floorMs).toFixed(2)}  (aim: at most 4)`);
    const natural = (report.overall as { natural?: { whiteFractionAtLimb?: number } }).natural;
    const frames = report.frames as { name: string; offset: { dn: number; source: string } | null; transmission: number | null; weights: { rejectedFraction: number | null } }[];
    console.log(`natural rendition: ${(100 * (natural?.whiteFractionAtLimb ?? NaN)).toFixed(2)} % of pixels from the limb to 1.1 radii at full white (aim: at most 1 %)`);
    console.log(`offsets: ${frames.map((f) => `${f.offset?.dn ?? "-"} (${f.offset?.source ?? "-"})`).join(", ")}; frames left out: ${report.framesLeftOut.length}`);
    console.log(`(b) our 8-bit merge ${oursMergeMs.toFixed(0)} ms / OpenCV ${opencv.version} MergeDebevec.process ${opencv.processMs.toFixed(0)} ms (${opencv.threads} threads) = ${(oursMergeMs / opencv.processMs).toFixed(2)}  (aim: below 1)`);
    console.log(JSON.stringify({
      bench: "reduction", width: BENCH_WIDTH, height: BENCH_HEIGHT, frames: BENCH_FRAMES, wallMs: Math.round(wallMs), stagesMs: stages,
      cpuS: Number(cpuS.toFixed(2)), coresBusy: Number((cpuS / (wallMs / 1000)).toFixed(2)),
      peakRssBytes: peakBytes, benchPeakRssBytes: overallPeakBytes,
      floorMs: { decode: Math.round(floor.decodeMs), tile: Math.round(floor.tileMs) }, ratioToFloor: Number((wallMs / floorMs).toFixed(3)),
      mergeMs: { ours: Math.round(oursMergeMs), opencvProcess: Math.round(opencv.processMs), opencvRoundTrip: Math.round(opencvRoundTripMs) }, mergeRatio: Number((oursMergeMs / opencv.processMs).toFixed(3)),
    }));
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}

// `npm run bench -- gallery` measures the public gallery instead (needs the app running).
// `npm run bench -- export` measures the print bundle (no services needed).
// `npm run bench -- scale` measures how a reduction grows with the number of frames, in one process and through the app's flow (needs the services).
// `npm run bench -- compose` measures a composite of three 24-megapixel masters (no services needed).
const run = process.argv.includes("scale")
  ? () => import("./bench/scale").then((m) => m.runScaleBench(process.argv.slice(2)))
  : process.argv.includes("compose")
  ? () => import("./bench/compose").then((m) => m.runComposeBench())
  : process.argv.includes("gallery")
    ? () => import("./bench-gallery").then(() => undefined)
    : process.argv.includes("export")
      ? () => import("./bench-export").then(() => undefined)
      : main;
run().catch((error: unknown) => {
  console.error(error instanceof Error ? error.stack : error);
  process.exitCode = 1;
});
