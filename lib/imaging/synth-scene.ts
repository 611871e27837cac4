// The scene of our synthetic brackets: a K+F corona whose mean radial profile is
// Baumbach's, shaped in position angle by helmet streamers, polar plumes and
// faint rays, with prominences of several shapes on the limb. Angular structure
// is tabulated once per scene, so a pixel costs a square root, an arctangent and
// two table look-ups (the model renders every pixel of every frame).
import type { Rng } from "./random";

/**
 * Baumbach (1937) K+F corona brightness in units of the mean solar disk, r in
 * solar radii (REFERENCES.md, from memory): I(r) = 1e-6 (0.0532 r^-2.5 + 1.425 r^-7 + 2.565 r^-17).
 */
export function computeBaumbachBrightness(rSun: number): number {
  // Powers by multiplication: this runs for every pixel of every synthetic frame.
  const inv = 1 / rSun;
  const inv2 = inv * inv;
  const inv7 = inv2 * inv2 * inv2 * inv;
  const inv17 = inv7 * inv7 * inv2 * inv;
  return 1e-6 * (0.0532 * inv2 * Math.sqrt(inv) + 1.425 * inv7 + 2.565 * inv17);
}

export interface SceneOptions {
  width: number;
  height: number;
  sunRadiusPx: number;
  limbRateDnPerS?: number;
  streamerCount?: number;
  prominenceCount?: number;
  prominenceContrast?: number;
}

export interface Scene {
  sunX: number;
  sunY: number;
  sunR: number;
  /** DN/s per unit of Baumbach brightness. */
  scale: number;
  /** Angular modulation of the corona, CORONA_ROWS rows evenly spaced in 1/r from 1 to 1/rMax, `columns` position angles each; every row averages 1. */
  corona: Float32Array;
  /** Prominence light, DN/s, PROMINENCE_ROWS rows evenly spaced in height from the limb to PROMINENCE_TOP_R, `columns` position angles each. */
  prominence: Float32Array;
  columns: number;
  /** 1 / rMax: rows beyond it repeat the last row. */
  uMin: number;
  /** Position angle (image x axis towards image y, radians) of the pole the plumes fan out from. */
  poleAngle: number;
}

const CORONA_ROWS = 256;
const PROMINENCE_ROWS = 160;
/** Prominences stand at most this high above the limb, solar radii. */
const PROMINENCE_TOP_R = 0.25;
/**
 * Prominences over the K+F corona at 1.1 R: NASA RP 1369 (REFERENCES.md) exposes
 * prominences at Q = 9 and the corona at 0.1 R above the limb at Q = 7, a factor
 * 2^2 in brightness.
 */
export const PROMINENCE_OVER_INNER_CORONA = 4;

/** Shortest angular distance a - b, radians, in (-pi, pi]. */
function wrapAngle(d: number): number {
  d %= 2 * Math.PI;
  if (d > Math.PI) d -= 2 * Math.PI;
  else if (d <= -Math.PI) d += 2 * Math.PI;
  return d;
}

function uniform(rng: Rng, lo: number, hi: number): number {
  return lo + (hi - lo) * rng();
}

/** Adds f(d) to the columns of `row` within `reach` radians of angle `centre` (d = angular distance, signed). */
function addAround(row: Float32Array, columns: number, centre: number, reach: number, f: (d: number) => number): void {
  const step = (2 * Math.PI) / columns;
  const c0 = Math.floor((centre + Math.PI - reach) / step);
  const c1 = Math.ceil((centre + Math.PI + reach) / step);
  for (let c = c0; c <= c1; c++) {
    const k = ((c % columns) + columns) % columns;
    row[k] += f(wrapAngle(c * step - Math.PI - centre));
  }
}

interface Helmet {
  /** Position angle of the base and the angle the stalk bends towards. */
  base: number;
  bendTo: number;
  /** Half-width of the bulb at its widest, solar radii; angular half-width of the stalk, radians. */
  bulbHalfWidthR: number;
  stalkHalfWidth: number;
  /** Height of the cusp, solar radii. */
  cuspR: number;
  amplitude: number;
  /** Spacing of the arcade's nested loops in the dome's own radius (0..1). */
  loopSpacing: number;
}

interface Plume {
  /** Foot point on the limb and the asymptotic direction of the straight ray, radians. */
  foot: number;
  direction: number;
  halfWidth: number;
  amplitude: number;
}

/**
 * Angular modulation of the corona at one height, before normalization:
 *  - a background brighter at low latitudes than over the polar coronal holes;
 *  - helmet streamers: a bulb of nested loops, widest about a third of the
 *    way from the limb to the cusp (1.2 to 1.5 R), closing at the cusp, out
 *    of which rises a narrow stalk that bends towards the equator;
 *  - polar plumes: straight rays from foot points near the pole, fanning out
 *    faster than radially; a straight line through (1, foot) with direction
 *    psi sits at position angle psi + asin(sin(foot - psi) / r) at height r.
 */
function fillCoronaRow(row: Float32Array, columns: number, r: number, scene: { poleAngle: number; helmets: Helmet[]; plumes: Plume[]; texture: Float32Array }): void {
  const step = (2 * Math.PI) / columns;
  for (let c = 0; c < columns; c++) {
    const phi = c * step - Math.PI;
    const fromPole = Math.sin(phi - scene.poleAngle);
    // sin^2 of the angle from the polar axis: 0 at the poles, 1 at the equator.
    row[c] = (0.22 + 0.5 * fromPole * fromPole) * scene.texture[c];
  }
  for (const h of scene.helmets) {
    // The bulb: an ellipse in (height, physical half-width) centred at bulbR, reaching
    // the cusp; (1 - t^2)^1.5 closes it smoothly (a kink in r would ring in a radial filter).
    const bulbR = 1 + 0.3 * (h.cuspR - 1);
    const t = (r - bulbR) / (h.cuspR - bulbR);
    const bulb = Math.abs(t) < 1 ? (1 - t * t) ** 1.5 : 0;
    const bulbHalfWidth = (h.bulbHalfWidthR * Math.max(bulb, 1e-3)) / r;
    // The stalk rises out of the bulb (a C1 smoothstep from bulbR to the cusp) and leans towards the equator above it.
    const rise = Math.min(1, Math.max(0, (r - bulbR) / (h.cuspR - bulbR)));
    const stalk = rise * rise * (3 - 2 * rise) * (0.55 + 0.45 * Math.exp(-((r - h.cuspR) ** 2) / 4));
    const lean = Math.max(0, 1 - h.cuspR / r);
    const stalkCentre = h.base + (h.bendTo - h.base) * 0.5 * lean * lean;
    if (bulb > 0) {
      addAround(row, columns, h.base, 3 * bulbHalfWidth, (d) => {
        const q = Math.abs(d) / bulbHalfWidth;
        // Nested loops of the arcade: faint rings in the bulb's elliptical radius.
        const rho = Math.sqrt(t * t + q * q);
        return h.amplitude * bulb * Math.exp(-0.5 * q * q * q) * (1 + 0.12 * Math.cos((2 * Math.PI * rho) / h.loopSpacing));
      });
    }
    if (stalk > 0) {
      addAround(row, columns, stalkCentre, 4 * h.stalkHalfWidth, (d) => 0.9 * h.amplitude * stalk * Math.exp(-0.5 * (d / h.stalkHalfWidth) ** 2));
    }
  }
  for (const p of scene.plumes) {
    const s = Math.sin(p.foot - p.direction) / r;
    const at = p.direction + Math.asin(Math.max(-1, Math.min(1, s)));
    const amp = p.amplitude * (0.35 + 0.65 * Math.exp(-(r - 1) / 1.8));
    addAround(row, columns, at, 4 * p.halfWidth, (d) => amp * Math.exp(-0.5 * (d / p.halfWidth) ** 2));
  }
  let mean = 0;
  for (let c = 0; c < columns; c++) mean += row[c];
  mean /= columns;
  for (let c = 0; c < columns; c++) row[c] /= mean;
}

type ProminenceShape = "arch" | "hedgerow" | "column" | "cloud";

/** Local coordinates about a prominence: along the limb s and height h, solar radii. */
type ProminenceFn = (s: number, h: number) => number;

/** One prominence's brightness (0..1) as a function of along-limb distance and height, with its half-extent along the limb. */
function createProminenceShape(shape: ProminenceShape, rng: Rng): { fn: ProminenceFn; halfExtent: number } {
  if (shape === "arch") {
    // Two or three nested loops (thin tubes along half ellipses standing on the limb), brighter in knots.
    const a = uniform(rng, 0.04, 0.08);
    const b = uniform(rng, 0.09, 0.16);
    const tube = uniform(rng, 0.005, 0.009);
    const loops = 2 + Math.floor(rng() * 2);
    const knotPhase = rng() * 2 * Math.PI;
    return {
      halfExtent: a + 4 * tube,
      fn: (s, h) => {
        let v = 0;
        for (let k = 0; k < loops; k++) {
          const shrink = 1 - 0.2 * k;
          const e = Math.hypot(s / (a * shrink), h / (b * shrink));
          const dist = (e - 1) * Math.min(a, b) * shrink;
          const along = Math.atan2(h / b, s / a);
          v += Math.exp(-0.5 * (dist / tube) ** 2) * (0.7 + 0.3 * Math.cos(6 * along + knotPhase + 2 * k)) * (1 - 0.2 * k);
        }
        return Math.min(1.2, v);
      },
    };
  }
  if (shape === "hedgerow") {
    // A long wall of fine vertical threads with a ragged top.
    const half = uniform(rng, 0.08, 0.16);
    const top = uniform(rng, 0.07, 0.12);
    const threads = Array.from({ length: 5 }, () => ({ k: uniform(rng, 150, 450), phase: rng() * 2 * Math.PI }));
    const ragged = Array.from({ length: 3 }, () => ({ k: uniform(rng, 15, 60), phase: rng() * 2 * Math.PI }));
    return {
      halfExtent: half,
      fn: (s, h) => {
        const edge = 1 - (s / half) ** 2;
        if (edge <= 0) return 0;
        let height = top * (0.55 + 0.45 * edge);
        for (const g of ragged) height *= 1 + 0.15 * Math.sin(g.k * s + g.phase);
        let thread = 0;
        for (const t of threads) thread += Math.cos(t.k * s + t.phase + 25 * h);
        const body = 1 / (1 + Math.exp((h - height) / 0.006));
        return Math.sqrt(edge) * body * (0.7 + 0.06 * thread);
      },
    };
  }
  if (shape === "column") {
    // A tree: a broad trunk leaning a little, spreading into a crown.
    const trunk = uniform(rng, 0.012, 0.022);
    const crown = uniform(rng, 0.04, 0.07);
    const tall = uniform(rng, 0.09, 0.16);
    const lean = uniform(rng, -0.4, 0.4);
    return {
      halfExtent: crown + Math.abs(lean) * tall + 0.02,
      fn: (s, h) => {
        const f = h / tall;
        if (f > 1.4) return 0;
        const x = s - lean * h;
        const w = trunk + (crown - trunk) * Math.min(1, Math.max(0, (f - 0.35) / 0.5)) ** 2;
        const top = 1 / (1 + Math.exp((f - 1) / 0.06));
        return Math.exp(-0.5 * (x / w) ** 4) * top * (0.8 + 0.2 * Math.cos((2 * Math.PI * x) / 0.012));
      },
    };
  }
  // A cloud held above the limb, fed by a few vertical strands.
  const half = uniform(rng, 0.04, 0.07);
  const height = uniform(rng, 0.09, 0.15);
  const thick = uniform(rng, 0.012, 0.02);
  const strands = Array.from({ length: 3 }, () => uniform(rng, -0.8, 0.8) * half);
  return {
    halfExtent: half * 1.4 + 0.01,
    fn: (s, h) => {
      let v = Math.exp(-0.5 * ((s / half) ** 4 + ((h - height) / thick) ** 2));
      if (h < height) for (const x of strands) v += 0.4 * Math.exp(-0.5 * ((s - x) / 0.004) ** 2);
      return v;
    },
  };
}

const PROMINENCE_SHAPES: ProminenceShape[] = ["arch", "hedgerow", "column", "cloud"];

/**
 * Builds the scene from the seeded random source: a pole angle, helmet
 * streamers mostly at low latitudes, plumes over both poles, and prominences
 * of varied shapes cycling through arch, hedgerow, column and cloud.
 */
export function createScene(o: SceneOptions, sun: { x: number; y: number }, rng: Rng): Scene {
  const sunR = o.sunRadiusPx;
  const limbRate = o.limbRateDnPerS ?? 4e6;
  const scale = limbRate / computeBaumbachBrightness(1);
  // Reach a few pixels past the farthest corner: frames see the scene through small shifts and turns.
  const rMax = (Math.hypot(Math.max(sun.x, o.width - sun.x), Math.max(sun.y, o.height - sun.y)) + 16) / sunR;
  // About one column per pixel at 1.1 R (a power of two, at least 1024).
  let columns = 1024;
  while (columns < 2 * Math.PI * 1.1 * sunR && columns < 16384) columns *= 2;

  const poleAngle = -Math.PI / 2 + uniform(rng, -0.45, 0.45);
  const equators = [poleAngle + Math.PI / 2, poleAngle - Math.PI / 2];
  const helmets: Helmet[] = [];
  for (let k = 0; k < (o.streamerCount ?? 5); k++) {
    const equator = equators[k % 2];
    // Most streamers stand within about 35 degrees of the equator; a few at higher latitudes.
    const base = equator + uniform(rng, -0.6, 0.6) * (k < 4 ? 1 : 1.6);
    helmets.push({
      base,
      bendTo: equator,
      bulbHalfWidthR: uniform(rng, 0.25, 0.45),
      stalkHalfWidth: uniform(rng, 0.025, 0.055),
      cuspR: uniform(rng, 1.7, 2.5),
      amplitude: uniform(rng, 0.7, 1.6),
      loopSpacing: uniform(rng, 0.3, 0.45),
    });
  }
  const plumes: Plume[] = [];
  for (const pole of [poleAngle, poleAngle + Math.PI]) {
    const count = 9 + Math.floor(rng() * 5);
    for (let k = 0; k < count; k++) {
      const offset = uniform(rng, -0.38, 0.38);
      plumes.push({
        foot: pole + offset,
        direction: pole + offset * uniform(rng, 1.3, 1.7),
        halfWidth: uniform(rng, 0.005, 0.012),
        amplitude: uniform(rng, 0.04, 0.12),
      });
    }
  }
  // Faint fine rays everywhere: a sum of cosines in position angle, a few per cent deep.
  // Each ray shows only where its period is at least 4 px (it fades in from 2 px),
  // so the finest rays appear farther out: finer ones would alias into pixel-scale noise.
  const rays = Array.from({ length: 24 }, () => ({ m: 8 + Math.floor(rng() * 160), phase: rng() * 2 * Math.PI, amplitude: uniform(rng, 0.006, 0.02) }));
  const rayWaves = rays.map((ray) => Float32Array.from({ length: columns }, (_, c) => ray.amplitude * Math.cos(ray.m * ((2 * Math.PI * c) / columns - Math.PI) + ray.phase)));
  const texture = new Float32Array(columns);
  const fillTexture = (r: number) => {
    texture.fill(1);
    // The inner corona is the most finely structured: rays ten times as deep at the limb as far out.
    const depth = 0.3 + 2.7 * Math.exp(-(r - 1) / 0.3);
    rays.forEach((ray, k) => {
      const periodPx = (2 * Math.PI * r * sunR) / ray.m;
      const weight = depth * Math.min(1, Math.max(0, (periodPx - 2) / 2));
      if (weight === 0) return;
      const wave = rayWaves[k];
      for (let c = 0; c < columns; c++) texture[c] += weight * wave[c];
    });
  };
  const uMin = 1 / rMax;
  const corona = new Float32Array(CORONA_ROWS * columns);
  const features = { poleAngle, helmets, plumes, texture };
  for (let j = 0; j < CORONA_ROWS; j++) {
    const u = 1 - ((1 - uMin) * j) / (CORONA_ROWS - 1);
    fillTexture(1 / u);
    fillCoronaRow(corona.subarray(j * columns, (j + 1) * columns), columns, 1 / u, features);
  }

  const prominence = new Float32Array(PROMINENCE_ROWS * columns);
  const peakOver = o.prominenceContrast ?? PROMINENCE_OVER_INNER_CORONA;
  const peakBase = peakOver * scale * computeBaumbachBrightness(1.1);
  for (let k = 0; k < (o.prominenceCount ?? 4); k++) {
    const centre = uniform(rng, -Math.PI, Math.PI);
    const { fn, halfExtent } = createProminenceShape(PROMINENCE_SHAPES[k % PROMINENCE_SHAPES.length], rng);
    const peak = peakBase * uniform(rng, 0.6, 1.4);
    const reach = halfExtent + 0.01;
    for (let j = 0; j < PROMINENCE_ROWS; j++) {
      const h = (PROMINENCE_TOP_R * j) / (PROMINENCE_ROWS - 1);
      const row = prominence.subarray(j * columns, (j + 1) * columns);
      // Along-limb distance at height h: angle times (1 + h).
      addAround(row, columns, centre, reach / (1 + h), (d) => peak * Math.max(0, fn(d * (1 + h), h)));
    }
  }
  return { sunX: sun.x, sunY: sun.y, sunR, scale, corona, prominence, columns, uMin, poleAngle };
}

/** Bilinear look-up in a table of rows x columns, wrapping in position angle. */
function lookUp(table: Float32Array, columns: number, rowF: number, phi: number): number {
  const cf = ((phi + Math.PI) / (2 * Math.PI)) * columns;
  let c0 = Math.floor(cf);
  const fc = cf - c0;
  if (c0 >= columns) c0 -= columns;
  const c1 = c0 + 1 === columns ? 0 : c0 + 1;
  const r0 = Math.floor(rowF);
  const fr = rowF - r0;
  const a = r0 * columns;
  const top = table[a + c0] + fc * (table[a + c1] - table[a + c0]);
  if (fr === 0) return top;
  const b = a + columns;
  const bottom = table[b + c0] + fc * (table[b + c1] - table[b + c0]);
  return top + fr * (bottom - top);
}

/** K+F corona at a scene point, DN/s, before colour; 0 on the solar disk. */
export function evaluateCorona(s: Scene, x: number, y: number): number {
  const dx = x - s.sunX;
  const dy = y - s.sunY;
  const r = Math.sqrt(dx * dx + dy * dy) / s.sunR;
  if (r < 1) return 0;
  const u = 1 / r;
  const rowF = Math.min(CORONA_ROWS - 1, ((1 - u) / (1 - s.uMin)) * (CORONA_ROWS - 1));
  return s.scale * computeBaumbachBrightness(r) * lookUp(s.corona, s.columns, rowF, Math.atan2(dy, dx));
}

/** Prominence light at a scene point, DN/s, before colour. */
export function evaluateProminences(s: Scene, x: number, y: number): number {
  const dx = x - s.sunX;
  const dy = y - s.sunY;
  const h = Math.sqrt(dx * dx + dy * dy) / s.sunR - 1;
  if (h < 0 || h >= PROMINENCE_TOP_R) return 0;
  return lookUp(s.prominence, s.columns, (h / PROMINENCE_TOP_R) * (PROMINENCE_ROWS - 1), Math.atan2(dy, dx));
}
