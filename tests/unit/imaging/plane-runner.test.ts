// computeHypot stands in for Math.hypot in the natural rendition's radial gain,
// where a ring index floor(r / 2) and the test r < inner radius depend on every
// bit of r: it must be Math.hypot's number exactly (V8's builtin, src/builtins/
// builtins-math.cc: sqrt of the Kahan sum of the squares of each argument over
// the larger, times the larger), here on pixel grids about centres such as a
// fit gives and on numbers spread over twenty decades.
import { describe, expect, it } from "vitest";
import { computeHypot, SERIAL_PLANE_RUNNER } from "@/lib/imaging/plane-runner";
import { createRng } from "@/lib/imaging/random";

describe("computeHypot", () => {
  it("is Math.hypot bit for bit over pixel grids about fractional centres", () => {
    let differing = 0;
    for (const [cx, cy] of [[2999.3127, 1999.7781], [1234.5678901, 987.654321], [0.5, 0.5], [3000, 2000], [-3.25, 7.125], [611.0000001, 402.9999999]]) {
      for (let y = 0; y < 700; y += 1) for (let x = 0; x < 1300; x++) if (computeHypot(x - cx, y - cy) !== Math.hypot(x - cx, y - cy)) differing++;
    }
    expect(differing).toBe(0);
  });

  it("is Math.hypot bit for bit over numbers of any sign and size, and at its edge cases", () => {
    const rng = createRng(17);
    let differing = 0;
    for (let k = 0; k < 2_000_000; k++) {
      const a = (rng() - 0.5) * 10 ** (rng() * 20 - 10);
      const b = (rng() - 0.5) * 10 ** (rng() * 20 - 10);
      if (computeHypot(a, b) !== Math.hypot(a, b)) differing++;
    }
    expect(differing).toBe(0);
    for (const [a, b] of [[0, 0], [-0, 0], [3, 4], [-3, 4], [5, 5], [1e-300, 1e-300], [1e300, 1e300], [7, 0], [0, -7]]) expect(computeHypot(a, b)).toBe(Math.hypot(a, b));
  });
});

describe("SERIAL_PLANE_RUNNER", () => {
  it("runs a kernel over every unit once, as one range, with plain arrays", () => {
    const seen = new Uint8Array(37);
    const ranges: [number, number][] = [];
    SERIAL_PLANE_RUNNER.run({ name: "count", run: (args: { seen: Uint8Array }, start, end) => {
      ranges.push([start, end]);
      for (let i = start; i < end; i++) args.seen[i]++;
    } }, { seen }, 37);
    expect(ranges).toEqual([[0, 37]]);
    expect(seen.every((v) => v === 1)).toBe(true);
    expect(SERIAL_PLANE_RUNNER.float32(4).buffer).toBeInstanceOf(ArrayBuffer);
  });
});
