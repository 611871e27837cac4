// Registration as independent pairs composed down the tree from the reference
// (register.ts): accuracy against the synthetic truth on a bracket with repeated
// exposures and frames that cannot be placed, what happens to a frame whose
// chosen neighbour turns out not to be placed, and a bracket registered before its
// offsets are known, against the chain.
import { describe, expect, it } from "vitest";
import { fitLimb } from "@/lib/imaging/limb-fit";
import { linearizeFrame } from "@/lib/imaging/linearize";
import { prepareFrame } from "@/lib/imaging/frame-stage";
import { createRng } from "@/lib/imaging/random";
import { chooseReferenceFrame, refineRegistrationPair, registerFramesInSteps, runRegistrationSteps, type Registration, type RegistrationFrame, type RegistrationPairTask } from "@/lib/imaging/register";
import { applyAffine, composeAffine, fromAffine, invertAffine, toAffine, type AffineSimilarity } from "@/lib/imaging/similarity";
import { computeLuminancePlane } from "@/lib/imaging/srgb";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { DEFAULT_REDUCTION_PARAMS } from "@/lib/imaging/types";
import { measureCoronaRmsPx } from "@/tests/support/registration-truth";

const WIDTH = 320;
const HEIGHT = 256;
const SUN_RADIUS_PX = 32;
// Nine exposures log-spaced from 1/2000 s to 1 s (the scale bench's ladder), taken twice.
const LADDER = [0.0005, 0.001293, 0.003344, 0.008647, 0.02236, 0.05782, 0.1495, 0.3867, 1];
const EXPOSURES = [...LADDER, ...LADDER];
/** A fogged frame: flat light well above the noise everywhere, no limb, no corona. Every frame after it overlaps it most. */
const FOGGED = 5;
/** A frame at the black level (lens cap): no limb, nothing well exposed. */
const CAPPED = 11;
/** Saturated everywhere but the dark Moon: its limb is found, its corona is not there to compare. */
const SATURATED = 16;

function makeBracket(): { frames: RegistrationFrame[]; expected: (referenceIndex: number, i: number) => AffineSimilarity; centre: (referenceIndex: number) => { x: number; y: number } } {
  // Deterministic pointing errors of up to 2 px and rolls of up to 0.2 degrees.
  const shiftsPx = EXPOSURES.map((_, i) => ({ dx: 2 * Math.sin(1.7 * i + 0.3), dy: 2 * Math.cos(2.3 * i + 1.1) }));
  const rotationsDeg = EXPOSURES.map((_, i) => 0.2 * Math.sin(0.9 * i + 0.5));
  const { frames, truth } = synthesizeBracket({
    width: WIDTH, height: HEIGHT, channels: 3, exposuresS: EXPOSURES, sunRadiusPx: SUN_RADIUS_PX, seed: 12,
    shiftsPx, rotationsDeg, moonOffsetPx: { dx: -1, dy: -0.4 }, moonDriftPxPerFrame: { dx: 0.05, dy: 0.02 },
  });
  const { blackLevel, whiteLevel } = truth;
  const registration = frames.map((f, i): RegistrationFrame => {
    let planes = f.planes;
    if (i === FOGGED) planes = planes.map((p) => p.map(() => blackLevel + 0.4 * (whiteLevel - blackLevel)));
    if (i === CAPPED) planes = planes.map((p) => p.map(() => blackLevel));
    if (i === SATURATED) {
      const moon = truth.moonInFrame[i];
      planes = planes.map((p) => p.map((_, j) => (Math.hypot((j % WIDTH) - moon.x, Math.floor(j / WIDTH) - moon.y) < truth.moonRadiusPx ? blackLevel : whiteLevel)));
    }
    const lin = linearizeFrame({ name: f.name, image: { width: WIDTH, height: HEIGHT, planes }, exposureS: f.exposureS, blackLevel, whiteLevel, encoding: "linear" }, DEFAULT_REDUCTION_PARAMS.clipFraction);
    const luminance = computeLuminancePlane(lin.planes);
    const limb = fitLimb(luminance, WIDTH, HEIGHT, { clipLevel: lin.clipLevel, clipped: lin.clipped, noiseSigma: lin.noiseSigma });
    return {
      name: f.name, width: WIDTH, height: HEIGHT, exposureS: f.exposureS, luminance, clipped: lin.clipped, noiseSigma: lin.noiseSigma,
      limb: limb.verdict === "failed" ? { x: NaN, y: NaN, radiusPx: NaN } : { x: limb.x, y: limb.y, radiusPx: limb.radiusPx },
    };
  });
  // The master is the reference frame: frame i's true master-to-frame map is truth_i o truth_ref^-1.
  const expected = (ref: number, i: number) => composeAffine(toAffine(truth.transforms[i], WIDTH, HEIGHT), invertAffine(toAffine(truth.transforms[ref], WIDTH, HEIGHT)));
  const centre = (ref: number) => applyAffine(toAffine(truth.transforms[ref], WIDTH, HEIGHT), truth.sunCentre.x, truth.sunCentre.y);
  return { frames: registration, expected, centre };
}

/** RMS distance between two maps over the corona (master px). */
const measureRmsPx = (found: AffineSimilarity, expected: AffineSimilarity, centre: { x: number; y: number }) => measureCoronaRmsPx(found, expected, centre, SUN_RADIUS_PX);

describe("registration as pairs composed from the reference", () => {
  const { frames, expected, centre } = makeBracket();
  // Every batch of pairs the steps hand out, as (frame, neighbour, window width) by name.
  const batches: { frame: string; neighbour: string; width: number; second: boolean }[][] = [];
  const steps = registerFramesInSteps(frames, { mode: "corona", form: "pairs" });
  let next = steps.next();
  while (!next.done) {
    const batch = next.value;
    const tasks: RegistrationPairTask[] = Array.from({ length: batch.count }, (_, k) => batch.task(k));
    batches.push(tasks.map((t) => ({ frame: t.frame.name, neighbour: t.neighbour.name, width: t.region.width, second: t.searchTranslation === false })));
    next = steps.next(tasks.map(refineRegistrationPair));
  }
  const result: Registration = next.value;
  const ref = result.referenceIndex;
  const name = (i: number) => frames[i].name;

  it("leaves out the frames that neither the corona nor their limb place, and places the saturated one by its limb", () => {
    expect(result.frames[FOGGED].method).toBe("failed");
    expect(result.frames[CAPPED].method).toBe("failed");
    expect(result.frames[SATURATED].method).toBe("limb");
    expect(result.frames.filter((r) => r.method === "corona")).toHaveLength(EXPOSURES.length - 4);
  });

  // Measured (this bracket): RMS 0.066 px over the 14 frames placed on the corona, worst frame
  // 0.197 px, worst roll 0.057 degrees. The budget is the existing tests' (register.test.ts): 0.1 px
  // RMS is what the merge needs; a single short frame, with little corona above its noise, may reach 0.3.
  // Against the chain this replaced (each frame against its neighbour at the neighbour's refined map),
  // on brackets of 9 to 36 frames with repeats and unplaceable frames and on the scale bench's frames:
  // DEVELOPERS.md, "Registration as pairs".
  it("places every frame on the corona within 0.1 px RMS of the truth, through trees several pairs deep", () => {
    const errors: number[] = [];
    result.frames.forEach((r, i) => {
      if (r.method !== "corona") return;
      errors.push(measureRmsPx(r.masterToFrame, expected(ref, i), centre(ref)));
      expect(Math.abs(fromAffine(r.masterToFrame, WIDTH, HEIGHT).rotationDeg - fromAffine(expected(ref, i), WIDTH, HEIGHT).rotationDeg)).toBeLessThan(0.1);
    });
    expect(Math.sqrt(errors.reduce((s, e) => s + e * e, 0) / errors.length)).toBeLessThan(0.1);
    expect(Math.max(...errors)).toBeLessThan(0.3);
    // Depth of the tree: the longest path of comparisons from a frame to the reference.
    const depth = (i: number): number => (i === ref ? 0 : 1 + depth(result.frames[i].neighbour));
    expect(Math.max(...result.frames.map((r, i) => (r.method === "corona" ? depth(i) : 0)))).toBeGreaterThanOrEqual(4);
  });

  it("chooses every neighbour before comparing, all pairs at once, compares again a frame whose neighbour was not placed, and then each frame against its placed neighbour", () => {
    const [first] = batches;
    // One pair per frame but the reference; the fogged frame is chosen by the frames after it (it overlaps them most).
    expect(first).toHaveLength(EXPOSURES.length - 1);
    const orphans = first.filter((p) => p.neighbour === name(FOGGED)).map((p) => p.frame);
    expect(orphans.length).toBeGreaterThan(0);
    for (const frame of orphans) {
      const i = frames.findIndex((f) => f.name === frame);
      const final = result.frames[i];
      // Compared again, in a later batch, with a frame that is placed: the one it reports.
      const again = batches.slice(1).flat().filter((p) => p.frame === frame);
      expect(again.length).toBeGreaterThan(0);
      expect(again[again.length - 1].neighbour).toBe(name(final.neighbour));
      expect(final.method).toBe("corona");
    }
    // The orphans' new comparisons run side by side, not one batch each.
    const orphanRound = batches.slice(1).filter((b) => b.some((p) => !p.second && orphans.includes(p.frame) && p.width === first.find((q) => q.frame === p.frame)!.width));
    expect(orphanRound).toHaveLength(1);
    // Last, one batch compares again every frame whose neighbour was placed on the corona, the neighbour held at its composed map.
    const last = batches[batches.length - 1];
    expect(last.every((p) => p.second)).toBe(true);
    expect(batches.slice(0, -1).flat().some((p) => p.second)).toBe(false);
    const againstCorona = result.frames.map((r, i) => (r.method === "corona" && result.frames[r.neighbour].method === "corona" ? name(i) : "")).filter(Boolean);
    expect(last.map((p) => p.frame).sort()).toEqual(againstCorona.sort());
    // No frame placed on the corona reports an unplaced neighbour.
    for (const r of result.frames) if (r.method === "corona") expect(["corona", "limb", "reference"]).toContain(result.frames[r.neighbour].method);
  });
});

describe("the chain (the default form), its pairs in batches tree level by tree level", () => {
  const { frames, expected, centre } = makeBracket();
  // Every batch as (frame, neighbour, where the neighbour was held, window width) by name.
  const batches: { frame: string; neighbour: string; held: AffineSimilarity; width: number }[][] = [];
  const steps = registerFramesInSteps(frames, { mode: "corona" });
  let next = steps.next();
  while (!next.done) {
    const batch = next.value;
    const tasks: RegistrationPairTask[] = Array.from({ length: batch.count }, (_, k) => batch.task(k));
    batches.push(tasks.map((t) => ({ frame: t.frame.name, neighbour: t.neighbour.name, held: t.neighbourStart, width: t.region.width })));
    next = steps.next(tasks.map(refineRegistrationPair));
  }
  const result: Registration = next.value;
  const ref = result.referenceIndex;
  const indexOf = (name: string) => frames.findIndex((f) => f.name === name);

  it("holds each neighbour at its refined map, as one pair at a time would, and never at a frame left unplaced", () => {
    expect(result.frames[FOGGED].method).toBe("failed");
    expect(result.frames[CAPPED].method).toBe("failed");
    const compared = batches.flat();
    for (const pair of compared) {
      const n = indexOf(pair.neighbour);
      // The neighbour was done before this batch, and its map then is its final map.
      expect(result.frames[n].method).not.toBe("failed");
      expect(pair.held).toEqual(result.frames[n].masterToFrame);
      const before = batches.findIndex((b) => b.some((p) => p.frame === pair.frame));
      if (n !== ref) expect(batches.findIndex((b) => b.some((p) => p.frame === pair.neighbour))).toBeLessThan(before);
    }
    // Each frame but the reference compared once on the usual window (again on the wide one only when that failed).
    const usualWidth = Math.min(...compared.map((p) => p.width));
    const once = compared.filter((p) => p.width === usualWidth).map((p) => p.frame).sort();
    expect(once).toEqual(frames.map((f) => f.name).filter((_, i) => i !== ref).sort());
    for (const [i, r] of result.frames.entries()) if (r.method === "corona") expect(compared.some((p) => p.frame === frames[i].name && p.neighbour === frames[r.neighbour].name)).toBe(true);
  });

  it("compares the frames of one tree level side by side: fewer batches than frames, and within the accuracy of the chain", () => {
    expect(batches.length).toBeLessThan(frames.length / 2);
    expect(Math.max(...batches.map((b) => b.length))).toBeGreaterThan(2);
    const errors = result.frames.flatMap((r, i) => (r.method === "corona" ? [measureRmsPx(r.masterToFrame, expected(ref, i), centre(ref))] : []));
    // Batching changes nothing the chain finds: on this bracket it measured 0.1033 px RMS one pair at
    // a time and 0.1033 in batches (the same maps, compared to the last bit on the scale bench's 27
    // frames). It is above register.test.ts's 0.1 because of the unplaceable frames (the pairs' two
    // rounds: 0.066). 0.12 is the chain's own error on this bracket with a little room; that the
    // batches hold each neighbour where one pair at a time would is the test above.
    expect(Math.sqrt(errors.reduce((s, e) => s + e * e, 0) / errors.length)).toBeLessThan(0.12);
  });
});

// Before the offsets are known (the plan's first registration, bracket-plan.ts), every frame's
// counts still hold the camera's pedestal of some 300 DN. log(I / t) of two exposures is then not
// the same corona moved, and a comparison does not converge: each Gauss-Newton step moves the frame
// a few hundredths of a pixel more, up to the iteration limit, so where the comparison starts
// decides where it ends. The offsets and transmissions are solved on this registration, so it must
// be no worse in pairs than in the chain. The bracket is real-brackets.test.ts's ladder to 4 s with
// a passing cloud (same seed and pointing errors), registered as the plan first registers it.
describe("registration as pairs before the offsets are known", () => {
  const SIZE = 256;
  const exposuresS = [1 / 4000, 1 / 1000, 1 / 250, 1 / 60, 1 / 15, 1 / 4, 1, 4];
  const seed = 31;
  const rng = createRng(seed);
  const ref = chooseReferenceFrame(exposuresS);
  const shiftsPx = exposuresS.map((_, i) => (i === ref ? { dx: 0, dy: 0 } : { dx: (rng() - 0.5) * 5, dy: (rng() - 0.5) * 5 }));
  const rotationsDeg = exposuresS.map((_, i) => (i === ref ? 0 : (rng() - 0.5) * 0.3));
  const { frames, truth } = synthesizeBracket({
    width: SIZE, height: SIZE, channels: 3, exposuresS, sunRadiusPx: 30, seed, shiftsPx, rotationsDeg,
    whiteLevel: 16383, readNoiseDn: 1.5, electronsPerDn: 10,
    blackLevels: exposuresS.map(() => 300 + Math.round(6 * rng())),
    moonDriftPxPerFrame: { dx: 0.02, dy: -0.01 },
    clouds: [{ frame: 5, transmission: 0.55 }],
  });
  // The offset unknown: black level 0, as a FITS file without offset cards gives it.
  const registration = frames.map((f): RegistrationFrame => {
    const { linear, luminance, limb } = prepareFrame({ name: f.name, image: { width: SIZE, height: SIZE, planes: f.planes }, exposureS: f.exposureS, blackLevel: 0, blackLevelSource: "none", whiteLevel: truth.whiteLevel, encoding: "linear" }, DEFAULT_REDUCTION_PARAMS);
    return {
      name: f.name, width: SIZE, height: SIZE, exposureS: f.exposureS, luminance, clipped: linear.clipped, noiseSigma: linear.noiseSigma,
      limb: limb.verdict === "failed" ? { x: NaN, y: NaN, radiusPx: NaN } : { x: limb.x, y: limb.y, radiusPx: limb.radiusPx },
    };
  });
  const expected = (i: number) => composeAffine(toAffine(truth.transforms[i], SIZE, SIZE), invertAffine(toAffine(truth.transforms[ref], SIZE, SIZE)));
  const centre = applyAffine(toAffine(truth.transforms[ref], SIZE, SIZE), truth.sunCentre.x, truth.sunCentre.y);
  const errorsOf = (result: Registration) => result.frames.map((r, i) => (i === ref ? 0 : measureCoronaRmsPx(r.masterToFrame, expected(i), centre, truth.sunRadiusPx)));
  const rms = (errors: number[]) => Math.sqrt(errors.reduce((s, e) => s + e * e, 0) / (errors.length - 1));
  const chain = errorsOf(runRegistrationSteps(registerFramesInSteps(registration, { mode: "corona", form: "chain" })));
  const pairs = errorsOf(runRegistrationSteps(registerFramesInSteps(registration, { mode: "corona", form: "pairs" })));

  // Measured: chain 0.76 px RMS, the worst frame (4 s) 1.29 px; pairs 0.74 px, worst 1.38 px. The second
  // round started at the composed maps instead (the form as first written): 1.36 px RMS, worst 2.38 px,
  // and the bracket's seam figure in real-brackets.test.ts rose from 0.0012 to 0.0027 through the
  // offsets and transmission solved on it. The margins (10 % on the RMS, 25 % on the worst frame) are
  // room for one bracket's noise, ours; that start fails both by a factor of 1.8.
  it("places the frames no farther from the truth than the chain does", () => {
    expect(rms(pairs)).toBeLessThan(1.1 * rms(chain));
    expect(Math.max(...pairs)).toBeLessThan(1.25 * Math.max(...chain));
  });
});
