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
  /** How each disk was found: the frame's own sound fit, the fitted path, or (without times) its own doubtful fit. */
  sources: ("own-fit" | "path" | "own-doubtful-fit")[];
}

function toMaster(input: MoonTrackInput): LunarDisk {
  const p = applyAffine(invertAffine(input.masterToFrame), input.limb.x, input.limb.y);
  return { x: p.x, y: p.y, radiusPx: input.limb.radiusPx / Math.hypot(input.masterToFrame.a, input.masterToFrame.b) };
}

/** Uncertainty of a Moon centre in master pixels: the Cramer-Rao term 2 rms^2 / n of the fit plus a floor; doubtful fits get the clipping bias measured on synthetic brackets (about 0.2 px). */
function computeCentreSigma(limb: LimbFit): number {
  const statistical = (2 * limb.rmsPx * limb.rmsPx) / Math.max(3, limb.inlierCount);
  // The sound floor stands for registration error of the frame (a few hundredths of a pixel for short, noisy exposures).
  const floor = limb.verdict === "sound" ? 0.05 : 0.2;
  return Math.sqrt(statistical + floor * floor);
}

export function estimateMoonTrack(inputs: MoonTrackInput[]): MoonTrack {
  const own = inputs.map(toMaster);
  const sound = inputs.map((f, i) => i).filter((i) => inputs[i].limb.verdict === "sound");
  if (sound.length === 0) {
    const found = own.filter((d) => Number.isFinite(d.x) && Number.isFinite(d.radiusPx));
    const pick = (key: "x" | "y" | "radiusPx") => found.map((d) => d[key]).sort((a, b) => a - b)[found.length >> 1];
    const fallback = found.length > 0 ? { x: pick("x"), y: pick("y"), radiusPx: pick("radiusPx") } : { x: NaN, y: NaN, radiusPx: NaN };
    return { disks: own.map((d) => (Number.isFinite(d.x) ? d : fallback)), sources: inputs.map(() => "own-doubtful-fit") };
  }
  const radii = sound.map((i) => own[i].radiusPx).sort((a, b) => a - b);
  const radiusPx = radii[radii.length >> 1];
  // Weighted least squares of x(t) and y(t) over every timed fit, weights 1 / sigma^2:
  // sound fits anchor the line, doubtful ones mostly lend it a slope.
  const timed = inputs.map((f, i) => i).filter((i) => Number.isFinite(inputs[i].captureTimeMs) && inputs[i].limb.verdict !== "failed");
  const times = timed.map((i) => inputs[i].captureTimeMs!);
  const canFit = timed.length >= 2 && Math.max(...times) > Math.min(...times);
  let path: ((t: number) => { x: number; y: number }) | null = null;
  if (canFit) {
    let sw = 0, st = 0, sx = 0, sy = 0;
    for (const i of timed) {
      const w = 1 / computeCentreSigma(inputs[i].limb) ** 2;
      sw += w;
      st += w * inputs[i].captureTimeMs!;
      sx += w * own[i].x;
      sy += w * own[i].y;
    }
    const t0 = st / sw, mx = sx / sw, my = sy / sw;
    let stt = 0, stx = 0, sty = 0;
    for (const i of timed) {
      const w = 1 / computeCentreSigma(inputs[i].limb) ** 2;
      const dt = inputs[i].captureTimeMs! - t0;
      stt += w * dt * dt;
      stx += w * dt * (own[i].x - mx);
      sty += w * dt * (own[i].y - my);
    }
    const vx = stt > 0 ? stx / stt : 0;
    const vy = stt > 0 ? sty / stt : 0;
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
    } else if (Number.isFinite(own[i].x) && Number.isFinite(own[i].y)) {
      // Without times the Moon's motion is unknown: the frame's own fit, on the sound radius.
      disks.push({ x: own[i].x, y: own[i].y, radiusPx });
      sources.push("own-doubtful-fit");
    } else {
      // No limb of its own and no times: the Moon where the sound fits put it (it moves well under a radius in a bracket).
      const xs = sound.map((k) => own[k].x).sort((a, b) => a - b);
      const ys = sound.map((k) => own[k].y).sort((a, b) => a - b);
      disks.push({ x: xs[xs.length >> 1], y: ys[ys.length >> 1], radiusPx });
      sources.push("path");
    }
  });
  return { disks, sources };
}
