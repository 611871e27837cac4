// The floor any reduction must at least reach: sharp decoding the same frames to
// 16-bit RGB, plus sharp tiling one rendition (Deep Zoom, JPEG tiles).
import { join } from "node:path";
import { createSharp } from "@/lib/media/sharp-setup";

export async function measureFloorMs(files: string[], naturalPng: string, scratch: string): Promise<{ decodeMs: number; tileMs: number }> {
  let started = performance.now();
  for (const file of files) {
    await createSharp(file).toColourspace("rgb16").raw({ depth: "ushort" }).toBuffer();
  }
  const decodeMs = performance.now() - started;
  started = performance.now();
  await createSharp(naturalPng).toColourspace("srgb").jpeg({ quality: 90 }).tile({ layout: "dz", size: 254, overlap: 1 }).toFile(join(scratch, "floor.dz"));
  return { decodeMs, tileMs: performance.now() - started };
}
