// Registration on the Sun: a 7-frame, 512 px bracket whose Moon moves about
// 3.3 px against the corona over 96 s (the ephemeris motion of 2024 April 8 at
// 25.29 N, 104.14 W, laid into the image at a known orientation), with pointing
// errors of up to 3 px and 0.2 deg between frames and a camera clock 37.5 s ahead.
// Aligned on the Sun, every frame's corona lands where the reference's does;
// aligned on the lunar limb, each frame is off by the Moon's own motion.
import { readFileSync, rmSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseReport, strictReportSchema } from "@/lib/reductions/report-schema";
import { runReductionOnFiles, type ReductionReport } from "@/lib/reduction-runner";
import { applyAffine, toAffine, type SimilarityTransform } from "@/lib/imaging/similarity";
import { CLOCK_AHEAD_S, NORTH_ANGLE_DEG, SUN_SITE, SUN_SIZE_PX, writeSunBracket, type SunBracketFixture } from "./sun-bracket-fixture";

let fixture: SunBracketFixture;
const runs = new Map<string, ReductionReport>();

async function reduce(name: string, registration: "sun" | "moon", northAngleDeg?: number): Promise<ReductionReport> {
  const outDir = join(fixture.dir, "..", `out-${name}`);
  await runReductionOnFiles({
    files: fixture.files, outDir, registration,
    sky: { site: { kind: "fixed", location: SUN_SITE }, clockOffsetS: CLOCK_AHEAD_S, northAngleDeg },
  });
  return JSON.parse(readFileSync(join(outDir, "report.json"), "utf8")) as ReductionReport;
}

beforeAll(async () => {
  fixture = await writeSunBracket();
  runs.set("sun-estimated", await reduce("sun-estimated", "sun"));
  runs.set("sun-given", await reduce("sun-given", "sun", NORTH_ANGLE_DEG - fixture.truth.transforms[3].rotationDeg));
  runs.set("moon", await reduce("moon", "moon"));
}, 180_000);
afterAll(() => rmSync(join(fixture.dir, ".."), { recursive: true, force: true }));

interface FrameOut { name: string; transform: SimilarityTransform }

/**
 * Per frame, RMS over the Sun's centre and 36 corona points at 2 solar radii of
 * |where the master-to-frame map sends the point - where the frame truly shows it|.
 */
function measureCoronaResiduals(report: ReductionReport): number[] {
  const { truth } = fixture;
  const ref = report.frames.findIndex((f) => f.name === report.overall.referenceFrame);
  const sceneToFrame = (i: number) => toAffine(truth.transforms[i], SUN_SIZE_PX, SUN_SIZE_PX);
  const scenePoints = [truth.sunCentre, ...Array.from({ length: 36 }, (_, k) => ({
    x: truth.sunCentre.x + 2 * truth.sunRadiusPx * Math.cos((k * Math.PI) / 18),
    y: truth.sunCentre.y + 2 * truth.sunRadiusPx * Math.sin((k * Math.PI) / 18),
  }))];
  return (report.frames as unknown as FrameOut[]).map((f, i) => {
    const masterToFrame = toAffine(f.transform, SUN_SIZE_PX, SUN_SIZE_PX);
    let sum2 = 0;
    for (const s of scenePoints) {
      const master = applyAffine(sceneToFrame(ref), s.x, s.y); // master pixels are the reference frame's
      const mapped = applyAffine(masterToFrame, master.x, master.y);
      const actual = applyAffine(sceneToFrame(i), s.x, s.y);
      sum2 += (mapped.x - actual.x) ** 2 + (mapped.y - actual.y) ** 2;
    }
    return Math.sqrt(sum2 / scenePoints.length);
  });
}

const rms = (values: number[]) => Math.sqrt(values.reduce((s, v) => s + v * v, 0) / values.length);

describe("registration on the Sun", () => {
  it("the synthetic Moon path follows the ephemeris to far below a pixel (a premise of the checks)", () => {
    expect(fixture.pathNonlinearityPx).toBeLessThan(0.01); // measured 0.0002 px
  });

  it("puts every frame's corona on the reference's within 0.2 px RMS, given the north angle or estimating it", () => {
    for (const name of ["sun-estimated", "sun-given"]) {
      const residuals = measureCoronaResiduals(runs.get(name)!);
      // Measured 0.07 to 0.08 px RMS; the largest frame (the longest exposure, its limb clipped all round) 0.16 px.
      expect(rms(residuals), name).toBeLessThan(0.2);
      expect(Math.max(...residuals), name).toBeLessThan(0.3);
    }
  });

  it("on the lunar limb instead, each frame is off by the Moon's own motion since the reference", () => {
    const report = runs.get("moon")!;
    const residuals = measureCoronaResiduals(report);
    const ref = report.frames.findIndex((f) => f.name === report.overall.referenceFrame);
    const drift = fixture.truth.moonMinusSunPx.map((o) => Math.hypot(o.dx - fixture.truth.moonMinusSunPx[ref].dx, o.dy - fixture.truth.moonMinusSunPx[ref].dy));
    expect(Math.max(...drift)).toBeGreaterThan(1.5); // the full drift to either end of the set: 1.6 px here
    // The residual is the drift itself, to within the limb fits' own error (measured up to 0.09 px).
    residuals.forEach((r, i) => expect(Math.abs(r - drift[i]), String(report.frames[i].name)).toBeLessThan(0.2));
  });

  it("states the Sun's centre, the orientation and the Moon silhouette's instant", () => {
    const { truth, trueStartsMs, exposuresS } = fixture;
    const report = runs.get("sun-estimated")!;
    const sky = report.overall.sky as Record<string, never>;
    const ref = report.frames.findIndex((f) => f.name === report.overall.referenceFrame);
    const sunInMaster = applyAffine(toAffine(truth.transforms[ref], SUN_SIZE_PX, SUN_SIZE_PX), truth.sunCentre.x, truth.sunCentre.y);
    const sun = sky.sunCentrePx as { x: number; y: number };
    expect(Math.hypot(sun.x - sunInMaster.x, sun.y - sunInMaster.y)).toBeLessThan(0.2); // measured 0.006 px
    // North in master pixels: the scene's north angle less the reference frame's own turn (clockwise positive).
    const expectedNorth = NORTH_ANGLE_DEG - truth.transforms[ref].rotationDeg;
    expect(sky.northAngleSource).toBe("estimated");
    // The estimate's own sigma (2.3 deg here: the Moon moves 3.3 px and limb centres scatter by about 0.1 px); within 3 sigma.
    expect(Math.abs((sky.northAngleDeg as number) - expectedNorth)).toBeLessThan(3 * (sky.northAngleSigmaDeg as number));
    expect(runs.get("sun-given")!.overall.sky).toMatchObject({ northAngleSource: "given", northAngleSigmaDeg: null });
    // The silhouette is the reference frame's, at its true mid-exposure (camera time less the clock offset).
    expect(Date.parse(sky.moonSilhouetteUtc)).toBeCloseTo(trueStartsMs[ref] + exposuresS[ref] * 500, -1);
    expect(report.frames[0].captureTimeUtc).toBe(new Date(trueStartsMs[0]).toISOString());
  });

  it("writes report.json as its contract says: the strict schema passes every run's report, every section present", () => {
    for (const [mode, report] of runs) {
      const parsed = strictReportSchema.safeParse(report);
      expect(parsed.error?.issues ?? [], mode).toEqual([]);
      // The lenient reader gives the same values back for a current report.
      expect(parseReport(report).overall.sky?.registrationMode, mode).toBe(report.overall.sky?.registrationMode);
      expect(parseReport(report).overall.radialProfile?.rings.length, mode).toBe(report.overall.radialProfile?.rings.length);
    }
  });
});
