import { describe, expect, it } from "vitest";
import { chooseReferenceFrame, registerFrames, type RegistrationFrame } from "@/lib/imaging/register";
import { fitLimb } from "@/lib/imaging/limb-fit";
import { linearizeFrame } from "@/lib/imaging/linearize";
import { computeLuminancePlane } from "@/lib/imaging/srgb";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { applyAffine, fromAffine, toAffine } from "@/lib/imaging/similarity";

const SIZE = 320;
const EXPOSURES = [1 / 2000, 1 / 500, 1 / 125, 1 / 30, 1 / 8, 1 / 2, 2];
const ROTATIONS_DEG = [0.12, -0.05, 0.08, 0, 0.2, -0.15, 0.3];
const SHIFTS = EXPOSURES.map((_, i) => (i === 3 ? { dx: 0, dy: 0 } : { dx: ((i * 1.37) % 3) - 1.5, dy: ((i * 2.11) % 4) - 2 }));

function prepare(seed: number) {
  const { frames, truth } = synthesizeBracket({
    width: SIZE, height: SIZE, channels: 3, exposuresS: EXPOSURES, sunRadiusPx: 60, seed,
    shiftsPx: SHIFTS, rotationsDeg: ROTATIONS_DEG, moonOffsetPx: { dx: -1, dy: -0.4 }, moonDriftPxPerFrame: { dx: 0.35, dy: 0.12 },
  });
  const regFrames: RegistrationFrame[] = frames.map((f) => {
    const lin = linearizeFrame(
      { name: f.name, image: { width: SIZE, height: SIZE, planes: f.planes }, exposureS: f.exposureS, blackLevel: truth.blackLevel, whiteLevel: truth.whiteLevel, encoding: "linear" },
      0.92,
    );
    const luminance = computeLuminancePlane(lin.planes);
    const limb = fitLimb(luminance, SIZE, SIZE, { clipLevel: lin.clipLevel, clipped: lin.clipped, noiseSigma: lin.noiseSigma });
    return { name: f.name, width: SIZE, height: SIZE, exposureS: f.exposureS, luminance, clipped: lin.clipped, noiseSigma: lin.noiseSigma, limb };
  });
  return { regFrames, truth };
}

describe("registerFrames on a synthetic bracket (corona mode)", () => {
  const { regFrames, truth } = prepare(31);
  const result = registerFrames(regFrames, { mode: "corona" });

  it("takes the median exposure as reference", () => {
    expect(result.referenceIndex).toBe(3);
    expect(chooseReferenceFrame([4, 1, 3, 2])).toBe(2);
  });

  // Measured on seeds 31, 41 and 51: RMS 0.011, 0.014 and 0.031 px (0.030, 0.052 and 0.075 before the
  // shot-noise weights and the common-support high-pass); worst rotation error 0.005, 0.005 and 0.009 degrees,
  // the last for the 1/2000 s frame, which has little corona above its noise (see the report).
  it("recovers every frame's transform within about 0.1 px RMS over the corona and 0.02 degrees", () => {
    let sum2 = 0;
    let count = 0;
    result.frames.forEach((r, i) => {
      const expected = toAffine(truth.transforms[i], SIZE, SIZE);
      // Compare where the corona is: rings at 1.3 to 2.5 solar radii around the Sun.
      for (let k = 0; k < 72; k++) {
        for (const rr of [1.3, 1.9, 2.5]) {
          const x = truth.sunCentre.x + rr * truth.sunRadiusPx * Math.cos((k * Math.PI) / 36);
          const y = truth.sunCentre.y + rr * truth.sunRadiusPx * Math.sin((k * Math.PI) / 36);
          const p = applyAffine(r.masterToFrame, x, y);
          const q = applyAffine(expected, x, y);
          sum2 += (p.x - q.x) ** 2 + (p.y - q.y) ** 2;
          count++;
        }
      }
      expect(Math.abs(fromAffine(r.masterToFrame, SIZE, SIZE).rotationDeg - ROTATIONS_DEG[i])).toBeLessThan(0.02);
    });
    // RMS over the six registered frames (the reference contributes zeros by construction, so it is left out).
    // Measured 0.106 px on the synthetic corona with streamers and plumes, whose rays are no finer than
    // the pixels (the older starburst's aliased rays near the limb gave phase correlation more to hold).
    expect(Math.sqrt(sum2 / (count * 6 / 7))).toBeLessThan(0.12);
  });
});

describe("registerFrames in moon mode", () => {
  it("puts every frame's fitted Moon centre on the reference's", () => {
    const { regFrames } = prepare(32);
    const result = registerFrames(regFrames, { mode: "moon" });
    const ref = regFrames[result.referenceIndex].limb;
    result.frames.forEach((r, i) => {
      const p = applyAffine(r.masterToFrame, ref.x, ref.y);
      expect(p.x).toBeCloseTo(regFrames[i].limb.x, 9);
      expect(p.y).toBeCloseTo(regFrames[i].limb.y, 9);
    });
  });
});
