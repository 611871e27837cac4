// The one place that creates sharp instances: two worker threads (the machines
// have two cores and the queue runs jobs side by side), no cache of results, the pixel limit on every
// constructor (a decompression bomb must fail before it allocates), and sharp's
// error texts turned into MediaErrors that name the file.
import sharp, { type Sharp, type SharpInput, type SharpOptions } from "sharp";
import { MediaError } from "./errors";

/** Largest image we decode: 200 megapixels (a 6000x4000 frame is 24). */
export const MAX_INPUT_PIXELS = 200_000_000;

let isConfigured = false;

function configureSharp(): void {
  if (isConfigured) return;
  sharp.concurrency(2);
  // libvips keeps recent operations' results (sharp's default: up to 50 MB a process) for a
  // caller that asks again; ours decode, tile or encode each input once. Held, they showed as
  // growth in a reduction's peak: 30 frames of 900 x 600 peaked at 441 to 451 MiB with the
  // cache, 402 to 412 without it (10 frames: 381 to 417).
  sharp.cache(false);
  isConfigured = true;
}

export function createSharp(input?: SharpInput, options: SharpOptions = {}): Sharp {
  configureSharp();
  const withLimit: SharpOptions = { ...options, limitInputPixels: MAX_INPUT_PIXELS };
  return input === undefined ? sharp(withLimit) : sharp(input, withLimit);
}

/** Map a sharp or libvips failure to a MediaError with the file name and the fault. */
export function toMediaError(error: unknown, name: string, what = "the image"): MediaError {
  if (error instanceof MediaError) return error;
  const text = error instanceof Error ? error.message : String(error);
  if (/pixel limit/i.test(text)) {
    return new MediaError("too-large", name, `${what} has more pixels than the ${MAX_INPUT_PIXELS / 1e6}-megapixel limit (a decompression bomb or an absurd size)`, { cause: error });
  }
  if (/premature end|truncated|unexpected end|not enough data|read error|end of (file|stream)/i.test(text)) {
    return new MediaError("truncated", name, `${what} is cut short (the file ends before its pixel data do): ${text.trim()}`, { cause: error });
  }
  if (/unsupported image format/i.test(text)) {
    return new MediaError("unknown-format", name, `${what} is in a format the decoder does not recognise`, { cause: error });
  }
  return new MediaError("corrupt", name, `${what} cannot be decoded, the data are corrupt: ${text.trim()}`, { cause: error });
}

/** Refuse an image whose header claims more pixels than we decode, before decoding it. */
export function checkPixelCount(width: number, height: number, name: string): void {
  if (width * height > MAX_INPUT_PIXELS) {
    const megapixels = Math.round((width * height) / 1e6);
    throw new MediaError(
      "too-large",
      name,
      `the image claims ${width} x ${height} pixels (${megapixels} megapixels), more than the ${MAX_INPUT_PIXELS / 1e6}-megapixel limit (a decompression bomb or an absurd size)`,
    );
  }
}
