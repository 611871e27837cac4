// The files of one reduction, written into its staging folder: the master FITS,
// 16-bit PNGs of both renditions, a JPEG preview and both tile pyramids.
import { writeFile } from "node:fs/promises";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { encodePreview, writeFitsFile, writePng16 } from "@/lib/media";
import { PREVIEW_MAX_SIDE_PX } from "@/lib/media/encode";
import { halveImageLinear } from "@/lib/imaging/pyramid";
import { quantizeToUint16, quantizeToUint8 } from "@/lib/imaging/tone";
import type { ReductionResult } from "@/lib/imaging/pipeline";
import type { PlaneImage } from "@/lib/imaging/types";
import { buildMasterCards, type MasterHeaderInput } from "./master-fits";
import { writeTilePyramids, type TilePyramidResult } from "./tiles";

export const RENDITIONS = ["natural", "structure"] as const;
export type RenditionName = (typeof RENDITIONS)[number];

export type HalveFn = (image: PlaneImage) => PlaneImage;

/**
 * halveImageLinear remembered per image, so the preview and the tile pyramid of
 * one rendition compute each shared level once. Levels live as long as the image
 * they were halved from.
 */
export function createHalvingCache(): HalveFn {
  const halved = new WeakMap<PlaneImage, PlaneImage>();
  return (image) => {
    let level = halved.get(image);
    if (!level) {
      level = halveImageLinear(image);
      halved.set(image, level);
    }
    return level;
  };
}

/** Channels of a rendition (1 or 3 planes). */
function channelsOf(image: PlaneImage): 1 | 3 {
  return image.planes.length === 1 ? 1 : 3;
}

export async function writeMasterFits(dir: string, header: MasterHeaderInput): Promise<string> {
  const path = join(dir, "master.fits");
  const { cards, history } = buildMasterCards(header);
  const { master } = header.result;
  await writeFitsFile(path, { width: master.width, height: master.height, planes: master.planes, cards, history });
  return path;
}

export async function writeRenditionPng(dir: string, name: RenditionName, image: PlaneImage): Promise<string> {
  const path = join(dir, `${name}.png`);
  await writePng16({ width: image.width, height: image.height, channels: channelsOf(image), samples: quantizeToUint16(image) }, path);
  return path;
}

/**
 * Preview JPEG of a rendition (preview.jpg is the natural one; the reduction
 * page shows preview-structure.jpg beside it). Halved in linear light (as the tiles
 * are) while more than twice the preview size, so sharp's final resize in
 * encoded values spans less than a factor of two.
 */
export async function writePreview(dir: string, image: PlaneImage, halve: HalveFn = halveImageLinear, fileName = "preview.jpg"): Promise<string> {
  let level = image;
  while (Math.max(level.width, level.height) > 2 * PREVIEW_MAX_SIDE_PX) level = halve(level);
  // Each plane dithered from a seed of its own (101, 102, 103).
  const samples = quantizeToUint8(level, level.planes.map((_, k) => 101 + k));
  const path = join(dir, fileName);
  await writeFile(path, await encodePreview({ width: level.width, height: level.height, channels: channelsOf(level), samples }));
  return path;
}

/**
 * Both pyramids of one rendition under `<dir>/tiles/`: `<name>.dzi` with
 * `<name>_files/`, and the IIIF service `<name>-iiif/`. The IIIF id is
 * `<iiifBaseUrl>/<name>-iiif`; without a base URL it is the file URL of the final folder.
 */
export async function writeRenditionTiles(
  dir: string, finalDir: string, name: RenditionName, image: PlaneImage, iiifBaseUrl?: string, onLevel?: (done: number, total: number) => void, halve?: HalveFn,
): Promise<TilePyramidResult> {
  const tilesDir = join(dir, "tiles");
  const base = iiifBaseUrl ? iiifBaseUrl.replace(/\/+$/, "") : pathToFileURL(join(finalDir, "tiles")).href;
  return writeTilePyramids(image, {
    dziBase: join(tilesDir, name),
    iiifDir: join(tilesDir, `${name}-iiif`),
    iiifId: `${base}/${name}-iiif`,
    seed: name === "natural" ? 1 : 2,
    onLevel,
    halve,
  });
}

export function pickRendition(result: ReductionResult, name: RenditionName): PlaneImage {
  return name === "natural" ? result.natural : result.structure;
}
