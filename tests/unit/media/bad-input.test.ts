// Every kind of bad file ends in a MediaError whose message starts with the file
// name and says what is wrong. Fixtures are made here, in a temporary folder.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import sharp from "sharp";
import { afterAll, describe, expect, it } from "vitest";
import { decodeFrame } from "@/lib/media/decode";
import { MediaError } from "@/lib/media/errors";
import { encodeFits } from "@/lib/media/fits-write";
import { encodeTiff, TIFF_TYPE } from "@/lib/media/tiff-write";
import { makeClaimingPng } from "../../support/bad-files";

const dir = mkdtempSync(join(tmpdir(), "crownlight-bad-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function failure(content: Buffer | Uint8Array, name: string): Promise<MediaError> {
  const path = join(dir, name);
  writeFileSync(path, content);
  const error = await decodeFrame(path, name).then(
    () => undefined,
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(MediaError);
  return error as MediaError;
}



describe("bad input gives a clear MediaError naming the file and the fault", () => {
  it("a truncated JPEG", async () => {
    const noise = Uint8Array.from({ length: 256 * 256 * 3 }, (_, i) => (i * 7919) % 251);
    const jpeg = await sharp(noise, { raw: { width: 256, height: 256, channels: 3 } }).jpeg({ quality: 90 }).toBuffer();
    const error = await failure(jpeg.subarray(0, Math.floor(jpeg.length / 2)), "frame-020.jpg");
    expect(error.code).toBe("truncated");
    expect(error.message).toMatch(/^frame-020\.jpg: the image is cut short/);
  });

  it("a TIFF renamed .fits", async () => {
    const tiff = encodeTiff({ entries: [{ tag: 256, type: TIFF_TYPE.LONG, values: [1] }] });
    const error = await failure(tiff, "frame-042.fits");
    expect(error.code).toBe("format-mismatch");
    expect(error.message).toBe("frame-042.fits: the content is a TIFF image, not FITS");
  });

  it("a FITS file whose header lost its END card", async () => {
    const fits = Buffer.from(encodeFits({ width: 4, height: 4, planes: [new Float32Array(16)] }));
    const broken = Buffer.from(fits.toString("latin1").replace(/END {77}/, " ".repeat(80)), "latin1");
    const error = await failure(broken, "frame-043.fits");
    expect(error.code).toBe("fits-header");
    expect(error.message).toMatch(/^frame-043\.fits: the header has no END card/);
  });

  it("a decompression-bomb PNG that claims 50000 x 50000 pixels", async () => {
    const error = await failure(makeClaimingPng(50000, 50000), "frame-044.png");
    expect(error.code).toBe("too-large");
    expect(error.message).toBe("frame-044.png: the image has more pixels than the 200-megapixel limit (a decompression bomb or an absurd size)");
  });

  it("a zero-byte file", async () => {
    const error = await failure(Buffer.alloc(0), "frame-045.tif");
    expect(error.code).toBe("empty-file");
    expect(error.message).toBe("frame-045.tif: the file is empty (0 bytes)");
  });

  it("a PNG whose compressed data are corrupt", async () => {
    const good = makeClaimingPng(16, 16);
    const idat = good.indexOf("IDAT");
    const bad = Buffer.from(good);
    bad.fill(0x55, idat + 6, idat + 12);
    const error = await failure(bad, "frame-046.png");
    expect(["corrupt", "truncated"]).toContain(error.code);
    expect(error.message).toMatch(/^frame-046\.png: the image (cannot be decoded|is cut short)/);
  });

  it("a DNG without image data", async () => {
    const dng = encodeTiff({
      entries: [
        { tag: 256, type: TIFF_TYPE.LONG, values: [64] },
        { tag: 50706, type: TIFF_TYPE.BYTE, values: [1, 4, 0, 0] },
      ],
    });
    const error = await failure(dng, "frame-047.dng");
    expect(error.code).toBe("raw-decode-failed");
    expect(error.message).toMatch(/^frame-047\.dng: LibRaw cannot decode the raw file/);
  });
});
