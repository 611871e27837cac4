// Benchmark of a composite: three masters of 6000 x 4000 (three colour planes),
// a long lens at 2 arcsec/px, a middle one at 3 turned 12 deg with another
// observer's Moon, a short one at 4 turned -8 deg, made once from the synthetic
// corona (lib/imaging/synth-composite.ts) and cached in .cache/. Prints the
// composite's stage times, its peak memory, and its ratio to a floor measured in
// the same run: reading the three masters (FITS) plus sharp tiling one rendition.
// Run: npm run bench -- compose
import { existsSync, mkdirSync, mkdtempSync, renameSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { readFits } from "@/lib/media";
import { encodeSyntheticMaster } from "../lib-synth/write-master";
import { createSharp } from "@/lib/media/sharp-setup";
import { runCompositeOnFiles } from "@/lib/composite-runner";
import { createSky, renderMaster, type KitSpec } from "@/lib/imaging/synth-composite";
import { startMemorySampler } from "./memory-sampler";

const GiB = 1024 ** 3;
const WIDTH = 6000, HEIGHT = 4000;
const KITS: KitSpec[] = [
  { name: "long.fits", width: WIDTH, height: HEIGHT, scaleArcsecPerPx: 2, solarNorthDeg: 0, gain: 1, moonArcsec: { lon: 12, lat: -6 }, noiseScale: 4, seed: 1, subsamples: 1, planeGains: [1.1, 1, 0.8] },
  { name: "middle.fits", width: WIDTH, height: HEIGHT, scaleArcsecPerPx: 3, solarNorthDeg: 12, gain: 1.4, moonArcsec: { lon: -30, lat: 25 }, noiseScale: 9, seed: 2, subsamples: 1, planeGains: [1.05, 1, 0.85] },
  { name: "short.fits", width: WIDTH, height: HEIGHT, scaleArcsecPerPx: 4, solarNorthDeg: -8, gain: 0.7, moonArcsec: { lon: 12, lat: -6 }, noiseScale: 16, seed: 3, subsamples: 1, planeGains: [1.1, 1, 0.8] },
];

/** The masters as a reduction writes them: planes, the helioprojective WCS cards, the Moon and the time. */
async function prepareMasters(dir: string): Promise<{ files: string[]; madeS: number }> {
  const files = KITS.map((k) => join(dir, k.name));
  if (files.every((f) => existsSync(f))) return { files, madeS: 0 };
  mkdirSync(dir, { recursive: true });
  const started = performance.now();
  const sky = createSky(5);
  for (const [k, kit] of KITS.entries()) {
    process.stdout.write(`making ${kit.name} (${k + 1} of ${KITS.length})\n`);
    const { input } = renderMaster(sky, kit);
    // Written beside, then moved into place: a bench stopped half-way leaves no master that looks whole.
    writeFileSync(`${files[k]}.partial`, encodeSyntheticMaster(input, "2027-08-02T10:07:30.000", ["Master for the composite benchmark."]));
    renameSync(`${files[k]}.partial`, files[k]);
  }
  return { files, madeS: (performance.now() - started) / 1000 };
}

export async function runComposeBench(): Promise<void> {
  const cache = join(process.cwd(), ".cache", "bench-compose-6000x4000-v1");
  const masters = await prepareMasters(cache);
  const scratch = mkdtempSync(join(tmpdir(), "crownlight-bench-compose-"));
  try {
    const sampler = startMemorySampler();
    const cpuBefore = process.cpuUsage();
    const started = performance.now();
    const outDir = join(scratch, "composite");
    const { report } = await runCompositeOnFiles({ files: masters.files, outDir });
    const wallMs = performance.now() - started;
    const cpu = process.cpuUsage(cpuBefore);
    const peakBytes = await sampler.stop();

    // The floor: what any composite must at least do, read the inputs and tile one picture of the result.
    let lap = performance.now();
    for (const file of masters.files) await readFits(file, file);
    const readMs = performance.now() - lap;
    lap = performance.now();
    await createSharp(join(outDir, "natural.png")).toColourspace("srgb").jpeg({ quality: 90 }).tile({ layout: "dz", size: 254, overlap: 1 }).toFile(join(scratch, "floor.dz"));
    const tileMs = performance.now() - lap;
    const floorMs = readMs + tileMs;

    const g = report.grid;
    const cpuS = (cpu.user + cpu.system) / 1e6;
    console.log(`\nCrownlight composite benchmark: ${KITS.length} masters of ${WIDTH} x ${HEIGHT}, three planes${masters.madeS ? ` (made in ${masters.madeS.toFixed(0)} s)` : " (cached)"}`);
    console.log(`composite ${g.width} x ${g.height} px (${((g.width * g.height) / 1e6).toFixed(0)} megapixels) at ${g.scaleArcsecPerPx} arcsec/px\n`);
    console.log("stage                         ms");
    for (const [stage, ms] of Object.entries(report.timingsMs)) console.log(`  ${stage.padEnd(24)} ${String(ms).padStart(8)}`);
    for (const input of report.inputs) {
      console.log(`  ${input.name}: factors ${input.factors.map((f) => f.toFixed(3)).join("/")}, refinement ${Math.hypot(input.refinement.lonArcsec, input.refinement.latArcsec).toFixed(2)} arcsec, ${(100 * input.weightShare).toFixed(1)} % of the weight`);
    }
    console.log(`\nCPU ${cpuS.toFixed(1)} s over ${(wallMs / 1000).toFixed(1)} s wall: ${(cpuS / (wallMs / 1000)).toFixed(2)} cores busy on average`);
    console.log(`peak RSS ${(peakBytes / GiB).toFixed(2)} GiB (whole process); the composite's own report says ${(report.peakRssBytes / GiB).toFixed(2)} GiB`);
    console.log(`floor: reading the three masters ${readMs.toFixed(0)} ms + sharp tiling of one rendition ${tileMs.toFixed(0)} ms = ${floorMs.toFixed(0)} ms`);
    console.log(`composite over floor: ${(wallMs / floorMs).toFixed(1)}`);
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}
