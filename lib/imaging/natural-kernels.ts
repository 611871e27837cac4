// The natural rendition's per-pixel steps (renderNatural in tone.ts), as kernels
// over ranges of rows or pixels: each pixel's arithmetic is its own, so a runner
// may spread them over threads with the same numbers bit for bit.
import { computeHypot, definePlaneKernel } from "./plane-runner";
import { createSrgbEncoder, decodeSrgb, encodeSrgb } from "./srgb";

export type StretchCurve = "asinh" | "log";

/**
 * Stretch curves on x in [0, 1]: asinh after Lupton et al. (1999), AJ 118:1406,
 * y = asinh(beta x) / asinh(beta); log, y = ln(1 + beta x) / ln(1 + beta).
 */
export function applyStretch(x: number, beta: number, curve: StretchCurve): number {
  if (x <= 0) return 0;
  return curve === "asinh" ? Math.asinh(beta * x) / Math.asinh(beta) : Math.log1p(beta * x) / Math.log1p(beta);
}

/**
 * Highlight shoulder (our own, no published recipe): identity up to the knee k,
 * then y = k + (1 - k)(1 - exp(-(s - k) / (1 - k))), which meets the identity
 * with the same slope at k and approaches 1 without reaching it.
 */
export function applyShoulder(s: number, knee: number): number {
  if (s <= knee) return s;
  if (knee >= 1) return 1;
  return knee + (1 - knee) * (1 - Math.exp(-(s - knee) / (1 - knee)));
}

/**
 * Each pixel's ring of the radial gain on rows [start, end): floor(r / binPx)
 * with r its distance from the centre, or -1 inside innerPx (written into the
 * gain's own buffer, which RADIAL_GAIN then turns into the gain).
 */
export const RADIAL_BINS = definePlaneKernel<{ bins: Float32Array; width: number; cx: number; cy: number; innerPx: number; binPx: number }>("radial-bins", (args, start, end) => {
  const { bins, width, cx, cy, innerPx, binPx } = args;
  for (let y = start; y < end; y++) {
    const o = y * width;
    const dy = y - cy;
    for (let x = 0; x < width; x++) {
      const r = computeHypot(x - cx, dy);
      bins[o + x] = r < innerPx ? -1 : Math.floor(r / binPx);
    }
  }
});

/** The gain of each pixel [start, end) from its ring (RADIAL_BINS), in place: 1 inside the inner radius. */
export const RADIAL_GAIN = definePlaneKernel<{ gain: Float32Array; binGain: Float64Array }>("radial-gain", (args, start, end) => {
  const { gain, binGain } = args;
  const last = binGain.length - 1;
  for (let i = start; i < end; i++) {
    const b = gain[i];
    gain[i] = b < 0 ? 1 : binGain[Math.min(last, b)];
  }
});

/** lum = source g over pixels [start, end). */
export const SCALE_BY_GAIN = definePlaneKernel<{ source: Float32Array; gain: Float32Array; lum: Float32Array }>("scale-by-gain", (args, start, end) => {
  const { source, gain, lum } = args;
  for (let i = start; i < end; i++) lum[i] = source[i] * gain[i];
});

/**
 * renderNatural's display values for pixels [start, end), in place: `planes`
 * hold the image's linear planes and receive the display values (each pixel's
 * planes are all read before any is written). See renderNatural for the steps.
 */
export const NATURAL_PIXELS = definePlaneKernel<{
  planes: Float32Array[]; lum: Float32Array; gain?: Float32Array; black: number; span: number; beta: number; curve: StretchCurve; knee: number;
}>("natural-pixels", (args, start, end) => {
  const { planes, lum, gain, black, span, beta, curve, knee } = args;
  const channels = planes.length;
  const encode = createSrgbEncoder();
  const linear = new Float64Array(channels);
  // applyStretch's divisor, the same number for every pixel.
  const isAsinh = curve === "asinh";
  const stretchTop = isAsinh ? Math.asinh(beta) : Math.log1p(beta);
  for (let i = start; i < end; i++) {
    const x = (lum[i] - black) / span;
    const g = gain ? gain[i] : 1;
    let factor = 0;
    if (x > 0) {
      const xs = Math.min(x, 1e6);
      const stretched = isAsinh ? Math.asinh(beta * xs) / stretchTop : Math.log1p(beta * xs) / stretchTop;
      factor = (decodeSrgb(stretched) / x) * g;
    }
    const shift = black / g;
    let top = 0;
    for (let c = 0; c < channels; c++) {
      const v = ((planes[c][i] - shift) / span) * factor;
      linear[c] = v;
      if (v > top) top = v;
    }
    // The shoulder acts on the brightest plane, and every plane follows it.
    let fit = 1;
    if (top > 0) {
      const e = encodeSrgb(top);
      if (e > knee) fit = decodeSrgb(applyShoulder(e, knee)) / top;
    }
    for (let c = 0; c < channels; c++) planes[c][i] = encode(linear[c] * fit);
  }
});
