// Typed-array planes -> files: 16-bit PNG for downloads, 8-bit sRGB JPEG previews
// and thumbnails, and tile pyramids (Deep Zoom, IIIF Image API 3.0 level 0).
// The pyramids are reduced by sharp (libvips shrinks the 8-bit sRGB levels in
// their encoded values); DESIGN.md wants the reduction in linear light, which
// lib/imaging will provide as pre-reduced levels when it lands.
import { mkdir, writeFile } from "node:fs/promises";
import { dirname } from "node:path";
import type { Sharp } from "sharp";
import { MediaError } from "./errors";
import { createSharp } from "./sharp-setup";

export interface Planes<T extends Uint8Array | Uint16Array> {
  width: number;
  height: number;
  /** 1 (grey) or 3 (RGB) planes, row-major, each width * height long. */
  planes: T[];
}

export const PREVIEW_MAX_SIDE_PX = 2048;
export const THUMBNAIL_MAX_SIDE_PX = 320;
export const DZI_TILE_SIZE_PX = 254;
export const DZI_OVERLAP_PX = 1;
export const IIIF_TILE_SIZE_PX = 512;

/** Samples already interleaved (RGBRGB... or grey), as the quantizers in lib/imaging/tone.ts give them. */
export interface Interleaved<T extends Uint8Array | Uint16Array> {
  width: number;
  height: number;
  channels: 1 | 3;
  samples: T;
}

function interleave<T extends Uint8Array | Uint16Array>(image: Planes<T>, where: string): T {
  const { width, height, planes } = image;
  if (planes.length !== 1 && planes.length !== 3) throw new MediaError("bad-argument", where, `an image needs 1 or 3 planes, not ${planes.length}`);
  const count = width * height;
  planes.forEach((plane, i) => {
    if (plane.length !== count) throw new MediaError("bad-argument", where, `plane ${i} holds ${plane.length} pixels, not ${width} x ${height}`);
  });
  if (planes.length === 1) return planes[0];
  const out = new (planes[0].constructor as { new (n: number): T })(count * 3);
  for (let i = 0; i < count; i++) {
    out[i * 3] = planes[0][i];
    out[i * 3 + 1] = planes[1][i];
    out[i * 3 + 2] = planes[2][i];
  }
  return out;
}

function fromPlanes<T extends Uint8Array | Uint16Array>(image: Planes<T> | Interleaved<T>, where: string): Sharp {
  let data: T;
  let channels: 1 | 3;
  if ("samples" in image) {
    ({ samples: data, channels } = image);
    if ((channels !== 1 && channels !== 3) || data.length !== image.width * image.height * channels) {
      throw new MediaError("bad-argument", where, `${data.length} samples are not ${image.width} x ${image.height} pixels of ${channels} channels`);
    }
  } else {
    data = interleave(image, where);
    channels = image.planes.length as 1 | 3;
  }
  const pipeline = createSharp(data, { raw: { width: image.width, height: image.height, channels } });
  if (data instanceof Uint16Array) return pipeline.toColourspace(channels === 1 ? "grey16" : "rgb16");
  return channels === 1 ? pipeline.toColourspace("b-w") : pipeline;
}

/**
 * PNG's zlib level for 16-bit images: at 24 megapixels level 3 made the natural
 * rendition's file as small as level 6 did (128.4 MB and 128.3 MB) in 3.6 s of
 * CPU instead of 4.6 (level 1: 139 MB, 2.5 s). The pixels are the same at any level.
 */
const PNG_COMPRESSION_LEVEL = 3;

/** A 16-bit PNG (grey or RGB) of the planes' values, written to `outPath` when given. */
export async function encodePng16(image: Planes<Uint16Array> | Interleaved<Uint16Array>, outPath?: string): Promise<Buffer> {
  const buffer = await fromPlanes(image, outPath ?? "PNG").png({ compressionLevel: PNG_COMPRESSION_LEVEL }).toBuffer();
  if (outPath) await writeFile(outPath, buffer);
  return buffer;
}

/** encodePng16 straight into a file, the same bytes without holding the encoded file in memory (100 MB and more at 24 megapixels). */
export async function writePng16(image: Planes<Uint16Array> | Interleaved<Uint16Array>, outPath: string): Promise<void> {
  await fromPlanes(image, outPath).png({ compressionLevel: PNG_COMPRESSION_LEVEL }).toFile(outPath);
}

/** An 8-bit sRGB JPEG no larger than `maxSidePx` on its longer side (never enlarged). */
export async function encodeJpeg(image: Planes<Uint8Array> | Interleaved<Uint8Array>, options: { maxSidePx: number; quality?: number }): Promise<Buffer> {
  return fromPlanes(image, "JPEG")
    .resize({ width: options.maxSidePx, height: options.maxSidePx, fit: "inside", withoutEnlargement: true })
    .jpeg({ quality: options.quality ?? 88, chromaSubsampling: "4:4:4" })
    .toBuffer();
}

export function encodePreview(image: Planes<Uint8Array> | Interleaved<Uint8Array>): Promise<Buffer> {
  return encodeJpeg(image, { maxSidePx: PREVIEW_MAX_SIDE_PX, quality: 88 });
}

export function encodeThumbnail(image: Planes<Uint8Array>): Promise<Buffer> {
  return encodeJpeg(image, { maxSidePx: THUMBNAIL_MAX_SIDE_PX, quality: 80 });
}

/**
 * Deep Zoom pyramid: `<outBase>.dzi` and `<outBase>_files/<level>/<col>_<row>.jpg`,
 * levels down to one pixel as the DZI format defines them.
 */
export async function writeDeepZoom(image: Planes<Uint8Array>, outBase: string, options: { tileSizePx?: number; overlapPx?: number } = {}): Promise<{ dziPath: string; filesDir: string }> {
  await mkdir(dirname(outBase), { recursive: true });
  await fromPlanes(image, outBase)
    .jpeg({ quality: 90 })
    .tile({ layout: "dz", size: options.tileSizePx ?? DZI_TILE_SIZE_PX, overlap: options.overlapPx ?? DZI_OVERLAP_PX })
    .toFile(`${outBase}.dz`);
  return { dziPath: `${outBase}.dzi`, filesDir: `${outBase}_files` };
}

/**
 * IIIF Image API 3.0 level-0 tiles and info.json under `outDir`. `baseId` is the
 * URL prefix the service will be served from; the service id is
 * `${baseId}/${basename(outDir)}`, the form sharp writes into info.json.
 */
export async function writeIiifLevel0(image: Planes<Uint8Array>, outDir: string, baseId: string, options: { tileSizePx?: number } = {}): Promise<{ infoPath: string }> {
  await mkdir(dirname(outDir), { recursive: true });
  await fromPlanes(image, outDir)
    .jpeg({ quality: 90 })
    .tile({ layout: "iiif3", size: options.tileSizePx ?? IIIF_TILE_SIZE_PX, id: baseId })
    .toFile(outDir);
  return { infoPath: `${outDir}/info.json` };
}
