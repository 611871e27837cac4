import { describe, expect, it } from "vitest";
import { estimateMoonTrack, type MoonTrackInput } from "@/lib/imaging/moon-track";
import type { LimbFit } from "@/lib/imaging/limb-fit";

function limb(x: number, y: number, verdict: LimbFit["verdict"]): LimbFit {
  return { x, y, radiusPx: 100, rmsPx: 0.05, inlierFraction: 0.9, rayCount: 400, inlierCount: 360, clippedRayCount: 0, verdict, reasons: [] };
}

// The Moon moves 0.4 px/s to the right in master pixels; frame transforms shift by (2, -1).
// Frames 2 and 3 have doubtful fits, off by biasPx.
function makeInputs(biasPx: number): MoonTrackInput[] {
  const shift = { a: 1, b: 0, tx: 2, ty: -1 };
  return [0, 1, 2, 3].map((s) => ({
    limb: limb(50 + 0.4 * s + 2 + (s >= 2 ? biasPx : 0), 60 - 1, s >= 2 ? "doubtful" : "sound"),
    masterToFrame: shift,
    captureTimeMs: 1000 * s,
    exposureS: 0.01 * 4 ** s,
  }));
}

describe("estimateMoonTrack", () => {
  it("keeps sound fits and puts doubtful frames on the line through all fits", () => {
    const track = estimateMoonTrack(makeInputs(0));
    expect(track.sources).toEqual(["own-fit", "own-fit", "path", "path"]);
    expect(track.disks[0].x).toBeCloseTo(50, 12);
    expect(track.disks[3].x).toBeCloseTo(51.2, 9);
    expect(track.disks[3].y).toBeCloseTo(60, 9);
  });

  it("lets biased doubtful fits pull the path less than they are off", () => {
    const track = estimateMoonTrack(makeInputs(0.7));
    const error = track.disks[3].x - 51.2;
    expect(error).toBeGreaterThan(0);
    expect(error).toBeLessThan(0.5); // 0.43 px by the weights 1 / 0.05^2 and 1 / 0.2^2, against the fits' 0.7 px
  });

  it("uses a doubtful frame's own fit when times are missing, and every own fit when none is sound", () => {
    const untimed = estimateMoonTrack(makeInputs(0.7).map((f) => ({ ...f, captureTimeMs: undefined })));
    expect(untimed.sources[3]).toBe("own-doubtful-fit");
    expect(untimed.disks[3].x).toBeCloseTo(51.9, 12);
    const none = estimateMoonTrack(makeInputs(0).map((f) => ({ ...f, limb: { ...f.limb, verdict: "doubtful" as const } })));
    expect(none.sources.every((s) => s === "own-doubtful-fit")).toBe(true);
  });
});
