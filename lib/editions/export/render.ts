// The image files of one plate in a print bundle, made by sharp from the
// rendition's 16-bit PNG: a 16-bit LZW TIFF in sRGB with its ICC profile, a
// high-quality JPEG (sRGB, 4:4:4), and on request an 8-bit CMYK TIFF (the
// profile named in the bundle) and a 16-bit greyscale TIFF. Sizes come from
// planPrintSize: the exact width the slot asks for, never more pixels than the
// rendition has (a smaller rendition prints at the same width with fewer dots
// per inch, and the plan says so).
import { writeFile } from "node:fs/promises";
import { join } from "node:path";
import type { Sharp } from "sharp";
import { createSharp, toMediaError } from "@/lib/media/sharp-setup";
import { MM_PER_INCH, type PixelSize } from "../print-sizes";

export const JPEG_QUALITY = 95;

export interface PrintPlan {
  width: number;
  height: number;
  /** The dots per inch the file is tagged with and prints at; null for a screen slot. */
  dpi: number | null;
  /** The printed width in mm; null for a screen slot. */
  widthMm: number | null;
  /** The slot asked for more pixels than the rendition has: the shortfall, said plainly. */
  shortfall: string | null;
}

/**
 * The pixel size of an export: the slot's width when the rendition has it,
 * else the rendition's own width at a lower effective dpi, so the print keeps
 * its width and the data are never enlarged.
 */
export function planPrintSize(needed: PixelSize, available: PixelSize, slot: { widthMm: number | null; dpi: number | null }): PrintPlan {
  if (needed.width <= available.width) {
    return { width: needed.width, height: Math.round((needed.width * available.height) / available.width), dpi: slot.dpi, widthMm: slot.widthMm, shortfall: null };
  }
  const dpi = slot.widthMm ? Number(((available.width / slot.widthMm) * MM_PER_INCH).toFixed(1)) : null;
  const shortfall = slot.widthMm
    ? `the slot asks for ${needed.width} px at ${slot.dpi} dpi but the rendition has ${available.width} px: the file keeps ${available.width} px and prints ${slot.widthMm} mm wide at ${dpi} dpi`
    : `the slot asks for ${needed.width} px but the rendition has ${available.width} px: the file keeps ${available.width} px`;
  return { width: available.width, height: available.height, dpi, widthMm: slot.widthMm, shortfall };
}

export interface RenderOptions {
  cmyk: boolean;
  greyscale: boolean;
  /** A CMYK ICC profile file to convert to; libvips' built-in CMYK profile when absent. */
  cmykProfilePath?: string;
}

export interface RenderedFile {
  kind: "tiff-srgb" | "jpeg" | "tiff-cmyk" | "tiff-grey";
  name: string;
  path: string;
}

/** The rendition resized once to the plan, as raw 16-bit RGB: every variant starts from it, so the PNG is decoded once. */
async function resizedRaw(source: Buffer, plan: PrintPlan, name: string): Promise<{ data: Uint16Array; width: number; height: number }> {
  try {
    const { data, info } = await createSharp(source)
      .resize({ width: plan.width, height: plan.height, fit: "fill", kernel: "lanczos3" })
      .toColourspace("rgb16")
      .raw({ depth: "ushort" })
      .toBuffer({ resolveWithObject: true });
    if (info.channels !== 3) throw new Error(`expected 3 channels after conversion, got ${info.channels}`);
    return { data: new Uint16Array(data.buffer, data.byteOffset, data.length / 2), width: info.width, height: info.height };
  } catch (err) {
    throw toMediaError(err, name, "the rendition");
  }
}

/** Writes the plate's files into dir under the given stem; returns them in bundle order. */
export async function renderPlateFiles(source: Buffer, sourceName: string, plan: PrintPlan, stem: string, dir: string, options: RenderOptions): Promise<RenderedFile[]> {
  const out: RenderedFile[] = [];
  const raw = await resizedRaw(source, plan, sourceName);
  const resized = (): Sharp => createSharp(raw.data, { raw: { width: raw.width, height: raw.height, channels: 3 } });
  const write = async (kind: RenderedFile["kind"], suffix: string, make: () => Promise<Buffer>) => {
    const name = `${stem}${suffix}`;
    const path = join(dir, name);
    let bytes: Buffer;
    try {
      bytes = await make();
    } catch (err) {
      throw toMediaError(err, sourceName, "the rendition");
    }
    // A disk fault is not the rendition's: it propagates as it is, and the job is retried.
    await writeFile(path, bytes);
    out.push({ kind, name, path });
  };
  // 16-bit TIFF needs an explicit compression or sharp writes 8 bits (STACK.md).
  await write("tiff-srgb", ".tif", () =>
    resized().toColourspace("rgb16").withIccProfile("srgb").tiff({ compression: "lzw", predictor: "horizontal" }).toBuffer(),
  );
  await write("jpeg", ".jpg", () =>
    resized().toColourspace("srgb").withIccProfile("srgb").jpeg({ quality: JPEG_QUALITY, chromaSubsampling: "4:4:4", mozjpeg: false }).toBuffer(),
  );
  if (options.cmyk) {
    await write("tiff-cmyk", "_cmyk.tif", () =>
      resized()
        .withIccProfile(options.cmykProfilePath ?? "cmyk")
        .toColourspace("cmyk")
        .tiff({ compression: "lzw" })
        .toBuffer(),
    );
  }
  if (options.greyscale) {
    await write("tiff-grey", "_grey.tif", () => resized().toColourspace("grey16").tiff({ compression: "lzw", predictor: "horizontal" }).toBuffer());
  }
  return out;
}
