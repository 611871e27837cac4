// The two renditions of a master (a reduction's or a composite's), one after the
// other, each buffer let go after its last reader, so that at 24 megapixels the
// structure filter's working planes never sit beside the natural rendition:
// - structure: the radial filter (MGN or NRGF) of the luminance about the Sun's
//   centre, the lunar disk, uncovered pixels and an edge band masked;
// - natural: the tone map in linear light, its white point at the top of the
//   inner corona, the same edge band black.
import { LIMB_MARGIN_PX } from "./frame-stage";
import { repairDefects } from "./linearize";
import { SERIAL_PLANE_RUNNER, type PlaneRunner } from "./plane-runner";
import { applyMgn, applyNrgf, blendWithGlobalImage, createValidMask, type LunarDisk } from "./radial";
import { computeLuminancePlane } from "./srgb";
import { createStructureMask } from "./structure-noise";
import { computePercentiles, measureWhiteFraction, renderNatural, renderStructure, type NaturalRendition } from "./tone";
import { DEFAULT_REDUCTION_PARAMS, type PlaneImage, type ReductionParams } from "./types";

/** log2 of the 99.9th over the 0.1th percentile of positive, well-exposed luminance outside the Moon. */
export function measureDynamicRangeStops(lum: Float32Array, width: number, height: number, coverage: Uint16Array, moon: LunarDisk): number {
  const valid = createValidMask(width, height, { ...moon, radiusPx: moon.radiusPx + LIMB_MARGIN_PX });
  for (let i = 0; i < lum.length; i++) if (!coverage[i] || !(lum[i] > 0)) valid[i] = 0;
  const [lo, hi] = computePercentiles(lum, [0.1, 99.9], valid);
  return lo > 0 && hi > lo ? Math.log2(hi / lo) : 0;
}

/** Sets every plane to 0 within bandPx of the image's edge. */
function blankEdgeBand(image: PlaneImage, bandPx: number): void {
  const { width, height } = image;
  for (const p of image.planes) {
    for (let y = 0; y < height; y++) {
      const row = y * width;
      if (y < bandPx || y >= height - bandPx) p.fill(0, row, row + width);
      else {
        p.fill(0, row, row + Math.min(bandPx, width));
        p.fill(0, row + Math.max(0, width - bandPx), row + width);
      }
    }
  }
}

export interface RenditionsInput {
  master: PlaneImage;
  /** Pixels no input lit (every frame's defect there): shown filled from their neighbours, kept empty in the master. */
  holes?: Uint8Array;
  coverage: Uint16Array;
  /** The lunar disk the master shows (masked in both renditions' statistics and the filter). */
  moon: LunarDisk;
  /** Centre of the radial filter: the Sun's. */
  filterCentre: { x: number; y: number };
  /** Pixels along the canvas edge masked in the structure rendition and black in the natural one. */
  edgeBandPx: number;
  params: Pick<ReductionParams, "filter" | "filterStrength">;
  /** Noise variance of the luminance per pixel, when the caller knows it (MGN's SNR weighting; estimated from the image when absent). */
  noiseVariance?: Float32Array;
  runner?: PlaneRunner;
  /** "renditions" at 0, at 0.5 when the structure rendition is done, and at 1. */
  onProgress?: (stage: string, fraction: number) => void;
}

export interface Renditions {
  structure: PlaneImage;
  natural: NaturalRendition;
  dynamicRangeStops: number;
  whiteFractionAtLimb: number;
}

/**
 * The structure rendition of the luminance; every plane of the filter's is let go
 * (released to the runner) before it returns. MGN lets the luminance go too, once
 * it has scaled it (`luminanceReleased` says so): the caller makes it again if it needs it.
 */
function renderStructureRendition(input: RenditionsInput, luminance: Float32Array, structureMask: Uint8Array, filterDisk: LunarDisk, runner: PlaneRunner): { structure: PlaneImage; luminanceReleased: boolean } {
  const { width, height } = input.master;
  const { params, filterCentre } = input;
  const filterStrength = params.filterStrength ?? DEFAULT_REDUCTION_PARAMS.filterStrength!;
  const isMgn = params.filter === "mgn";
  // The strength weighs local structure against the overall image: MGN's h is its complement.
  const filtered = isMgn
    ? applyMgn(luminance, width, height, { lunarDisk: filterDisk, valid: structureMask, h: 1 - filterStrength, noiseVariance: input.noiseVariance, runner, releasePlane: true })
    : blendWithGlobalImage(applyNrgf(luminance, width, height, { sunCentre: filterCentre, lunarDisk: filterDisk, valid: structureMask }), luminance, filterStrength);
  const structure = renderStructure(filtered, width, height);
  runner.release(filtered.data, filtered.valid);
  return { structure, luminanceReleased: isMgn };
}

/**
 * Both renditions and their figures. A runner spreads the per-pixel steps and
 * blurs over its threads: the same renditions and figures bit for bit.
 */
export function renderMasterRenditions(input: RenditionsInput): Renditions {
  const { master, holes, coverage, moon, edgeBandPx } = input;
  const { width, height } = master;
  const runner = input.runner ?? SERIAL_PLANE_RUNNER;
  const progress = (fraction: number) => input.onProgress?.("renditions", fraction);
  // The filled copy is made where it is read (twice, when there are holes), not kept beside
  // the structure filter's buffers.
  const makeShown = (): PlaneImage => (holes ? { width, height, planes: master.planes.map((p) => repairDefects(p, holes, width, height)) } : master);
  progress(0);
  const makeLuminance = () => computeLuminancePlane(makeShown().planes, runner.float32(width * height, true));
  let luminance: Float32Array | undefined = makeLuminance();
  const dynamicRangeStops = measureDynamicRangeStops(luminance, width, height, coverage, moon);
  const filterDisk = { ...moon, radiusPx: moon.radiusPx + 1 };
  // Uncovered pixels and the canvas edge are masked, not enhanced.
  const structureMask = createStructureMask(width, height, coverage, { lunarDisk: filterDisk, edgeBandPx });
  const { structure, luminanceReleased } = renderStructureRendition(input, luminance, structureMask, filterDisk, runner);
  // The filter's planes are done with: the natural rendition's are fewer (see PlaneRunner.trim).
  runner.trim();
  // MGN let the luminance go beside its working planes (one 24 MP plane less at the peak): the
  // same luminance is made again for the natural rendition.
  if (luminanceReleased) luminance = makeLuminance();

  progress(0.5);
  const outsideMoon = createValidMask(width, height, moon);
  // White point at the top of the inner corona: the ring from the lunar limb to about 1.1 solar radii.
  const limbRing = { x: moon.x, y: moon.y, innerPx: moon.radiusPx, outerPx: 1.1 * moon.radiusPx };
  const natural = renderNatural(makeShown(), { valid: outsideMoon, luminance, limbRing, runner });
  runner.release(luminance);
  luminance = undefined;
  // The same band is black in the natural rendition too: there only some frames reach, and a
  // column lit by the short exposures alone showed as a dotted line along the edge.
  blankEdgeBand(natural.image, edgeBandPx);
  const whiteFractionAtLimb = measureWhiteFraction(natural.image, limbRing, undefined, outsideMoon);
  progress(1);
  return { structure, natural, dynamicRangeStops, whiteFractionAtLimb };
}
