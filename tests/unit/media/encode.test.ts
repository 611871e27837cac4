import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import sharp from "sharp";
import { afterAll, describe, expect, it } from "vitest";
import { encodePreview, encodeThumbnail, writeDeepZoom, writeIiifLevel0 } from "@/lib/media/encode";

const dir = mkdtempSync(join(tmpdir(), "crownlight-encode-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// A cheap flat grey image: the pyramid's geometry does not depend on the pixels.
const flat = (width: number, height: number) => ({ width, height, planes: [new Uint8Array(width * height).fill(90)] });

describe("Deep Zoom pyramid", () => {
  it("5184x3456, tile 254, overlap 1: 412 tiles in 14 levels (REFERENCES.md, computed)", async () => {
    const { dziPath, filesDir } = await writeDeepZoom(flat(5184, 3456), join(dir, "dz", "plate"), { tileSizePx: 254, overlapPx: 1 });
    const xml = readFileSync(dziPath, "utf8");
    expect(xml).toMatch(/<Image[^>]*xmlns="http:\/\/schemas\.microsoft\.com\/deepzoom\/2008"/);
    expect(xml).toMatch(/TileSize="254"/);
    expect(xml).toMatch(/Overlap="1"/);
    expect(xml).toMatch(/Format="jpeg"/);
    expect(xml).toMatch(/Height="3456"/);
    expect(xml).toMatch(/Width="5184"/);
    const levels = readdirSync(filesDir).filter((entry) => /^\d+$/.test(entry));
    expect(levels.length).toBe(14);
    const tiles = levels.reduce((sum, level) => sum + readdirSync(join(filesDir, level)).filter((f) => f.endsWith(".jpeg") || f.endsWith(".jpg")).length, 0);
    expect(tiles).toBe(412);
    // The top level has ceil(5184 / 254) = 21 columns and ceil(3456 / 254) = 14 rows (DZI level rule, computed).
    expect(existsSync(join(filesDir, "13", "20_13.jpeg"))).toBe(true);
    expect(existsSync(join(filesDir, "13", "21_13.jpeg"))).toBe(false);
  });
});

describe("IIIF Image API 3.0 level 0", () => {
  it("writes info.json with the required fields and the last full-resolution tile of 6000x4000", async () => {
    const outDir = join(dir, "iiif", "plate-1");
    const { infoPath } = await writeIiifLevel0(flat(6000, 4000), outDir, "https://tiles.example.org/iiif", { tileSizePx: 512 });
    const info = JSON.parse(readFileSync(infoPath, "utf8"));
    // Required by IIIF Image API 3.0 (REFERENCES.md).
    expect(info["@context"]).toBe("http://iiif.io/api/image/3/context.json");
    expect(info.id).toBe("https://tiles.example.org/iiif/plate-1");
    expect(info.type).toBe("ImageService3");
    expect(info.protocol).toBe("http://iiif.io/api/image");
    expect(info.profile).toBe("level0");
    expect([info.width, info.height]).toEqual([6000, 4000]);
    expect(info.tiles[0].width).toBe(512);
    expect(info.tiles[0].scaleFactors[0]).toBe(1);
    // REFERENCES.md (computed): /5632,3584,368,416/368,416/0/default.jpg
    expect(existsSync(join(outDir, "5632,3584,368,416", "368,416", "0", "default.jpg"))).toBe(true);
  });
});

describe("previews and thumbnails", () => {
  it("fit the longer side into 2048 and 320 pixels without enlarging small images", async () => {
    const image = flat(4000, 3000);
    const preview = await sharp(await encodePreview(image)).metadata();
    const thumbnail = await sharp(await encodeThumbnail(image)).metadata();
    expect([preview.format, preview.width, preview.height]).toEqual(["jpeg", 2048, 1536]);
    expect([thumbnail.width, thumbnail.height]).toEqual([320, 240]);
    const small = await sharp(await encodeThumbnail(flat(100, 50))).metadata();
    expect([small.width, small.height]).toEqual([100, 50]);
  });
});
