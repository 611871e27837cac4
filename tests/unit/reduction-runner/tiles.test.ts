// Tile pyramids reduced in linear light: layouts against the published counts
// (REFERENCES.md, "Files and publishing standards"), the files written against
// libvips' own layout of the same image, and the reduction itself against the
// sRGB transfer function.
import { mkdtempSync, readFileSync, readdirSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import sharp from "sharp";
import { afterAll, describe, expect, it } from "vitest";
import { computeDeepZoomLayout, computeIiifLayout, computeIiifScaleFactors } from "@/lib/reduction-runner/tile-layout";
import { writeTilePyramids } from "@/lib/reduction-runner/tiles";

const dir = mkdtempSync(join(tmpdir(), "crownlight-tiles-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function listFiles(root: string): string[] {
  const out: string[] = [];
  const walk = (at: string) => {
    for (const name of readdirSync(at)) {
      const path = join(at, name);
      if (statSync(path).isDirectory()) walk(path);
      else out.push(relative(root, path));
    }
  };
  walk(root);
  return out.sort();
}

describe("tile layouts", () => {
  it("Deep Zoom: 5184 x 3456, tile 254, overlap 1 has 412 tiles in 14 levels (REFERENCES.md, computed)", () => {
    const layout = computeDeepZoomLayout(5184, 3456, 254, 1);
    expect(layout.levels).toHaveLength(14);
    expect(layout.tileCount).toBe(412);
    // Level L is ceil(W / 2^(maxLevel - L)) wide (the DZI definition quoted in REFERENCES.md).
    expect(layout.levels[12]).toMatchObject({ width: 2592, height: 1728 });
    expect(layout.levels[0]).toMatchObject({ width: 1, height: 1, columns: 1, rows: 1 });
  });

  it("IIIF 3.0: the last scale-factor-1 tile of 6000 x 4000 with 512 tiles (REFERENCES.md, computed)", () => {
    const layout = computeIiifLayout(6000, 4000, 512);
    const full = layout.tiles.filter((t) => t.scaleFactor === 1);
    expect(`/${full[full.length - 1].path}`).toBe("/5632,3584,368,416/368,416/0/default.jpg");
    expect(full).toHaveLength(12 * 8);
  });

  it("refuses sizes that are not positive integers, naming the field", () => {
    expect(() => computeDeepZoomLayout(0, 10, 254, 1)).toThrow(/positive integers, got 0 x 10/);
    expect(() => computeIiifScaleFactors(10, 10, 8)).toThrow(/tile size must be an integer from 16/);
    expect(() => computeDeepZoomLayout(10, 10, 254, 200)).toThrow(/tile overlap/);
  });
});

describe("writeTilePyramids", () => {
  const width = 700;
  const height = 300;
  // A checkerboard of black and white pixels: its true mean light is 0.5.
  const board = new Float32Array(width * height);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) board[y * width + x] = (x + y) % 2;
  const image = { width, height, planes: [board, board, board] };

  it("writes the same files as libvips lays out for the same image", async () => {
    const ours = await writeTilePyramids(image, { dziBase: join(dir, "ours", "natural"), iiifDir: join(dir, "ours", "natural-iiif"), iiifId: "https://tiles.example/natural-iiif" });
    const raw = Buffer.alloc(width * height * 3, 0);
    const vipsRoot = join(dir, "vips");
    await sharp(raw, { raw: { width, height, channels: 3 } }).jpeg().tile({ layout: "dz", size: 254, overlap: 1 }).toFile(join(vipsRoot, "natural.dz"));
    await sharp(raw, { raw: { width, height, channels: 3 } }).jpeg().tile({ layout: "iiif3", size: 512, id: "https://tiles.example" }).toFile(join(vipsRoot, "natural-iiif"));

    const dziOurs = listFiles(join(dir, "ours", "natural_files"));
    const dziVips = listFiles(join(vipsRoot, "natural_files")).filter((f) => f.endsWith(".jpeg")).map((f) => f.replace(/\.jpeg$/, ".jpg"));
    expect(dziOurs).toEqual(dziVips);
    expect(dziOurs).toHaveLength(ours.dziTileCount);

    // Ours adds full/max for viewers that ask for the unscaled whole image; libvips writes none here.
    const iiifOurs = listFiles(join(dir, "ours", "natural-iiif")).filter((f) => !f.startsWith("full/max"));
    expect(iiifOurs).toEqual(listFiles(join(vipsRoot, "natural-iiif")));

    const info = JSON.parse(readFileSync(ours.iiifInfoPath, "utf8"));
    expect(info).toMatchObject({ "@context": "http://iiif.io/api/image/3/context.json", id: "https://tiles.example/natural-iiif", type: "ImageService3", protocol: "http://iiif.io/api/image", profile: "level0", width, height });
    expect(info.tiles[0].scaleFactors).toEqual([1, 2]);
    const dzi = readFileSync(ours.dziPath, "utf8");
    expect(dzi).toMatch(/TileSize="254"/);
    expect(dzi).toMatch(/<Size Width="700" Height="300"\/>/);

    // Tile pixel sizes: an inner tile carries one overlap pixel on each side.
    const inner = await sharp(join(dir, "ours", "natural_files", "10", "1_0.jpg")).metadata();
    expect([inner.width, inner.height]).toEqual([256, 255]);
  });

  it("halves in linear light: a black-and-white checkerboard shrinks to the code of 0.5 light, not to mid-grey codes", async () => {
    const { data } = await sharp(join(dir, "ours", "natural_files", "9", "0_0.jpg")).raw().toBuffer({ resolveWithObject: true });
    let sum = 0;
    for (const v of data) sum += v;
    const mean = sum / data.length;
    // IEC 61966-2-1 encode(0.5) = 0.735357 -> 187.5 codes (REFERENCES.md, computed). Tolerance 2
    // codes: JPEG quality 90 on a flat tile and +-1 code of dither. A reduction of codes gives 127.5.
    expect(Math.abs(mean - 0.735357 * 255)).toBeLessThan(2);
  });
});
