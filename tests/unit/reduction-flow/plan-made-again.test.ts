// The flow's plan (plan-stage.ts planFromFiles) keeps each frame's prepared arrays on
// local disk, or, when they would not fit there, makes them again from the frame when
// a stage reads them. Both must give the same plan: the same registration, offsets,
// transmissions and frames kept, to the last bit.
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it, vi } from "vitest";
import { prepareFrame } from "@/lib/imaging/pipeline";
import { createRng } from "@/lib/imaging/random";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { DEFAULT_REDUCTION_PARAMS, type LinearFrame } from "@/lib/imaging/types";
import { planFromFiles } from "@/lib/reduction-flow/plan-stage";
import { writeWorkFile } from "@/lib/reduction-flow/work-blob";
import { remakePreparedOnRead } from "@/lib/reduction-runner/frame-spill";

// The real function, counted: the test must see the plan take the path it asked for.
vi.mock("@/lib/reduction-runner/frame-spill", async (importOriginal) => {
  const real = await importOriginal<typeof import("@/lib/reduction-runner/frame-spill")>();
  return { ...real, remakePreparedOnRead: vi.fn(real.remakePreparedOnRead) };
});

const W = 400, H = 300;
const EXPOSURES = [1 / 1000, 1 / 250, 1 / 60, 1 / 15, 1 / 4];
const dir = mkdtempSync(join(tmpdir(), "crownlight-plan-made-again-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("the flow's plan with its prepared arrays made again when read", () => {
  it("gives the plan it gives with them on disk", async () => {
    const rng = createRng(8);
    const { frames, truth } = synthesizeBracket({
      width: W, height: H, channels: 3, exposuresS: EXPOSURES, sunRadiusPx: 45, seed: 8,
      shiftsPx: EXPOSURES.map(() => ({ dx: (rng() - 0.5) * 4, dy: (rng() - 0.5) * 4 })),
      rotationsDeg: EXPOSURES.map(() => (rng() - 0.5) * 0.3),
    });
    const linear: LinearFrame[] = frames.map((f) => ({
      name: f.name, image: { width: W, height: H, planes: f.planes }, exposureS: f.exposureS,
      blackLevel: truth.blackLevel, blackLevelSource: "file", whiteLevel: truth.whiteLevel, encoding: "linear",
    }));
    const frameFiles = linear.map((frame, k) => {
      const path = join(dir, `frame-${k}.work`);
      writeWorkFile(path, frame);
      return path;
    });
    const limbs = linear.map((frame) => prepareFrame(frame, DEFAULT_REDUCTION_PARAMS).limb);
    const plan = (preparedFrames: "on-disk" | "made-again") =>
      planFromFiles({ frameFiles, limbs, params: DEFAULT_REDUCTION_PARAMS, registration: "corona", scratchDir: dir, preparedFrames }, () => {});
    const onDisk = await plan("on-disk");
    expect(remakePreparedOnRead).not.toHaveBeenCalled();
    const remade = await plan("made-again");
    expect(remakePreparedOnRead).toHaveBeenCalledTimes(EXPOSURES.length);
    expect(onDisk.plan.keep.length).toBe(EXPOSURES.length);
    // JSON keeps every float64 to the last bit (shortest round-trip form); the stage times are the clock's, not the plan's.
    const figures = (planned: typeof onDisk) => JSON.stringify({ ...planned, plan: { ...planned.plan, timingsMs: undefined } });
    expect(remade.plan.timingsMs).toHaveProperty("register");
    expect(figures(remade)).toBe(figures(onDisk));
  }, 120_000);
});
