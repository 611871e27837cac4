// The reach of a frame (radii where its corona is well exposed), checked on
// images whose radial profile is known in closed form, so the expected band
// follows from the definition: above the noise floor and below the clip level
// (0.92 of the white level, the imaging core's rule).
import { describe, expect, it } from "vitest";
import { analyseFrame, shrinkLinearLuminance } from "@/lib/bracket-sets/frame-analysis";
import { measureReach, REACH_RING_STEP } from "@/lib/bracket-sets/frame-reach";
import { synthesizeBracket } from "@/lib/imaging/synth-model";

const SIZE = 512;
const R = 20;
const C0 = { x: 255.5, y: 255.5 };
const WHITE = 65535;
const PEDESTAL = 100;

/** A dark disk of radius R on a pedestal, and outside it pedestal + a (r/R)^-3 DN. */
function radialFrame(a: number) {
  const plane = new Float32Array(SIZE * SIZE);
  for (let y = 0; y < SIZE; y++) {
    for (let x = 0; x < SIZE; x++) {
      const r = Math.hypot(x - C0.x, y - C0.y) / R;
      plane[y * SIZE + x] = PEDESTAL + (r < 1 ? 0 : Math.min(WHITE - PEDESTAL, a * r ** -3));
    }
  }
  return { width: SIZE, height: SIZE, planes: [plane] };
}

const limb = { cx: C0.x, cy: C0.y, radiusPx: R, rmsPx: 0.1, quality: "good" as const };
const frame = { encoding: "linear" as const, blackLevel: 0, whiteLevel: WHITE };

describe("frame reach", () => {
  it("starts where the profile falls below the clip level", () => {
    // Clipped while pedestal + a r^-3 >= 0.92 x 65535, i.e. r <= (a / (60292.2 - 100))^(1/3) = 1.184 for a = 1e5.
    const reach = measureReach(shrinkLinearLuminance(radialFrame(1e5), frame), limb, "linear")!;
    const clipEnd = (1e5 / (0.92 * WHITE - PEDESTAL)) ** (1 / 3);
    expect(reach.clippedToR).not.toBeNull();
    expect(Math.abs(reach.clippedToR! - clipEnd)).toBeLessThanOrEqual(REACH_RING_STEP + 0.01);
    expect(Math.abs(reach.fromR! - clipEnd)).toBeLessThanOrEqual(REACH_RING_STEP + 0.01);
    // Bright to the frame's edge: the reach ends where the rings leave the frame.
    expect(reach.toR).toBe(reach.edgeR);
    expect(reach.edgeR).toBeGreaterThan(255.5 / R - 0.1);
  });

  it("ends where the profile sinks into the noise floor", () => {
    // A noise-free disk leaves the floor at the quantisation step (1 DN of a 16-bit white level): a r^-3 > 1 while r < 1000^(1/3) = 10.
    const reach = measureReach(shrinkLinearLuminance(radialFrame(1000), frame), limb, "linear")!;
    expect(reach.clippedToR).toBeNull();
    expect(reach.fromR).toBe(1);
    expect(Math.abs(reach.toR! - 10)).toBeLessThanOrEqual(REACH_RING_STEP + 0.01);
  });

  it("raises the floor with the disk's noise, so a noisy frame reaches less far", () => {
    const quiet = radialFrame(1000);
    const noisy = radialFrame(1000);
    // Uniform noise of half-width 10 DN from a fixed linear congruential sequence. Its median absolute
    // deviation is 5 DN, which the robust estimate 1.4826 x MAD reads as a sigma of 7.41 DN.
    let s = 12345;
    for (let i = 0; i < noisy.planes[0].length; i++) {
      s = (s * 1103515245 + 12345) % 2 ** 31;
      noisy.planes[0][i] += (s / 2 ** 31 - 0.5) * 20;
    }
    const a = measureReach(shrinkLinearLuminance(quiet, frame), limb, "linear")!;
    const b = measureReach(shrinkLinearLuminance(noisy, frame), limb, "linear")!;
    // Floor 3 x 7.41 = 22.2 DN above the pedestal: a r^-3 > 22.2 while r < (1000 / 22.2)^(1/3) = 3.56.
    expect(b.toR!).toBeLessThan(a.toR!);
    expect(Math.abs(b.toR! - (1000 / (3 * 1.4826 * 5)) ** (1 / 3))).toBeLessThanOrEqual(REACH_RING_STEP + 0.02);
  });

  it("orders a synthetic bracket: longer exposures reach farther out and clip farther in", () => {
    const { frames, truth } = synthesizeBracket({ width: 384, height: 320, channels: 1, exposuresS: [1 / 1000, 1 / 125, 1 / 15, 1 / 2], sunRadiusPx: 36, seed: 7, whiteLevel: 16383 });
    const reaches = frames.map((f) => analyseFrame({ width: 384, height: 320, planes: f.planes }, { encoding: "linear", blackLevel: truth.blackLevel, whiteLevel: truth.whiteLevel }).reach);
    expect(reaches.every((r) => r !== undefined && r.toR !== null)).toBe(true);
    for (let i = 1; i < reaches.length; i++) {
      expect(reaches[i]!.toR!).toBeGreaterThanOrEqual(reaches[i - 1]!.toR!);
      expect(reaches[i]!.fromR!).toBeGreaterThanOrEqual(reaches[i - 1]!.fromR!);
    }
    expect(reaches[0]!.clippedToR).toBeNull();
    expect(reaches[3]!.clippedToR).not.toBeNull();
  });
});
