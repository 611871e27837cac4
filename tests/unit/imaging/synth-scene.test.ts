// The synthetic scene: Baumbach's profile on average, shaped like a corona
// (dim polar holes with plumes, streamers, prominences standing clear of the Moon).
import { describe, expect, it } from "vitest";
import { createRng } from "@/lib/imaging/random";
import { computeBaumbachBrightness, createScene, evaluateCorona, evaluateProminences } from "@/lib/imaging/synth-scene";

const R = 200;
const SUN = { x: 700.3, y: 600.8 };
const options = { width: 1400, height: 1200, sunRadiusPx: R };
const scene = createScene(options, SUN, createRng(17));

/** The corona at height r (solar radii) and position angle phi, over the Baumbach law at r. */
const modulation = (r: number, phi: number) => evaluateCorona(scene, SUN.x + r * R * Math.cos(phi), SUN.y + r * R * Math.sin(phi)) / (scene.scale * computeBaumbachBrightness(r));

describe("synthetic corona", () => {
  it("averages to Baumbach's law over position angle at every height (REFERENCES.md, from memory)", () => {
    for (const r of [1.05, 1.3, 2.0, 3.5]) {
      let sum = 0;
      const n = 8192;
      for (let k = 0; k < n; k++) sum += modulation(r, -Math.PI + (2 * Math.PI * k) / n);
      expect(Math.abs(sum / n - 1)).toBeLessThan(0.005);
    }
  });

  it("is dim over the poles and bright towards the equator, not a regular starburst", () => {
    const meanNear = (centre: number, r: number) => {
      let s = 0;
      for (let k = -50; k <= 50; k++) s += modulation(r, centre + (k / 50) * 0.35);
      return s / 101;
    };
    const pole = scene.poleAngle;
    const polar = (meanNear(pole, 1.5) + meanNear(pole + Math.PI, 1.5)) / 2;
    const equatorial = (meanNear(pole + Math.PI / 2, 1.5) + meanNear(pole - Math.PI / 2, 1.5)) / 2;
    expect(polar / equatorial).toBeLessThan(0.6);
  });

  it("has polar plumes: several narrow rays over each pole", () => {
    for (const pole of [scene.poleAngle, scene.poleAngle + Math.PI]) {
      // Local maxima standing 3 % above their surroundings within 0.5 rad of the pole at 1.2 R.
      const n = 2000;
      const values = Array.from({ length: n }, (_, k) => modulation(1.2, pole - 0.5 + k / n));
      let rays = 0;
      for (let k = 30; k < n - 30; k++) {
        const v = values[k];
        if (v < values[k - 1] || v < values[k + 1]) continue;
        if (v > 1.03 * values[k - 30] && v > 1.03 * values[k + 30]) rays++;
      }
      expect(rays).toBeGreaterThanOrEqual(4);
    }
  });

  it("puts prominences clear of a Moon 4.5 % larger than the Sun, brighter there than the corona", () => {
    const withProminences = createScene({ ...options, prominenceCount: 8 }, SUN, createRng(5));
    const n = 4096;
    const bright: boolean[] = [];
    for (let k = 0; k < n; k++) {
      const phi = -Math.PI + (2 * Math.PI * k) / n;
      let top = 0;
      for (const r of [1.06, 1.08, 1.1]) {
        const x = SUN.x + r * R * Math.cos(phi), y = SUN.y + r * R * Math.sin(phi);
        top = Math.max(top, evaluateProminences(withProminences, x, y) / evaluateCorona(withProminences, x, y));
      }
      bright.push(top > 1);
    }
    // Runs of position angles where a prominence outshines the corona above the Moon's edge.
    let runs = 0;
    for (let k = 0; k < n; k++) if (bright[k] && !bright[(k + n - 1) % n]) runs++;
    expect(runs).toBeGreaterThanOrEqual(6);
    expect(evaluateProminences(withProminences, SUN.x + 1.3 * R, SUN.y)).toBe(0);
  });

  it("is the same scene for the same seed and another for another seed", () => {
    const again = createScene(options, SUN, createRng(17));
    const other = createScene(options, SUN, createRng(18));
    // Element by element (a deep equality of half a million values is slow).
    const differing = (a: Float32Array, b: Float32Array) => a.reduce((n, v, i) => n + (v === b[i] ? 0 : 1), 0);
    expect(again.corona.length).toBe(scene.corona.length);
    expect(differing(again.corona, scene.corona)).toBe(0);
    expect(differing(again.prominence, scene.prominence)).toBe(0);
    expect(differing(other.corona, scene.corona)).toBeGreaterThan(scene.corona.length / 2);
  });
});
