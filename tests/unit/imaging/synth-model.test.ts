import { describe, expect, it } from "vitest";
import { computeBaumbachBrightness, synthesizeBracket } from "@/lib/imaging/synth-model";
import { ImagingError } from "@/lib/imaging/errors";

describe("Baumbach (1937) K+F corona (REFERENCES.md: formula from memory, values computed)", () => {
  it("gives I(1.1) = 1.28e-6 and I(2.0) = 2.06e-8 of the mean disk", () => {
    expect(computeBaumbachBrightness(1.1)).toBeCloseTo(1.28e-6, 8);
    expect(computeBaumbachBrightness(2.0) / 2.06e-8).toBeCloseTo(1, 2);
  });
  it("falls monotonically with height", () => {
    let last = Infinity;
    for (let r = 1; r < 6; r += 0.05) {
      const v = computeBaumbachBrightness(r);
      expect(v).toBeLessThan(last);
      last = v;
    }
  });
});

describe("synthesizeBracket", () => {
  const base = { width: 96, height: 80, channels: 1 as const, exposuresS: [0.001, 0.01, 0.1], sunRadiusPx: 20, seed: 9 };

  it("is reproducible from its seed and differs between seeds", () => {
    const a = synthesizeBracket(base);
    const b = synthesizeBracket(base);
    const c = synthesizeBracket({ ...base, seed: 10 });
    expect(a.frames[1].planes[0]).toEqual(b.frames[1].planes[0]);
    expect(a.frames[1].planes[0]).not.toEqual(c.frames[1].planes[0]);
  });

  it("exposes the true radiance: noiseless frames equal rate x t + black where nothing clips", () => {
    const { frames, truth } = synthesizeBracket({ ...base, noise: false, moonRadiusRatio: 1.01, moonOffsetPx: { dx: 0, dy: 0 } });
    const f = frames[0];
    let checked = 0;
    for (let y = 0; y < base.height; y++) {
      for (let x = 0; x < base.width; x++) {
        const i = y * base.width + x;
        const r = Math.hypot(x - truth.sunCentre.x, y - truth.sunCentre.y);
        if (r < truth.moonRadiusPx + 8) continue; // the recursive PSF spreads the bright occulted limb a few px
        const expected = truth.radiance[0][i] * f.exposureS + truth.blackLevel;
        if (expected < truth.whiteLevel) {
          expect(Math.abs(f.planes[0][i] - expected)).toBeLessThanOrEqual(0.5 + 1e-3 * expected);
          checked++;
        }
      }
    }
    expect(checked).toBeGreaterThan(1000);
  });

  it("clips at the white level, keeps the lunar disk dark and places the Moon where the truth says", () => {
    const { frames, truth } = synthesizeBracket({ ...base, shiftsPx: [{ dx: 0, dy: 0 }, { dx: 3.5, dy: -2 }, { dx: 0, dy: 0 }] });
    expect(Math.max(...frames[2].planes[0])).toBe(truth.whiteLevel);
    const m = truth.moonInFrame[1];
    expect(m.x - truth.moonScene[1].x).toBeCloseTo(3.5, 9);
    const centre = frames[1].planes[0][Math.round(m.y) * base.width + Math.round(m.x)];
    expect(centre).toBeLessThan(truth.blackLevel + 30);
    expect(frames[1].captureTimeMs - frames[0].captureTimeMs).toBe(1500);
  });

  it("refuses bad options by name", () => {
    expect(() => synthesizeBracket({ ...base, exposuresS: [0.01, -1] })).toThrow(/exposuresS\[1\]/);
    expect(() => synthesizeBracket({ ...base, channels: 2 as 1 })).toThrow(ImagingError);
    expect(() => synthesizeBracket({ ...base, shiftsPx: [{ dx: 0, dy: 0 }] })).toThrow(/shiftsPx/);
    expect(() => synthesizeBracket({ ...base, moonOffsetPx: { dx: 5, dy: 0 } })).toThrow(/total/);
  });
});
