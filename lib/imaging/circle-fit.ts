// Circle fits to points (x_i, y_i). Algebraic fits are closed-form starts; the
// geometric fit minimizes the sum of squared orthogonal distances, which is the
// maximum-likelihood fit for isotropic Gaussian noise.
import { decomposeSymmetric, solve3 } from "./linalg";
import { ImagingError } from "./errors";

export interface Circle {
  cx: number;
  cy: number;
  r: number;
}

export interface GeometricCircleFit extends Circle {
  /** Sum of squared orthogonal residuals, sum (|p_i - c| - r)^2, px^2. */
  sumSquaredResiduals: number;
  rmsPx: number;
  iterations: number;
  converged: boolean;
}

function requirePoints(xs: ArrayLike<number>, ys: ArrayLike<number>, fit: string): void {
  if (xs.length !== ys.length) throw new ImagingError("bad-parameter", `${fit}: x and y have different lengths (${xs.length}, ${ys.length})`);
  if (xs.length < 3) throw new ImagingError("bad-parameter", `${fit}: a circle needs at least 3 points, got ${xs.length}`);
}

interface Moments {
  meanX: number;
  meanY: number;
  mxx: number;
  myy: number;
  mxy: number;
  mxz: number;
  myz: number;
  mzz: number;
  mz: number;
}

// Centred moments as in Chernov (2010), "Circular and Linear Regression", ch. 5:
// z = x^2 + y^2 of the centred coordinates, each moment a mean over points.
function computeMoments(xs: ArrayLike<number>, ys: ArrayLike<number>): Moments {
  const n = xs.length;
  let meanX = 0;
  let meanY = 0;
  for (let i = 0; i < n; i++) {
    meanX += xs[i];
    meanY += ys[i];
  }
  meanX /= n;
  meanY /= n;
  let mxx = 0, myy = 0, mxy = 0, mxz = 0, myz = 0, mzz = 0;
  for (let i = 0; i < n; i++) {
    const x = xs[i] - meanX;
    const y = ys[i] - meanY;
    const z = x * x + y * y;
    mxx += x * x;
    myy += y * y;
    mxy += x * y;
    mxz += x * z;
    myz += y * z;
    mzz += z * z;
  }
  return { meanX, meanY, mxx: mxx / n, myy: myy / n, mxy: mxy / n, mxz: mxz / n, myz: myz / n, mzz: mzz / n, mz: (mxx + myy) / n };
}

/**
 * Kasa (1976), IEEE Trans. Instrum. Meas. 25:8: linear least squares of
 * x^2 + y^2 + D x + E y + F = 0; centre (-D/2, -E/2), R = sqrt(D^2/4 + E^2/4 - F).
 * Biased toward small circles on short arcs.
 */
export function fitCircleKasa(xs: ArrayLike<number>, ys: ArrayLike<number>): Circle {
  requirePoints(xs, ys, "Kasa fit");
  const m = computeMoments(xs, ys);
  // Centred data: the F row decouples, leaving [mxx mxy; mxy myy] [a b]^T = [mxz myz]^T / 2 with centre (a, b).
  const sol = solve3([m.mxx, m.mxy, 0, m.mxy, m.myy, 0, 0, 0, 1], [m.mxz / 2, m.myz / 2, 0]);
  if (!sol) throw new ImagingError("singular-system", "Kasa fit: points are collinear");
  const [a, b] = sol;
  return { cx: a + m.meanX, cy: b + m.meanY, r: Math.sqrt(a * a + b * b + m.mz) };
}

// Newton's method from 0 on the characteristic polynomial, as in Chernov (2010),
// section 5.5 (Pratt) and 5.10 (Taubin); it converges to the smallest root.
function solveCharacteristic(coef: (x: number) => number, derivative: (x: number) => number): number {
  let x = 0;
  let y = coef(0);
  for (let iter = 0; iter < 99; iter++) {
    const dy = derivative(x);
    const xNew = x - y / dy;
    if (xNew === x || !Number.isFinite(xNew)) break;
    const yNew = coef(xNew);
    if (Math.abs(yNew) >= Math.abs(y)) break;
    x = xNew;
    y = yNew;
  }
  return x;
}

/**
 * Pratt (1987), Computer Graphics 21:145: minimizes sum (A z + B x + C y + D)^2
 * subject to B^2 + C^2 - 4 A D = 1, via the generalized eigenproblem in Chernov's
 * Newton form. Nearly unbiased; the usual algebraic start for a geometric fit.
 */
export function fitCirclePratt(xs: ArrayLike<number>, ys: ArrayLike<number>): Circle {
  requirePoints(xs, ys, "Pratt fit");
  const m = computeMoments(xs, ys);
  const covXy = m.mxx * m.myy - m.mxy * m.mxy;
  const varZ = m.mzz - m.mz * m.mz;
  const a2 = 4 * covXy - 3 * m.mz * m.mz - m.mzz;
  const a1 = varZ * m.mz + 4 * covXy * m.mz - m.mxz * m.mxz - m.myz * m.myz;
  const a0 = m.mxz * (m.mxz * m.myy - m.myz * m.mxy) + m.myz * (m.myz * m.mxx - m.mxz * m.mxy) - varZ * covXy;
  const x = solveCharacteristic(
    (t) => a0 + t * (a1 + t * (a2 + 4 * t * t)),
    (t) => a1 + t * (2 * a2 + 16 * t * t),
  );
  return finishCentredFit(m, x, covXy, 2 * x);
}

/**
 * Taubin (1991), IEEE PAMI 13:1115: the gradient-weighted algebraic fit,
 * constraint 4 A^2 mean(z) + 4 A B mean(x) + 4 A C mean(y) + B^2 + C^2 = 1.
 */
export function fitCircleTaubin(xs: ArrayLike<number>, ys: ArrayLike<number>): Circle {
  requirePoints(xs, ys, "Taubin fit");
  const m = computeMoments(xs, ys);
  const covXy = m.mxx * m.myy - m.mxy * m.mxy;
  const varZ = m.mzz - m.mz * m.mz;
  const a3 = 4 * m.mz;
  const a2 = -3 * m.mz * m.mz - m.mzz;
  const a1 = varZ * m.mz + 4 * covXy * m.mz - m.mxz * m.mxz - m.myz * m.myz;
  const a0 = m.mxz * (m.mxz * m.myy - m.myz * m.mxy) + m.myz * (m.myz * m.mxx - m.mxz * m.mxy) - varZ * covXy;
  const x = solveCharacteristic(
    (t) => a0 + t * (a1 + t * (a2 + t * a3)),
    (t) => a1 + t * (2 * a2 + 3 * a3 * t),
  );
  return finishCentredFit(m, x, covXy, 0);
}

function finishCentredFit(m: Moments, x: number, covXy: number, radiusExtra: number): Circle {
  const det = x * x - x * m.mz + covXy;
  if (!Number.isFinite(det) || det === 0) throw new ImagingError("singular-system", "algebraic circle fit: points are collinear");
  const a = (m.mxz * (m.myy - x) - m.myz * m.mxy) / det / 2;
  const b = (m.myz * (m.mxx - x) - m.mxz * m.mxy) / det / 2;
  return { cx: a + m.meanX, cy: b + m.meanY, r: Math.sqrt(a * a + b * b + m.mz + radiusExtra) };
}

/**
 * Gander, Golub and Strebel (1994), BIT 34:558, section 3: the algebraic fit
 * a (x^2 + y^2) + b1 x + b2 y + c = 0 minimizing |B u| with |u| = 1, u the right
 * singular vector of B for its smallest singular value (here the eigenvector of
 * B^T B for its smallest eigenvalue), on the uncentred data as in the paper.
 */
export function fitCircleGanderAlgebraic(xs: ArrayLike<number>, ys: ArrayLike<number>): Circle {
  requirePoints(xs, ys, "Gander-Golub-Strebel algebraic fit");
  const btb = new Float64Array(16);
  const row = new Float64Array(4);
  for (let i = 0; i < xs.length; i++) {
    row[0] = xs[i] * xs[i] + ys[i] * ys[i];
    row[1] = xs[i];
    row[2] = ys[i];
    row[3] = 1;
    for (let p = 0; p < 4; p++) for (let q = 0; q < 4; q++) btb[p * 4 + q] += row[p] * row[q];
  }
  const { values, vectors } = decomposeSymmetric(btb, 4);
  let k = 0;
  for (let i = 1; i < 4; i++) if (values[i] < values[k]) k = i;
  const a = vectors[k];
  const b1 = vectors[4 + k];
  const b2 = vectors[8 + k];
  const c = vectors[12 + k];
  if (Math.abs(a) < 1e-300) throw new ImagingError("singular-system", "Gander-Golub-Strebel fit: points are collinear");
  const cx = -b1 / (2 * a);
  const cy = -b2 / (2 * a);
  return { cx, cy, r: Math.sqrt(cx * cx + cy * cy - c / a) };
}

/**
 * Geometric fit by Levenberg-Marquardt (Marquardt 1963, SIAM J. Appl. Math.
 * 11:431) on d_i = sqrt((x_i - a)^2 + (y_i - b)^2) - r with Jacobian
 * (-(x_i - a)/rho_i, -(y_i - b)/rho_i, -1); Gander, Golub and Strebel (1994),
 * section 4, solve the same problem by Gauss-Newton. Starts from Pratt's fit
 * unless a start is given.
 */
export function fitCircleGeometric(xs: ArrayLike<number>, ys: ArrayLike<number>, start?: Circle): GeometricCircleFit {
  requirePoints(xs, ys, "geometric circle fit");
  let { cx, cy, r } = start ?? fitCirclePratt(xs, ys);
  const n = xs.length;
  const evaluate = (a: number, b: number, rad: number): number => {
    let s = 0;
    for (let i = 0; i < n; i++) {
      const d = Math.hypot(xs[i] - a, ys[i] - b) - rad;
      s += d * d;
    }
    return s;
  };
  let cost = evaluate(cx, cy, r);
  let lambda = 1e-3;
  let iterations = 0;
  let converged = false;
  const jtj = new Float64Array(9);
  const jtd = new Float64Array(3);
  for (; iterations < 200; iterations++) {
    jtj.fill(0);
    jtd.fill(0);
    for (let i = 0; i < n; i++) {
      const dx = xs[i] - cx;
      const dy = ys[i] - cy;
      const rho = Math.hypot(dx, dy) || 1e-12;
      const j0 = -dx / rho;
      const j1 = -dy / rho;
      const d = rho - r;
      jtj[0] += j0 * j0; jtj[1] += j0 * j1; jtj[2] -= j0;
      jtj[4] += j1 * j1; jtj[5] -= j1;
      jtj[8] += 1;
      jtd[0] += j0 * d; jtd[1] += j1 * d; jtd[2] -= d;
    }
    jtj[3] = jtj[1]; jtj[6] = jtj[2]; jtj[7] = jtj[5];
    let improved = false;
    for (let attempt = 0; attempt < 30; attempt++) {
      const damped = Float64Array.from(jtj);
      for (let k = 0; k < 3; k++) damped[k * 4] *= 1 + lambda;
      const step = solve3(damped, [-jtd[0], -jtd[1], -jtd[2]]);
      if (!step) {
        lambda *= 10;
        continue;
      }
      const trial = evaluate(cx + step[0], cy + step[1], r + step[2]);
      if (trial <= cost) {
        const relative = (cost - trial) / Math.max(cost, 1e-300);
        const stepSize = Math.hypot(step[0], step[1], step[2]);
        cx += step[0];
        cy += step[1];
        r += step[2];
        cost = trial;
        lambda = Math.max(lambda / 10, 1e-12);
        improved = true;
        if (relative < 1e-15 || stepSize < 1e-12 * Math.max(1, Math.abs(r))) converged = true;
        break;
      }
      lambda *= 10;
    }
    if (!improved) {
      converged = true;
      break;
    }
    if (converged) break;
  }
  if (r < 0) r = -r;
  return { cx, cy, r, sumSquaredResiduals: cost, rmsPx: Math.sqrt(cost / n), iterations, converged };
}

/** Orthogonal residuals |p_i - c| - r, px. */
export function computeCircleResiduals(xs: ArrayLike<number>, ys: ArrayLike<number>, circle: Circle): Float64Array {
  const out = new Float64Array(xs.length);
  for (let i = 0; i < xs.length; i++) out[i] = Math.hypot(xs[i] - circle.cx, ys[i] - circle.cy) - circle.r;
  return out;
}

/** The circle through three points, or null when they are (nearly) collinear. */
export function fitCircleThroughThree(x1: number, y1: number, x2: number, y2: number, x3: number, y3: number): Circle | null {
  const d = 2 * (x1 * (y2 - y3) + x2 * (y3 - y1) + x3 * (y1 - y2));
  if (Math.abs(d) < 1e-9) return null;
  const s1 = x1 * x1 + y1 * y1;
  const s2 = x2 * x2 + y2 * y2;
  const s3 = x3 * x3 + y3 * y3;
  const cx = (s1 * (y2 - y3) + s2 * (y3 - y1) + s3 * (y1 - y2)) / d;
  const cy = (s1 * (x3 - x2) + s2 * (x1 - x3) + s3 * (x2 - x1)) / d;
  return { cx, cy, r: Math.hypot(x1 - cx, y1 - cy) };
}
