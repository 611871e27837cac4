import { describe, expect, it } from "vitest";
import { estimateMoonTrack, type MoonTrackInput } from "@/lib/imaging/moon-track";
import type { LimbFit } from "@/lib/imaging/limb-fit";

function limb(x: number, y: number, verdict: LimbFit["verdict"]): LimbFit {
  return { x, y, radiusPx: 100, rmsPx: 0.05, inlierFraction: 0.9, rayCount: 400, inlierCount: 360, clippedRayCount: 0, verdict, reasons: [] };
}

describe("estimateMoonTrack", () => {
  // The Moon moves 0.4 px/s to the right in master pixels; frame transforms shift by (2, -1).
  const shift = { a: 1, b: 0, tx: 2, ty: -1 };
  const inputs: MoonTrackInput[] = [0, 1, 2, 3].map((s) => ({
    limb: limb(50 + 0.4 * s + 2 + (s >= 2 ? 0.7 : 0), 60 - 1, s >= 2 ? "doubtful" : "sound"),
    masterToFrame: shift,
    captureTimeMs: 1000 * s,
    exposureS: 0.01 * 4 ** s,
  }));

  it("keeps sound fits and puts doubtful frames on the line through the sound ones", () => {
    const track = estimateMoonTrack(inputs);
    expect(track.sources).toEqual(["own-fit", "own-fit", "path", "path"]);
    expect(track.disks[0].x).toBeCloseTo(50, 12);
    expect(track.disks[3].x).toBeCloseTo(51.2, 12);
    expect(track.disks[3].y).toBeCloseTo(60, 12);
  });

  it("falls back to the nearest sound frame without capture times", () => {
    const track = estimateMoonTrack(inputs.map((f) => ({ ...f, captureTimeMs: undefined })));
    expect(track.sources[3]).toBe("nearest-sound");
    expect(track.disks[3].x).toBeCloseTo(50.4, 12);
  });

  it("uses the frames' own fits when none is sound", () => {
    const track = estimateMoonTrack(inputs.map((f) => ({ ...f, limb: { ...f.limb, verdict: "doubtful" as const } })));
    expect(track.sources.every((s) => s === "own-doubtful-fit")).toBe(true);
  });
});
