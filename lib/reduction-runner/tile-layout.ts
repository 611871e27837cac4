// Where every tile of a zoom pyramid goes, computed without pixels so the writer,
// its tests and the viewer agree on one layout.
//  - Deep Zoom: level L of maxLevel = ceil(log2(max(W, H))) is ceil(W / 2^(maxLevel - L))
//    wide; tiles of TileSize with Overlap pixels shared on each inner edge; files
//    <base>_files/<level>/<column>_<row>.<format>.
//  - IIIF Image API 3.0, level 0: {id}/{region}/{size}/{rotation}/{quality}.{format}
//    with region "x,y,w,h" in full-resolution pixels and size "w,h"; a tile that
//    covers the whole image uses region "full" (section 4.1, canonical form).
//    Scale factors double until one tile holds the whole level, as libvips lays
//    out its own IIIF pyramids, so viewers that know that layout find every tile.

export interface DeepZoomLevel {
  level: number;
  width: number;
  height: number;
  columns: number;
  rows: number;
}

export interface DeepZoomLayout {
  maxLevel: number;
  levels: DeepZoomLevel[];
  tileCount: number;
}

export interface TileRect {
  x: number;
  y: number;
  width: number;
  height: number;
}

function requireImageSize(width: number, height: number): void {
  if (!(Number.isInteger(width) && Number.isInteger(height) && width > 0 && height > 0)) {
    throw new RangeError(`a tile pyramid needs a size of two positive integers, got ${width} x ${height}`);
  }
}

function requireTileSize(tileSizePx: number, overlapPx = 0): void {
  if (!(Number.isInteger(tileSizePx) && tileSizePx >= 16 && tileSizePx <= 4096)) {
    throw new RangeError(`tile size must be an integer from 16 to 4096 px, got ${tileSizePx}`);
  }
  if (!(Number.isInteger(overlapPx) && overlapPx >= 0 && overlapPx < tileSizePx / 2)) {
    throw new RangeError(`tile overlap must be an integer from 0 to half the tile size, got ${overlapPx}`);
  }
}

export function computeDeepZoomLayout(width: number, height: number, tileSizePx: number, overlapPx: number): DeepZoomLayout {
  requireImageSize(width, height);
  requireTileSize(tileSizePx, overlapPx);
  const maxLevel = Math.ceil(Math.log2(Math.max(width, height)));
  const levels: DeepZoomLevel[] = [];
  for (let level = 0; level <= maxLevel; level++) {
    const factor = 2 ** (maxLevel - level);
    const w = Math.ceil(width / factor);
    const h = Math.ceil(height / factor);
    levels.push({ level, width: w, height: h, columns: Math.ceil(w / tileSizePx), rows: Math.ceil(h / tileSizePx) });
  }
  return { maxLevel, levels, tileCount: levels.reduce((sum, l) => sum + l.columns * l.rows, 0) };
}

/** Pixels of tile (column, row) in its level, overlap included on the sides that have a neighbour. */
export function computeDeepZoomTileRect(level: DeepZoomLevel, column: number, row: number, tileSizePx: number, overlapPx: number): TileRect {
  const x0 = Math.max(0, column * tileSizePx - overlapPx);
  const y0 = Math.max(0, row * tileSizePx - overlapPx);
  const x1 = Math.min(level.width, (column + 1) * tileSizePx + overlapPx);
  const y1 = Math.min(level.height, (row + 1) * tileSizePx + overlapPx);
  return { x: x0, y: y0, width: x1 - x0, height: y1 - y0 };
}

export interface IiifTile {
  scaleFactor: number;
  /** Pixels in the reduced level (what the tile's image holds). */
  levelRect: TileRect;
  /** Path below the service id, without a leading slash: "x,y,w,h/w,h/0/default.jpg". */
  path: string;
}

export interface IiifLayout {
  scaleFactors: number[];
  tiles: IiifTile[];
  /** Whole-image sizes offered (the smallest level), for info.json "sizes". */
  sizes: { width: number; height: number }[];
}

/** Scale factors 1, 2, 4, ... up to the first whose level fits in one tile. */
export function computeIiifScaleFactors(width: number, height: number, tileSizePx: number): number[] {
  requireImageSize(width, height);
  requireTileSize(tileSizePx);
  const factors = [1];
  while (Math.ceil(width / factors[factors.length - 1]) > tileSizePx || Math.ceil(height / factors[factors.length - 1]) > tileSizePx) {
    factors.push(factors[factors.length - 1] * 2);
  }
  return factors;
}

export function computeIiifLayout(width: number, height: number, tileSizePx: number, format = "jpg"): IiifLayout {
  const scaleFactors = computeIiifScaleFactors(width, height, tileSizePx);
  const tiles: IiifTile[] = [];
  const sizes: { width: number; height: number }[] = [];
  for (const sf of scaleFactors) {
    const levelWidth = Math.ceil(width / sf);
    const levelHeight = Math.ceil(height / sf);
    for (let y = 0; y < levelHeight; y += tileSizePx) {
      for (let x = 0; x < levelWidth; x += tileSizePx) {
        const levelRect = { x, y, width: Math.min(tileSizePx, levelWidth - x), height: Math.min(tileSizePx, levelHeight - y) };
        const isWhole = levelRect.width === levelWidth && levelRect.height === levelHeight;
        const fullX = x * sf, fullY = y * sf;
        const region = isWhole ? "full" : `${fullX},${fullY},${Math.min(tileSizePx * sf, width - fullX)},${Math.min(tileSizePx * sf, height - fullY)}`;
        tiles.push({ scaleFactor: sf, levelRect, path: `${region}/${levelRect.width},${levelRect.height}/0/default.${format}` });
        // Section 4.2: "max" is the canonical size of an unscaled full image, which viewers request as such.
        if (isWhole && sf === 1) tiles.push({ scaleFactor: sf, levelRect, path: `full/max/0/default.${format}` });
        if (isWhole) sizes.push({ width: levelWidth, height: levelHeight });
      }
    }
  }
  return { scaleFactors, tiles, sizes };
}

/** The DZI descriptor (Deep Zoom XML schema of 2008). */
export function buildDziXml(width: number, height: number, tileSizePx: number, overlapPx: number, format: string): string {
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<Image xmlns="http://schemas.microsoft.com/deepzoom/2008" Format="${format}" Overlap="${overlapPx}" TileSize="${tileSizePx}">`,
    `  <Size Width="${width}" Height="${height}"/>`,
    "</Image>",
    "",
  ].join("\n");
}

/** IIIF Image API 3.0 info.json for a level-0 service of pre-cut tiles (section 5). */
export function buildIiifInfo(id: string, width: number, height: number, tileSizePx: number, layout: IiifLayout): Record<string, unknown> {
  return {
    "@context": "http://iiif.io/api/image/3/context.json",
    id,
    type: "ImageService3",
    protocol: "http://iiif.io/api/image",
    profile: "level0",
    width,
    height,
    sizes: layout.sizes,
    tiles: [{ width: tileSizePx, height: tileSizePx, scaleFactors: layout.scaleFactors }],
  };
}
