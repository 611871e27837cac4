// Deep Zoom and IIIF level-0 pyramids of one rendition, reduced in linear light.
// libvips would shrink the 8-bit sRGB codes, and the mean of codes is darker than
// the code of the mean light, so faint streamers and stars fade when zoomed out
// (DESIGN.md, pipeline step 7). Here every level is halved from the one above by
// lib/imaging's linear-light reduction, quantized to 8 bits with dither, and
// sharp only encodes the crops we cut: no resampling happens in sharp.
import { mkdir, writeFile } from "node:fs/promises";
import { dirname, join } from "node:path";
import { halveImageLinear } from "@/lib/imaging/pyramid";
import { quantizeToUint8 } from "@/lib/imaging/tone";
import type { PlaneImage } from "@/lib/imaging/types";
import { createSharp } from "@/lib/media/sharp-setup";
import { buildDziXml, buildIiifInfo, computeDeepZoomLayout, computeDeepZoomTileRect, computeIiifLayout, type TileRect } from "./tile-layout";

export const DZI_TILE_SIZE_PX = 254;
export const DZI_OVERLAP_PX = 1;
export const IIIF_TILE_SIZE_PX = 512;
export const TILE_JPEG_QUALITY = 90;
/** Tiles being encoded at once: enough to keep sharp's threads busy on 2 cores without holding many buffers. */
const TILES_IN_FLIGHT = 8;

export interface TilePyramidOptions {
  /** Writes `<dziBase>.dzi` and `<dziBase>_files/`. */
  dziBase: string;
  /** Folder of the IIIF service: info.json and the tile paths. */
  iiifDir: string;
  /** The IIIF service id (the URL the folder will be served from). */
  iiifId: string;
  dziTileSizePx?: number;
  dziOverlapPx?: number;
  iiifTileSizePx?: number;
  /** Dither seed; each level adds its index so levels do not share one noise pattern. */
  seed?: number;
  onLevel?: (done: number, total: number) => void;
  /** Halves a level in linear light; halveImageLinear unless a caller shares its halvings. */
  halve?: (image: PlaneImage) => PlaneImage;
}

export interface TilePyramidResult {
  dziPath: string;
  dziTileCount: number;
  dziLevelCount: number;
  iiifInfoPath: string;
  iiifTileCount: number;
  iiifScaleFactors: number[];
}

/** Copy a rectangle out of interleaved samples, the crop sharp is given as raw pixels. */
function cropInterleaved(samples: Uint8Array, width: number, channels: number, rect: TileRect): Uint8Array {
  const out = new Uint8Array(rect.width * rect.height * channels);
  const rowBytes = rect.width * channels;
  for (let y = 0; y < rect.height; y++) {
    const from = ((rect.y + y) * width + rect.x) * channels;
    out.set(samples.subarray(from, from + rowBytes), y * rowBytes);
  }
  return out;
}

async function encodeTile(samples: Uint8Array, width: number, channels: 1 | 3, rect: TileRect, path: string): Promise<void> {
  const crop = cropInterleaved(samples, width, channels, rect);
  const pipeline = createSharp(crop, { raw: { width: rect.width, height: rect.height, channels } });
  await (channels === 1 ? pipeline.toColourspace("b-w") : pipeline).jpeg({ quality: TILE_JPEG_QUALITY }).toFile(path);
}

/** Runs the jobs with at most `limit` pending; rejects with the first failure. */
async function runLimited(jobs: (() => Promise<void>)[], limit: number): Promise<void> {
  let next = 0;
  const lanes = Array.from({ length: Math.min(limit, jobs.length) }, async () => {
    while (next < jobs.length) await jobs[next++]();
  });
  await Promise.all(lanes);
}

/**
 * Writes both pyramids of `image` (display values 0..1, sRGB-encoded, 1 or 3
 * planes). The full-size level is quantized as given; each smaller level is
 * halved from the float level above, never from 8-bit codes.
 */
export async function writeTilePyramids(image: PlaneImage, options: TilePyramidOptions): Promise<TilePyramidResult> {
  const channels = image.planes.length;
  if (channels !== 1 && channels !== 3) throw new RangeError(`a tile pyramid needs 1 or 3 planes, got ${channels}`);
  const dziTile = options.dziTileSizePx ?? DZI_TILE_SIZE_PX;
  const dziOverlap = options.dziOverlapPx ?? DZI_OVERLAP_PX;
  const iiifTile = options.iiifTileSizePx ?? IIIF_TILE_SIZE_PX;
  const dzi = computeDeepZoomLayout(image.width, image.height, dziTile, dziOverlap);
  const iiif = computeIiifLayout(image.width, image.height, iiifTile);
  const filesDir = `${options.dziBase}_files`;
  await mkdir(filesDir, { recursive: true });
  await mkdir(options.iiifDir, { recursive: true });

  let level: PlaneImage = image;
  for (let k = 0; k <= dzi.maxLevel; k++) {
    const scaleFactor = 2 ** k;
    const dziLevel = dzi.levels[dzi.maxLevel - k];
    if (level.width !== dziLevel.width || level.height !== dziLevel.height) {
      throw new Error(`pyramid level ${dziLevel.level} is ${level.width} x ${level.height}, the layout expects ${dziLevel.width} x ${dziLevel.height}`);
    }
    const samples = quantizeToUint8(level, (options.seed ?? 1) + k);
    const jobs: (() => Promise<void>)[] = [];
    const levelDir = join(filesDir, String(dziLevel.level));
    await mkdir(levelDir, { recursive: true });
    for (let row = 0; row < dziLevel.rows; row++) {
      for (let column = 0; column < dziLevel.columns; column++) {
        const rect = computeDeepZoomTileRect(dziLevel, column, row, dziTile, dziOverlap);
        jobs.push(() => encodeTile(samples, level.width, channels, rect, join(levelDir, `${column}_${row}.jpg`)));
      }
    }
    for (const tile of iiif.tiles) {
      if (tile.scaleFactor !== scaleFactor) continue;
      const path = join(options.iiifDir, tile.path);
      jobs.push(async () => {
        await mkdir(dirname(path), { recursive: true });
        await encodeTile(samples, level.width, channels, tile.levelRect, path);
      });
    }
    await runLimited(jobs, TILES_IN_FLIGHT);
    options.onLevel?.(k + 1, dzi.maxLevel + 1);
    if (k < dzi.maxLevel) level = (options.halve ?? halveImageLinear)(level);
  }

  const dziPath = `${options.dziBase}.dzi`;
  await writeFile(dziPath, buildDziXml(image.width, image.height, dziTile, dziOverlap, "jpg"));
  const iiifInfoPath = join(options.iiifDir, "info.json");
  await writeFile(iiifInfoPath, `${JSON.stringify(buildIiifInfo(options.iiifId, image.width, image.height, iiifTile, iiif), null, 2)}\n`);
  return {
    dziPath,
    dziTileCount: dzi.tileCount,
    dziLevelCount: dzi.maxLevel + 1,
    iiifInfoPath,
    iiifTileCount: iiif.tiles.length,
    iiifScaleFactors: iiif.scaleFactors,
  };
}
