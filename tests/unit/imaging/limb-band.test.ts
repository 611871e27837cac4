// The band just outside the lunar limb. Frames other than the reference were once
// kept out of the 3 px next to the limb (the Moon may move between frames), so
// where the reference clipped there the master fell back to its lower bound: a flat
// grey ring around the Moon in the natural rendition. Frames whose limb lies where
// the reference's does are now let in, and the inner corona runs to the limb.
import { describe, expect, it } from "vitest";
import { reduceBracket } from "@/lib/imaging/pipeline";
import { synthesizeBracket } from "@/lib/imaging/synth-model";
import { DEFAULT_REDUCTION_PARAMS } from "@/lib/imaging/types";

const W = 256, H = 224;
const EXPOSURES = [1 / 1000, 1 / 250, 1 / 60, 1 / 15, 1 / 4, 1];

describe("the inner corona next to the limb", () => {
  const scene = synthesizeBracket({
    width: W, height: H, channels: 1, exposuresS: EXPOSURES, sunRadiusPx: 32, seed: 61, whiteLevel: 16383, blackLevel: 0, noise: false,
    shiftsPx: EXPOSURES.map((_, i) => ({ dx: (i % 3) - 1, dy: ((i + 1) % 3) - 1 })),
  });
  const frames = scene.frames.map((f) => ({ name: f.name, image: { width: W, height: H, planes: f.planes }, exposureS: f.exposureS, blackLevel: 0, blackLevelSource: "file" as const, whiteLevel: 16383, encoding: "linear" as const }));
  const result = reduceBracket(frames, DEFAULT_REDUCTION_PARAMS);
  const { moonCentre: m, moonRadiusPx: R } = result.overall;
  const ring = (d: number) => {
    let empty = 0, sum = 0;
    for (let k = 0; k < 360; k++) {
      const i = Math.round(m.y + (R + d) * Math.sin((k * Math.PI) / 180)) * W + Math.round(m.x + (R + d) * Math.cos((k * Math.PI) / 180));
      if (result.coverage[i] === 0) empty++;
      sum += result.master.planes[0][i];
    }
    return { emptyShare: empty / 360, mean: sum / 360 };
  };

  it("is exposed well by some frame all round, even where the reference clipped", () => {
    // The reference (1/15 s) clips most of the ring 3 to 8 px out; the 1/1000 s and 1/250 s frames do not.
    for (const d of [1, 2, 3]) expect(ring(d).emptyShare, `${d} px out`).toBe(0);
  });

  it("falls outward from the limb without a flat step", () => {
    const means = [1, 2, 3, 4, 5, 6, 8].map((d) => ring(d).mean);
    for (let k = 1; k < means.length; k++) expect(means[k]).toBeLessThan(means[k - 1]);
    // The ring 4 px out against the scene's own light there (the reference frame's Moon; the registration and the limb's blur allow a broad check: 30 %).
    const truthRing = (() => {
      const t = scene.truth.radiance[0];
      const tm = scene.truth.moonScene[3];
      let s = 0;
      for (let k = 0; k < 360; k++) s += t[Math.round(tm.y + (R + 4) * Math.sin((k * Math.PI) / 180)) * W + Math.round(tm.x + (R + 4) * Math.cos((k * Math.PI) / 180))];
      return s / 360;
    })();
    expect(Math.abs(ring(4).mean / truthRing - 1)).toBeLessThan(0.3);
  });
});
