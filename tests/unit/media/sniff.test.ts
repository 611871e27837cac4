import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { MediaError } from "@/lib/media/errors";
import { encodeDng } from "@/lib/media/dng-write";
import { encodeFits } from "@/lib/media/fits-write";
import { sniffBytes, sniffFile } from "@/lib/media/sniff";
import { encodeTiff, TIFF_TYPE } from "@/lib/media/tiff-write";

const dir = mkdtempSync(join(tmpdir(), "crownlight-sniff-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const bytes = (...parts: (string | number[])[]) =>
  Buffer.concat(parts.map((p) => (typeof p === "string" ? Buffer.from(p, "latin1") : Buffer.from(p))));
const tiffWithMake = (make: string) =>
  encodeTiff({ entries: [{ tag: 256, type: TIFF_TYPE.LONG, values: [1] }, { tag: 271, type: TIFF_TYPE.ASCII, values: make }] });
const pad = (b: Buffer) => Buffer.concat([b, Buffer.alloc(64)]);

describe("sniffBytes decides the format from the content", () => {
  it.each([
    ["a.jpg", pad(bytes([0xff, 0xd8, 0xff, 0xe0])), "jpeg"],
    ["a.png", pad(bytes("\x89PNG\r\n\x1a\n")), "png"],
    ["a.fits", Buffer.from(encodeFits({ width: 2, height: 2, planes: [new Float32Array(4)] })), "fits"],
    ["a.raf", pad(bytes("FUJIFILMCCD-RAW 0201")), "raf"],
    ["a.orf", pad(bytes("IIRO", [8, 0, 0, 0])), "orf"],
    ["a.cr3", pad(bytes([0, 0, 0, 0x18], "ftypcrx ")), "cr3"],
    ["a.cr2", pad(bytes("II*\0", [16, 0, 0, 0], "CR", [2, 0])), "cr2"],
    ["a.tif", Buffer.from(tiffWithMake("Crownlight synthetic")), "tiff"],
    ["a.nef", Buffer.from(tiffWithMake("NIKON CORPORATION")), "nef"],
    ["a.arw", Buffer.from(tiffWithMake("SONY")), "arw"],
  ])("%s -> %s", (name, content, format) => {
    expect(sniffBytes(content, name)).toBe(format);
  });

  it("finds DNGVersion (0xC612) in IFD0 of a TIFF", () => {
    const dng = encodeDng({ width: 2, height: 2, mosaic: new Uint16Array(4), blackLevel: 0, whiteLevel: 4095, exposureS: 0.01, make: "Test", model: "Mosaic" });
    expect(sniffBytes(dng, "frame.dng")).toBe("dng");
    expect(sniffBytes(dng, "frame")).toBe("dng");
  });

  it("uses the content when the name has no known extension", () => {
    expect(sniffBytes(pad(bytes([0xff, 0xd8, 0xff])), "upload.bin")).toBe("jpeg");
  });

  it("lets the extension decide between NEF and ARW only when Make does not", () => {
    const plain = Buffer.from(tiffWithMake("Unknown maker"));
    expect(sniffBytes(plain, "x.nef")).toBe("nef");
    expect(sniffBytes(plain, "x.arw")).toBe("arw");
    expect(() => sniffBytes(Buffer.from(tiffWithMake("NIKON CORPORATION")), "x.arw")).toThrow("x.arw: the content is a Nikon NEF raw, not ARW");
  });

  it("reads a file on disk by its first bytes and IFD0", () => {
    const path = join(dir, "frame-010.nef");
    writeFileSync(path, tiffWithMake("NIKON CORPORATION"));
    expect(sniffFile(path)).toBe("nef");
  });
});

describe("sniffBytes refuses what it cannot vouch for", () => {
  const fault = (content: Buffer, name: string) => {
    try {
      sniffBytes(content, name);
    } catch (error) {
      return error as MediaError;
    }
    throw new Error("expected a MediaError");
  };

  it("a zero-byte file", () => {
    const error = fault(Buffer.alloc(0), "frame-001.jpg");
    expect(error).toBeInstanceOf(MediaError);
    expect(error.code).toBe("empty-file");
    expect(error.message).toBe("frame-001.jpg: the file is empty (0 bytes)");
  });

  it("unknown magic", () => {
    const error = fault(pad(bytes("GIF89a")), "frame-002.jpg");
    expect(error.code).toBe("unknown-format");
    expect(error.message).toBe("frame-002.jpg: the content is not an image format we read (not JPEG: unrecognised first bytes)");
  });

  it("a TIFF named .fits", () => {
    const error = fault(Buffer.from(tiffWithMake("Crownlight synthetic")), "frame-042.fits");
    expect(error.code).toBe("format-mismatch");
    expect(error.message).toBe("frame-042.fits: the content is a TIFF image, not FITS");
  });

  it("a JPEG named .png", () => {
    expect(fault(pad(bytes([0xff, 0xd8, 0xff])), "x.PNG").message).toBe("x.PNG: the content is a JPEG image, not PNG");
  });
});
