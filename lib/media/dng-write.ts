// A DNG (Adobe DNG Specification 1.4.0.0) holding one uncompressed 16-bit Bayer
// RGGB mosaic in IFD0, with the tags LibRaw needs to decode it (CFA pattern,
// black and white levels, ColorMatrix1, AsShotNeutral) and an Exif IFD with the
// capture settings. Used for test fixtures and synthetic brackets.
import { MediaError } from "./errors";
import type { CaptureExif } from "./exif-write";
import { encodeTiff, TIFF_TYPE, toRational, toSignedRational, type TiffEntry } from "./tiff-write";

/** The capture settings are the same ones a JPEG's EXIF carries (exif-write.ts). */
export interface DngSpec extends CaptureExif {
  width: number;
  height: number;
  /** Row-major sensor values (data numbers), RGGB: R at even row and even column. */
  mosaic: Uint16Array;
  blackLevel: number;
  whiteLevel: number;
  /** Camera neutral for the light at capture (DNG tag 50728); [1, 1, 1] when camera RGB is already balanced. */
  asShotNeutral?: [number, number, number];
  /** XYZ (D65) to camera RGB, row-major 3x3 (DNG tag 50721). Default: the inverse of the sRGB primaries. */
  colorMatrix1?: number[];
}

// IEC 61966-2-1 sRGB primaries, XYZ (D65) -> linear sRGB: a sensor whose "camera RGB" is linear sRGB.
export const XYZ_TO_LINEAR_SRGB = [3.2406, -1.5372, -0.4986, -0.9689, 1.8758, 0.0415, 0.0557, -0.204, 1.057];

const RGGB = [0, 1, 1, 2];

/** Split linear RGB planes into an RGGB mosaic (the pixel each photosite would see). */
export function mosaicRggb(planes: ArrayLike<number>[], width: number, height: number): Uint16Array {
  const mosaic = new Uint16Array(width * height);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const colour = RGGB[(y & 1) * 2 + (x & 1)];
      const i = y * width + x;
      mosaic[i] = Math.max(0, Math.min(65535, Math.round(planes[Math.min(colour, planes.length - 1)][i])));
    }
  }
  return mosaic;
}

export function encodeDng(spec: DngSpec, name = "frame.dng"): Uint8Array {
  const { width, height, mosaic } = spec;
  if (mosaic.length !== width * height) throw new MediaError("bad-argument", name, `the mosaic holds ${mosaic.length} values, not ${width} x ${height}`);
  if (width % 2 || height % 2) throw new MediaError("bad-argument", name, `a Bayer mosaic needs even width and height, not ${width} x ${height}`);
  if (!(spec.whiteLevel > spec.blackLevel)) throw new MediaError("bad-argument", name, "WhiteLevel must be above BlackLevel");
  const strip = new Uint8Array(mosaic.length * 2);
  const view = new DataView(strip.buffer);
  mosaic.forEach((value, i) => view.setUint16(i * 2, value, true));
  const neutral = spec.asShotNeutral ?? [1, 1, 1];
  const matrix = spec.colorMatrix1 ?? XYZ_TO_LINEAR_SRGB;
  const ifd0: TiffEntry[] = [
    { tag: 254, type: TIFF_TYPE.LONG, values: [0] },
    { tag: 256, type: TIFF_TYPE.LONG, values: [width] },
    { tag: 257, type: TIFF_TYPE.LONG, values: [height] },
    { tag: 258, type: TIFF_TYPE.SHORT, values: [16] },
    { tag: 259, type: TIFF_TYPE.SHORT, values: [1] },
    { tag: 262, type: TIFF_TYPE.SHORT, values: [32803] }, // PhotometricInterpretation: CFA
    { tag: 271, type: TIFF_TYPE.ASCII, values: spec.make },
    { tag: 272, type: TIFF_TYPE.ASCII, values: spec.model },
    { tag: 274, type: TIFF_TYPE.SHORT, values: [1] },
    { tag: 277, type: TIFF_TYPE.SHORT, values: [1] },
    { tag: 278, type: TIFF_TYPE.LONG, values: [height] },
    { tag: 284, type: TIFF_TYPE.SHORT, values: [1] },
    { tag: 33421, type: TIFF_TYPE.SHORT, values: [2, 2] }, // CFARepeatPatternDim
    { tag: 33422, type: TIFF_TYPE.BYTE, values: RGGB }, // CFAPattern: 0 red, 1 green, 2 blue
    { tag: 50706, type: TIFF_TYPE.BYTE, values: [1, 4, 0, 0] }, // DNGVersion
    { tag: 50707, type: TIFF_TYPE.BYTE, values: [1, 1, 0, 0] }, // DNGBackwardVersion
    { tag: 50708, type: TIFF_TYPE.ASCII, values: `${spec.make} ${spec.model}` }, // UniqueCameraModel
    { tag: 50710, type: TIFF_TYPE.BYTE, values: [0, 1, 2] }, // CFAPlaneColor
    { tag: 50711, type: TIFF_TYPE.SHORT, values: [1] }, // CFALayout: rectangular
    { tag: 50714, type: TIFF_TYPE.LONG, values: [spec.blackLevel] },
    { tag: 50717, type: TIFF_TYPE.LONG, values: [spec.whiteLevel] },
    { tag: 50721, type: TIFF_TYPE.SRATIONAL, values: matrix.flatMap(toSignedRational) },
    { tag: 50728, type: TIFF_TYPE.RATIONAL, values: neutral.flatMap(toRational) },
    { tag: 50778, type: TIFF_TYPE.SHORT, values: [21] }, // CalibrationIlluminant1: D65
  ];
  const exif: TiffEntry[] = [{ tag: 33434, type: TIFF_TYPE.RATIONAL, values: toRational(spec.exposureS) }];
  if (spec.fNumber) exif.push({ tag: 33437, type: TIFF_TYPE.RATIONAL, values: toRational(spec.fNumber) });
  if (spec.iso) exif.push({ tag: 34855, type: TIFF_TYPE.SHORT, values: [spec.iso] });
  if (spec.dateTimeOriginal) exif.push({ tag: 36867, type: TIFF_TYPE.ASCII, values: spec.dateTimeOriginal });
  if (spec.offsetTimeOriginal) exif.push({ tag: 36881, type: TIFF_TYPE.ASCII, values: spec.offsetTimeOriginal });
  if (spec.subSecTimeOriginal) exif.push({ tag: 37521, type: TIFF_TYPE.ASCII, values: spec.subSecTimeOriginal });
  return encodeTiff({ entries: ifd0, subIfds: [{ tag: 34665, ifd: { entries: exif } }], strip });
}
