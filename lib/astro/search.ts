// One-dimensional searches shared by the eclipse geometry.

/**
 * The least value of f on [a, b] by golden-section search, to an interval narrower than
 * tolerance (f must be unimodal there). Returns the abscissa (the middle of the last
 * interval) and the least value seen at the last two probes.
 */
export function findMinimumByGoldenSection(f: (x: number) => number, a: number, b: number, tolerance: number): { x: number; value: number } {
  const g = (Math.sqrt(5) - 1) / 2;
  let lo = a;
  let hi = b;
  let c = hi - g * (hi - lo);
  let d = lo + g * (hi - lo);
  let fc = f(c);
  let fd = f(d);
  while (hi - lo > tolerance) {
    if (fc < fd) {
      hi = d;
      d = c;
      fd = fc;
      c = hi - g * (hi - lo);
      fc = f(c);
    } else {
      lo = c;
      c = d;
      fc = fd;
      d = lo + g * (hi - lo);
      fd = f(d);
    }
  }
  return { x: (lo + hi) / 2, value: Math.min(fc, fd) };
}
