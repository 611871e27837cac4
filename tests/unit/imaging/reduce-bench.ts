// Benchmark, not a test: prints how reduceBracket's time grows with frame size.
// Run with `npx tsx tests/unit/imaging/reduce-bench.ts [scale]`. A 1500 x 1000
// synthetic bracket of 9 RGB frames is reduced as is, then upsampled by `scale`
// (default 4, giving 6000 x 4000) and reduced again; we print stage timings and
// the time ratio beside the pixel ratio instead of asserting a speed.
import { reduceBracket } from "@/lib/imaging/pipeline";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { DEFAULT_REDUCTION_PARAMS, type LinearFrame } from "@/lib/imaging/types";

const scale = Number(process.argv[2] ?? 4);
const width = 1500;
const height = 1000;
const exposuresS = [1 / 4000, 1 / 1000, 1 / 250, 1 / 60, 1 / 15, 1 / 4, 1, 4, 15].map((t) => t / 4);
const { frames, truth } = synthesizeBracket({
  width, height, channels: 3, exposuresS, sunRadiusPx: 150, seed: 2027,
  shiftsPx: exposuresS.map((_, i) => ({ dx: 0.7 * (i - 4), dy: -0.4 * (i - 4) })),
  rotationsDeg: exposuresS.map((_, i) => 0.03 * (i - 4)),
  moonOffsetPx: { dx: -2, dy: 1 }, moonDriftPxPerFrame: { dx: 0.5, dy: -0.2 },
});

function toLinear(f: (typeof frames)[number], w: number, h: number, planes: Float32Array[]): LinearFrame {
  return { name: f.name, image: { width: w, height: h, planes }, exposureS: f.exposureS, blackLevel: truth.blackLevel, whiteLevel: truth.whiteLevel, encoding: "linear", captureTimeMs: f.captureTimeMs };
}

// Bilinear, so that edges stay smooth as a real lens would draw them at that scale.
function upsample(plane: Float32Array, factor: number): Float32Array {
  const w = width * factor;
  const out = new Float32Array(w * height * factor);
  for (let y = 0; y < height * factor; y++) {
    const v = Math.min(height - 1.001, Math.max(0, (y + 0.5) / factor - 0.5));
    const y0 = Math.floor(v);
    const fy = v - y0;
    for (let x = 0; x < w; x++) {
      const u = Math.min(width - 1.001, Math.max(0, (x + 0.5) / factor - 0.5));
      const x0 = Math.floor(u);
      const fx = u - x0;
      const i = y0 * width + x0;
      const top = plane[i] + fx * (plane[i + 1] - plane[i]);
      const bottom = plane[i + width] + fx * (plane[i + width + 1] - plane[i + width]);
      out[y * w + x] = Math.round(top + fy * (bottom - top));
    }
  }
  return out;
}

function run(label: string, bracket: LinearFrame[]): number {
  const t0 = performance.now();
  const cpu0 = process.cpuUsage();
  const result = reduceBracket(bracket, DEFAULT_REDUCTION_PARAMS);
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0);
  console.log(`${label}: CPU ${((cpu.user + cpu.system) / 1e6).toFixed(1)} s (wall time suffers when other processes share the cores)`);
  const timings = Object.entries(result.overall.timingsMs).map(([k, v]) => `${k} ${(v / 1000).toFixed(1)} s`).join(", ");
  console.log(`${label}: ${(ms / 1000).toFixed(1)} s (${timings}); limb verdicts ${result.frames.map((f) => f.limb.verdict[0]).join("")}`);
  return ms;
}

const small = run(`${width} x ${height} x 9`, frames.map((f) => toLinear(f, width, height, f.planes)));
const big = frames.map((f) => toLinear(f, width * scale, height * scale, f.planes.map((p) => upsample(p, scale))));
frames.length = 0;
const large = run(`${width * scale} x ${height * scale} x 9`, big);
console.log(`time ratio ${(large / small).toFixed(1)} for a pixel ratio of ${scale * scale}`);
