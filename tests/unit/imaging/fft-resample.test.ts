import { describe, expect, it } from "vitest";
import { correlatePhase, nextPowerOfTwo, transformFft, transformFft2d } from "@/lib/imaging/fft";
import { warpMask, warpPlanes } from "@/lib/imaging/resample";
import { createRng } from "@/lib/imaging/random";
import { applyAffine, composeAffine, createAffineAbout, fromAffine, invertAffine, toAffine } from "@/lib/imaging/similarity";

describe("FFT", () => {
  it("matches the direct DFT and inverts", () => {
    const n = 16;
    const rng = createRng(1);
    const re = Float64Array.from({ length: n }, () => rng() - 0.5);
    const im = Float64Array.from({ length: n }, () => rng() - 0.5);
    const fr = Float64Array.from(re), fi = Float64Array.from(im);
    transformFft(fr, fi);
    for (let k = 0; k < n; k++) {
      let sr = 0, si = 0;
      for (let t = 0; t < n; t++) {
        const ang = (-2 * Math.PI * k * t) / n;
        sr += re[t] * Math.cos(ang) - im[t] * Math.sin(ang);
        si += re[t] * Math.sin(ang) + im[t] * Math.cos(ang);
      }
      expect(fr[k]).toBeCloseTo(sr, 10);
      expect(fi[k]).toBeCloseTo(si, 10);
    }
    transformFft(fr, fi, true);
    for (let k = 0; k < n; k++) expect(fr[k]).toBeCloseTo(re[k], 12);
    expect(nextPowerOfTwo(300)).toBe(512);
    expect(() => transformFft(new Float64Array(12), new Float64Array(12))).toThrow(/power of two/);
  });
  it("2-D transform of a constant is a single DC term", () => {
    const re = new Float64Array(8 * 4).fill(2), im = new Float64Array(32);
    transformFft2d(re, im, 8, 4);
    expect(re[0]).toBeCloseTo(64, 10);
    expect(Math.max(...re.slice(1).map(Math.abs))).toBeLessThan(1e-12);
  });
});

describe("phase correlation and warps", () => {
  it("recovers a sub-pixel shift of a periodic texture to 0.01 px", () => {
    // Dense-spectrum texture: white noise low-passed in the Fourier domain; the
    // shifted copy is made exactly by a phase ramp (shift theorem).
    const size = 64;
    const rng = createRng(4);
    const specRe = new Float64Array(size * size).map(() => rng() - 0.5);
    const specIm = new Float64Array(size * size);
    transformFft2d(specRe, specIm, size, size);
    const texture = (dx: number, dy: number) => {
      const re = new Float64Array(size * size);
      const im = new Float64Array(size * size);
      for (let v = 0; v < size; v++) for (let u = 0; u < size; u++) {
        const fu = (u <= size / 2 ? u : u - size) / size;
        const fv = (v <= size / 2 ? v : v - size) / size;
        const g = Math.exp(-2 * Math.PI ** 2 * 1.5 ** 2 * (fu * fu + fv * fv));
        const ang = -2 * Math.PI * (fu * dx + fv * dy);
        const i = v * size + u;
        re[i] = g * (specRe[i] * Math.cos(ang) - specIm[i] * Math.sin(ang));
        im[i] = g * (specRe[i] * Math.sin(ang) + specIm[i] * Math.cos(ang));
      }
      transformFft2d(re, im, size, size, true);
      return re;
    };
    const a = texture(0, 0);
    for (const [dx, dy] of [[3.3, -1.7], [-0.45, 0.2], [10.05, 7.5], [0.5, -0.5]]) {
      const r = correlatePhase(a, texture(dx, dy), size, size, 1);
      expect(Math.abs(r.dx - dx)).toBeLessThan(0.01);
      expect(Math.abs(r.dy - dy)).toBeLessThan(0.01);
      expect(r.peak).toBeGreaterThan(0.6); // a half-pixel shift lowers the sampled peak to about exp(-1/4) per axis
    }
    const other = new Float64Array(size * size).map(() => rng() - 0.5);
    expect(correlatePhase(a, other, size, size).peak).toBeLessThan(0.3);
  });

  it("seeks the peak only within maxShift when asked", () => {
    const size = 64;
    const rng = createRng(5);
    const a = new Float64Array(size * size).map(() => rng() - 0.5);
    // b holds a strongly at (20, -9) and weakly at (2, 1): integer circular shifts.
    const b = new Float64Array(size * size);
    for (let v = 0; v < size; v++) for (let u = 0; u < size; u++) {
      const at = (du: number, dv: number) => a[((v - dv + size) % size) * size + ((u - du + size) % size)];
      b[v * size + u] = at(20, -9) + 0.5 * at(2, 1);
    }
    const free = correlatePhase(a, b, size, size, 1);
    expect([Math.round(free.dx), Math.round(free.dy)]).toEqual([20, -9]);
    const near = correlatePhase(a, b, size, size, 1, 5);
    expect(Math.abs(near.dx - 2)).toBeLessThan(0.05);
    expect(Math.abs(near.dy - 1)).toBeLessThan(0.05);
    expect(() => correlatePhase(a, b, size, size, 1, -1)).toThrow(/maxShift/);
  });

  it("bicubic warp reproduces a smooth function to 1e-3 and warps masks by nearest neighbour", () => {
    const size = 64;
    const f = (x: number, y: number) => Math.sin(x / 5) * Math.cos(y / 7);
    const plane = Float32Array.from({ length: size * size }, (_, i) => f(i % size, Math.floor(i / size)));
    const m = toAffine({ dx: 1.3, dy: -0.8, rotationDeg: 4, scale: 1.02 }, size, size);
    const { planes, covered } = warpPlanes([plane], size, size, m, { width: size, height: size });
    let worst = 0;
    for (let y = 8; y < size - 8; y++) {
      for (let x = 8; x < size - 8; x++) {
        const p = applyAffine(m, x, y);
        worst = Math.max(worst, Math.abs(planes[0][y * size + x] - f(p.x, p.y)));
      }
    }
    expect(worst).toBeLessThan(1e-3);
    expect(covered[32 * size + 32]).toBe(1);
    expect(covered[0]).toBe(0); // rotated and scaled: the corner's source lies outside
    const mask = new Uint8Array(size * size);
    mask[10 * size + 20] = 1;
    const moved = warpMask(mask, size, size, { a: 1, b: 0, tx: 2, ty: 0 }, { width: size, height: size });
    expect(moved[10 * size + 18]).toBe(1);
  });

  it("similarity helpers round-trip", () => {
    const t = { dx: 2.5, dy: -1.25, rotationDeg: 0.3, scale: 1.001 };
    const m = toAffine(t, 300, 200);
    const back = fromAffine(m, 300, 200);
    expect(back.dx).toBeCloseTo(t.dx, 10);
    expect(back.rotationDeg).toBeCloseTo(t.rotationDeg, 10);
    const id = composeAffine(m, invertAffine(m));
    expect(id.a).toBeCloseTo(1, 12);
    expect(id.tx).toBeCloseTo(0, 10);
    const rot = createAffineAbout(50, 40, 0.1, 1);
    const p = applyAffine(rot, 50, 40);
    expect(p.x).toBeCloseTo(50, 12);
  });
});
