// JPEG, PNG and TIFF (8 and 16 bit) to Float32Array planes through sharp. The
// pixel geometry is kept as stored (no EXIF auto-rotation): kits record their own
// flips, and the limb fit wants the sensor's rows. Sample values are kept as
// stored too: no colour-profile conversion.
import type { PlaneImage } from "@/lib/imaging/types";
import { MediaError } from "./errors";
import { checkPixelCount, createSharp, toMediaError } from "./sharp-setup";

export interface RasterPixels {
  image: PlaneImage;
  bitDepth: 8 | 16;
}

export async function decodeRaster(input: Buffer | string, name: string): Promise<RasterPixels> {
  try {
    const info = await createSharp(input).metadata();
    if (!info.width || !info.height) throw new MediaError("corrupt", name, "the image header gives no width or height");
    checkPixelCount(info.width, info.height, name);
    const is16 = info.depth === "ushort" || info.depth === "short";
    if (!is16 && info.depth !== "uchar" && info.depth !== "char") {
      throw new MediaError("unsupported", name, `${info.depth} samples are not read; give an 8- or 16-bit image`);
    }
    const channelCount = (info.channels ?? 3) - (info.hasAlpha ? 1 : 0);
    const isGrey = channelCount === 1;
    // sharp scales 16-bit data down to 8 bits unless both the colourspace and the raw depth say 16.
    const colourspace = is16 ? (isGrey ? "grey16" : "rgb16") : isGrey ? "b-w" : "srgb";
    // keepIccProfile: sharp otherwise converts from an embedded profile to sRGB, which
    // would put a gamma curve on LibRaw's linear TIFF (it embeds a linear profile).
    const pipeline = createSharp(input).removeAlpha().keepIccProfile().toColourspace(colourspace);
    const { data, info: out } = await (is16 ? pipeline.raw({ depth: "ushort" }) : pipeline.raw()).toBuffer({ resolveWithObject: true });
    const samples = is16 ? new Uint16Array(data.buffer, data.byteOffset, data.byteLength / 2) : data;
    return { image: deinterleave(samples, out.width, out.height, out.channels), bitDepth: is16 ? 16 : 8 };
  } catch (error) {
    throw toMediaError(error, name);
  }
}

export function deinterleave(samples: ArrayLike<number>, width: number, height: number, channels: number): PlaneImage {
  const count = width * height;
  const planes = Array.from({ length: channels }, () => new Float32Array(count));
  // One monomorphic loop per sample type: a generic ArrayLike read per sample
  // costs several times sharp's own decode on a 24-megapixel frame.
  if (channels === 3 && samples instanceof Uint16Array) deinterleaveRgb16(samples, planes[0], planes[1], planes[2], count);
  else if (channels === 3 && samples instanceof Uint8Array) deinterleaveRgb8(samples, planes[0], planes[1], planes[2], count);
  else if (channels === 1) planes[0].set(samples);
  else {
    for (let c = 0; c < channels; c++) {
      const plane = planes[c];
      for (let i = 0, j = c; i < count; i++, j += channels) plane[i] = samples[j];
    }
  }
  return { width, height, planes };
}

function deinterleaveRgb16(samples: Uint16Array, r: Float32Array, g: Float32Array, b: Float32Array, count: number): void {
  for (let i = 0, j = 0; i < count; i++, j += 3) {
    r[i] = samples[j];
    g[i] = samples[j + 1];
    b[i] = samples[j + 2];
  }
}

function deinterleaveRgb8(samples: Uint8Array, r: Float32Array, g: Float32Array, b: Float32Array, count: number): void {
  for (let i = 0, j = 0; i < count; i++, j += 3) {
    r[i] = samples[j];
    g[i] = samples[j + 1];
    b[i] = samples[j + 2];
  }
}
