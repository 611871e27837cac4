// The media adapters' public surface: what the worker and the CLI import.
export { MediaError, isMediaError, type MediaErrorCode } from "./errors";
export { sniffBytes, sniffFile, RAW_FORMATS, type MediaFormat } from "./sniff";
export { decodeFrame, toLinearFrame, type DecodedFrame } from "./decode";
export { readFits, type FitsImage } from "./fits";
export { encodeFits, writeFitsFile, computeFitsSizeBytes, countFitsHeaderLines, type FitsImageSpec, type FitsPixelArray, type FitsBitpix } from "./fits-write";
export type { FitsCard, FitsValue } from "./fits-cards";
export { readExifMetadata, readFitsMetadata, applyClockOffset, buildExifCaptureTime, parseFitsDate, type FrameMetadata } from "./metadata";
export { encodePng16, encodeJpeg, encodePreview, encodeThumbnail, writeDeepZoom, writeIiifLevel0, writePng16, type Interleaved, type Planes } from "./encode";
export { encodeDng, mosaicRggb, type DngSpec } from "./dng-write";
export { writeCaptureExif, formatExifDateTime, closeExifWriter, type CaptureExif } from "./exif-write";
export { MAX_INPUT_PIXELS } from "./sharp-setup";
