// From a decoded frame to what triage shows: an 8-bit thumbnail and the share
// of clipped pixels. Pure typed-array work; the worker does the I/O.
import type { PlaneImage } from "@/lib/imaging/types";

/** DESIGN.md section 3: pixels at or above about 0.92 of the white level count as clipped. */
export const CLIP_FRACTION_OF_WHITE = 0.92;
const THUMBNAIL_SOURCE_SIDE_PX = 640;

/** Fraction (0..1) of pixels where any plane reaches the clip level; 0 without a finite white level. */
export function measureClippedFraction(image: PlaneImage, whiteLevel: number): number {
  if (!Number.isFinite(whiteLevel) || whiteLevel <= 0) return 0;
  const level = whiteLevel * CLIP_FRACTION_OF_WHITE;
  const n = image.width * image.height;
  if (n === 0) return 0;
  let clipped = 0;
  for (let i = 0; i < n; i++) {
    for (const plane of image.planes) {
      if (plane[i] >= level) {
        clipped++;
        break;
      }
    }
  }
  return clipped / n;
}

/** IEC 61966-2-1 sRGB encoding of a linear value in 0..1, as an 8-bit code. */
function encodeSrgb8(linear: number): number {
  const v = linear <= 0 ? 0 : linear >= 1 ? 1 : linear;
  const s = v <= 0.0031308 ? 12.92 * v : 1.055 * Math.pow(v, 1 / 2.4) - 0.055;
  return Math.round(s * 255);
}

/**
 * Uint8 planes for a thumbnail, shrunk by point sampling to about 640 px first
 * (sharp makes the final size). 8-bit sRGB data pass as they are; linear data
 * are scaled so that the white level (or, for float FITS, the brightest sample)
 * maps to white, then sRGB-encoded so the faint corona stays visible.
 */
export function toThumbnailPlanes(
  image: PlaneImage,
  frame: { encoding: "linear" | "srgb8"; blackLevel: number; whiteLevel: number },
): { width: number; height: number; planes: Uint8Array[] } {
  const step = Math.max(1, Math.ceil(Math.max(image.width, image.height) / THUMBNAIL_SOURCE_SIDE_PX));
  const width = Math.ceil(image.width / step);
  const height = Math.ceil(image.height / step);
  let white = frame.whiteLevel;
  if (frame.encoding === "linear" && !Number.isFinite(white)) {
    white = 0;
    for (const plane of image.planes) for (let i = 0; i < plane.length; i += step) if (plane[i] > white) white = plane[i];
  }
  const span = white - frame.blackLevel;
  const planes = image.planes.map((plane) => {
    const out = new Uint8Array(width * height);
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        const v = plane[y * step * image.width + x * step];
        out[y * width + x] =
          frame.encoding === "srgb8" ? Math.max(0, Math.min(255, Math.round(v))) : span > 0 ? encodeSrgb8((v - frame.blackLevel) / span) : 0;
      }
    }
    return out;
  });
  return { width, height, planes };
}
