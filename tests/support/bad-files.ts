// Hostile files the bad-input tests share.
import { crc32, deflateSync } from "node:zlib";

function pngChunk(type: string, data: Buffer): Buffer {
  const body = Buffer.concat([Buffer.from(type, "latin1"), data]);
  const length = Buffer.alloc(4);
  length.writeUInt32BE(data.length);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([length, body, crc]);
}

/**
 * A valid PNG whose header claims width x height 8-bit grey pixels, with a tiny
 * compressed body: a decompression bomb (50000 x 50000 claims 2.5 gigapixels).
 */
export function makeClaimingPng(width: number, height: number): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr.set([8, 0, 0, 0, 0], 8); // 8-bit greyscale, deflate, no filter, no interlace
  const rows = deflateSync(Buffer.alloc((width + 1) * 4));
  return Buffer.concat([Buffer.from("\x89PNG\r\n\x1a\n", "latin1"), pngChunk("IHDR", ihdr), pngChunk("IDAT", rows), pngChunk("IEND", Buffer.alloc(0))]);
}
