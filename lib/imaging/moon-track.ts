// The Moon's disk in master pixels at each frame's instant. Limb fits of frames
// whose limb is clipped all round are biased (the clipped edge moves inward by
// an amount that depends on the corona's brightness at each position angle), so
// the Moon's path is fitted to the sound frames only: in master pixels (where
// the corona is fixed) the Moon moves in a straight line at a steady rate over a
// bracket's few seconds, x(t) = x0 + vx t, y(t) = y0 + vy t, by least squares.
import type { LimbFit } from "./limb-fit";
import type { LunarDisk } from "./radial";
import { applyAffine, invertAffine, type AffineSimilarity } from "./similarity";

export interface MoonTrackInput {
  limb: LimbFit;
  masterToFrame: AffineSimilarity;
  captureTimeMs?: number;
  exposureS: number;
}

export interface MoonTrack {
  /** Lunar disk in master pixels per frame. */
  disks: LunarDisk[];
  /** How each disk was found: the frame's own sound fit, the fitted path, or the nearest sound frame. */
  sources: ("own-fit" | "path" | "nearest-sound" | "own-doubtful-fit")[];
}

function toMaster(input: MoonTrackInput): LunarDisk {
  const p = applyAffine(invertAffine(input.masterToFrame), input.limb.x, input.limb.y);
  return { x: p.x, y: p.y, radiusPx: input.limb.radiusPx / Math.hypot(input.masterToFrame.a, input.masterToFrame.b) };
}

export function estimateMoonTrack(inputs: MoonTrackInput[]): MoonTrack {
  const own = inputs.map(toMaster);
  const sound = inputs.map((f, i) => i).filter((i) => inputs[i].limb.verdict === "sound");
  if (sound.length === 0) return { disks: own, sources: inputs.map(() => "own-doubtful-fit") };
  const radii = sound.map((i) => own[i].radiusPx).sort((a, b) => a - b);
  const radiusPx = radii[radii.length >> 1];
  const timed = sound.filter((i) => Number.isFinite(inputs[i].captureTimeMs));
  const times = timed.map((i) => inputs[i].captureTimeMs!);
  const canFit = timed.length >= 2 && Math.max(...times) > Math.min(...times);
  let path: ((t: number) => { x: number; y: number }) | null = null;
  if (canFit) {
    const t0 = times.reduce((s, t) => s + t, 0) / times.length;
    let stt = 0, stx = 0, sty = 0, mx = 0, my = 0;
    for (const i of timed) { mx += own[i].x; my += own[i].y; }
    mx /= timed.length;
    my /= timed.length;
    for (const i of timed) {
      const dt = inputs[i].captureTimeMs! - t0;
      stt += dt * dt;
      stx += dt * (own[i].x - mx);
      sty += dt * (own[i].y - my);
    }
    const vx = stx / stt;
    const vy = sty / stt;
    path = (t) => ({ x: mx + vx * (t - t0), y: my + vy * (t - t0) });
  }
  const disks: LunarDisk[] = [];
  const sources: MoonTrack["sources"] = [];
  inputs.forEach((f, i) => {
    if (f.limb.verdict === "sound") {
      disks.push(own[i]);
      sources.push("own-fit");
    } else if (path && Number.isFinite(f.captureTimeMs)) {
      disks.push({ ...path(f.captureTimeMs!), radiusPx });
      sources.push("path");
    } else {
      // Nearest sound frame in time when times are known, else in exposure.
      const key = (k: number) => (Number.isFinite(f.captureTimeMs) && Number.isFinite(inputs[k].captureTimeMs)
        ? Math.abs(inputs[k].captureTimeMs! - f.captureTimeMs!)
        : Math.abs(Math.log(inputs[k].exposureS / f.exposureS)));
      const nearest = sound.reduce((best, k) => (key(k) < key(best) ? k : best), sound[0]);
      disks.push({ x: own[nearest].x, y: own[nearest].y, radiusPx });
      sources.push("nearest-sound");
    }
  });
  return { disks, sources };
}
