import { mkdtempSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { encodeFitsHeader } from "@/lib/media/fits-cards";
import { computeFitsSizeBytes, encodeFits, writeFitsFile } from "@/lib/media/fits-write";
import { readFits } from "@/lib/media/fits";
import { MediaError } from "@/lib/media/errors";
import { runPython } from "./python-reference";

const dir = mkdtempSync(join(tmpdir(), "crownlight-fits-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// A deterministic test pattern shared by the Python side and ours.
const pattern = (x: number, y: number, p: number) => ((x * 7 + y * 13 + p * 101) % 200) - 50;

describe("FITS sizes (FITS Standard 4.0: 2880-byte blocks)", () => {
  it("matches the sizes computed in REFERENCES.md", () => {
    // REFERENCES.md, computed: 100x100 16-bit = 23040 bytes; 6000x4000 float32 = 96,004,800 bytes.
    expect(computeFitsSizeBytes({ width: 100, height: 100, bitpix: 16 })).toBe(23040);
    expect(computeFitsSizeBytes({ width: 6000, height: 4000, bitpix: -32 })).toBe(96_004_800);
  });

  it("writes a 100x100 unsigned 16-bit file of exactly that size, cards of 80 characters", () => {
    const plane = new Uint16Array(100 * 100).fill(40000);
    const bytes = encodeFits({ width: 100, height: 100, planes: [plane] });
    expect(bytes.length).toBe(23040);
    const text = Buffer.from(bytes.subarray(0, 2880)).toString("latin1");
    expect(text.slice(0, 80)).toBe("SIMPLE  =                    T / conforms to FITS Standard 4.0".padEnd(80));
    expect(text.slice(80, 110)).toBe("BITPIX  =                   16");
    expect(text.slice(160, 190)).toBe("NAXIS   =                    2");
    // Big-endian stored value 40000 - 32768 = 7232 = 0x1C40.
    expect([bytes[2880], bytes[2881]]).toEqual([0x1c, 0x40]);
  });

  it("streams a file whose size equals the computed size, with header lines counted", async () => {
    const path = join(dir, "stream.fits");
    const spec = { width: 37, height: 29, planes: [new Float32Array(37 * 29), new Float32Array(37 * 29)], history: ["x".repeat(100)] };
    await writeFitsFile(path, spec);
    // 6 mandatory + 2 HISTORY lines (100 characters split at 72).
    expect(statSync(path).size).toBe(computeFitsSizeBytes({ width: 37, height: 29, depth: 2, bitpix: -32, cardLines: 8 }));
  });
});

describe("FITS round trip through our reader", () => {
  it("keeps float planes, cards with comments, quotes and HISTORY", async () => {
    const w = 5, h = 4;
    const planes = [0, 1, 2].map((p) => Float32Array.from({ length: w * h }, (_, i) => pattern(i % w, Math.floor(i / w), p) * 0.25));
    const bytes = encodeFits({
      width: w,
      height: h,
      planes,
      cards: [
        { key: "EXPTIME", value: 0.004, comment: "seconds" },
        { key: "OBSERVER", value: "O'Neill" },
        { key: "CDELT1", value: 2, real: true },
        { key: "FLIPPED", value: false },
      ],
      history: ["reduced by a test"],
    });
    const image = await readFits(bytes, "round.fits");
    expect([image.width, image.height, image.planes.length, image.bitpix]).toEqual([w, h, 3, -32]);
    planes.forEach((plane, p) => expect(Array.from(image.planes[p])).toEqual(Array.from(plane)));
    expect(image.header.get("EXPTIME")).toBe(0.004);
    expect(image.headerComments.get("EXPTIME")).toBe("seconds");
    expect(image.header.get("OBSERVER")).toBe("O'Neill");
    expect(image.header.get("CDELT1")).toBe(2);
    expect(image.header.get("FLIPPED")).toBe(false);
    expect(image.history).toEqual(["reduced by a test"]);
  });

  it("reads unsigned 16-bit data through BZERO 32768 as 0..65535", async () => {
    const plane = Uint16Array.from([0, 1, 32767, 32768, 65534, 65535]);
    const image = await readFits(encodeFits({ width: 3, height: 2, planes: [plane] }), "u16.fits");
    expect(Array.from(image.planes[0])).toEqual([0, 1, 32767, 32768, 65534, 65535]);
  });

  it("reads from a Buffer that is a view into a larger memory block", async () => {
    const file = encodeFits({ width: 3, height: 1, planes: [Float32Array.from([1.5, -2, 3])] });
    const block = Buffer.alloc(file.length + 100, 0x41);
    block.set(file, 37);
    const image = await readFits(block.subarray(37, 37 + file.length), "view.fits");
    expect(Array.from(image.planes[0])).toEqual([1.5, -2, 3]);
  });

  it("keeps Float64 planes (BITPIX -64), which we decode ourselves", async () => {
    const plane = Float64Array.from([1e-300, -2.5, 3.25, 1e10]);
    const image = await readFits(encodeFits({ width: 2, height: 2, planes: [plane] }), "f64.fits");
    expect(image.bitpix).toBe(-64);
    expect(Array.from(image.planes[0])).toEqual(Array.from(Float32Array.from(plane)));
  });
});

describe("FITS files written by astropy (Debian python3-astropy) read by ours", () => {
  const script = `
import sys, numpy as np
from astropy.io import fits
out = sys.argv[1]
h, w = 6, 5
y, x = np.mgrid[0:h, 0:w]
base = lambda p: ((x * 7 + y * 13 + p * 101) % 200) - 50
fits.PrimaryHDU((base(0) + 50).astype(np.uint8)).writeto(out + '/b8.fits')
fits.PrimaryHDU((base(0) * 100).astype(np.int16)).writeto(out + '/i16.fits')
fits.PrimaryHDU((base(0) * 300 + 20000).astype(np.uint16)).writeto(out + '/u16.fits')
fits.PrimaryHDU((base(0) * 1000000).astype(np.int32)).writeto(out + '/i32.fits')
fits.PrimaryHDU((base(0) / 8).astype(np.float32)).writeto(out + '/f32.fits')
fits.PrimaryHDU((base(0) / 3).astype(np.float64)).writeto(out + '/f64.fits')
cube = np.stack([base(p) for p in range(3)]).astype(np.float32)
fits.PrimaryHDU(cube).writeto(out + '/rgb.fits')
s = fits.PrimaryHDU((base(0) * 0.5 + 100).astype(np.float64))
s.scale('int16', bzero=100, bscale=0.5)
s.header['EXPTIME'] = (0.5, 'seconds')
s.writeto(out + '/scaled.fits')
`;
  const ours = (p: number, f: (v: number) => number) =>
    Array.from({ length: 30 }, (_, i) => Math.fround(f(pattern(i % 5, Math.floor(i / 5), p))));

  it("reads BITPIX 8, 16, 16 unsigned, 32, -32, -64, BSCALE and NAXIS3 planes", async () => {
    runPython(script, [dir], ["astropy"]);
    const read = (file: string) => readFits(join(dir, file), file);
    expect(Array.from((await read("b8.fits")).planes[0])).toEqual(ours(0, (v) => v + 50));
    expect(Array.from((await read("i16.fits")).planes[0])).toEqual(ours(0, (v) => v * 100));
    const u16 = await read("u16.fits");
    expect(u16.header.get("BZERO")).toBe(32768);
    expect(Array.from(u16.planes[0])).toEqual(ours(0, (v) => v * 300 + 20000));
    expect(Array.from((await read("i32.fits")).planes[0])).toEqual(ours(0, (v) => v * 1_000_000));
    expect(Array.from((await read("f32.fits")).planes[0])).toEqual(ours(0, (v) => v / 8));
    expect(Array.from((await read("f64.fits")).planes[0])).toEqual(ours(0, (v) => v / 3));
    const rgb = await read("rgb.fits");
    expect(rgb.planes.length).toBe(3);
    [0, 1, 2].forEach((p) => expect(Array.from(rgb.planes[p])).toEqual(ours(p, (v) => v)));
    const scaled = await read("scaled.fits");
    expect([scaled.bitpix, scaled.bscale, scaled.bzero]).toEqual([16, 0.5, 100]);
    expect(scaled.header.get("EXPTIME")).toBe(0.5);
    expect(Array.from(scaled.planes[0])).toEqual(ours(0, (v) => v * 0.5 + 100));
  });
});

describe("our FITS files read by astropy (Debian python3-astropy)", () => {
  it("agrees on header cards, HISTORY and pixels for BITPIX -32 planes and BITPIX 16 unsigned", async () => {
    const w = 7, h = 3;
    const planes = [0, 1, 2].map((p) => Float32Array.from({ length: w * h }, (_, i) => pattern(i % w, Math.floor(i / w), p) / 16));
    await writeFitsFile(join(dir, "ours-f32.fits"), {
      width: w,
      height: h,
      planes,
      cards: [
        { key: "DATE-OBS", value: "2027-08-02T10:05:12.250", comment: "UTC" },
        { key: "CDELT1", value: 2.5, comment: "arcsec per pixel" },
        { key: "OBJECT", value: "it's a test" },
      ],
      history: ["step one", "step two with a long text ".repeat(4)],
    });
    await writeFitsFile(join(dir, "ours-u16.fits"), { width: w, height: h, planes: [Uint16Array.from({ length: w * h }, (_, i) => i * 3000)] });
    const report = runPython(
      `
import sys, json, numpy as np
from astropy.io import fits
a = fits.open(sys.argv[1]); a.verify('exception'); hd = a[0].header
b = fits.open(sys.argv[2]); b.verify('exception')
print(json.dumps({
  'shape': list(a[0].data.shape), 'data': a[0].data.astype(float).ravel().tolist(),
  'date': hd['DATE-OBS'], 'date_comment': hd.comments['DATE-OBS'], 'cdelt': hd['CDELT1'], 'object': hd['OBJECT'],
  'history': [str(h) for h in hd['HISTORY']],
  'u16': b[0].data.astype(int).ravel().tolist(), 'u16_dtype': str(b[0].data.dtype)}))
`,
      [join(dir, "ours-f32.fits"), join(dir, "ours-u16.fits")],
      ["astropy"],
    );
    const parsed = JSON.parse(report);
    expect(parsed.shape).toEqual([3, h, w]);
    expect(parsed.data).toEqual(planes.flatMap((plane) => Array.from(plane)));
    expect(parsed.date).toBe("2027-08-02T10:05:12.250");
    expect(parsed.date_comment).toBe("UTC");
    expect(parsed.cdelt).toBe(2.5);
    expect(parsed.object).toBe("it's a test");
    expect(parsed.history.join("")).toBe("step one" + "step two with a long text ".repeat(4).trimEnd());
    expect(parsed.u16_dtype).toBe("uint16");
    expect(parsed.u16).toEqual(Array.from({ length: w * h }, (_, i) => i * 3000));
  });
});

describe("malformed FITS gives a MediaError naming the file and the fault", () => {
  const good = () => encodeFits({ width: 10, height: 10, planes: [new Uint16Array(100)] });

  it("refuses a header without END", async () => {
    const header = Buffer.from(good().subarray(0, 2880)).toString("latin1").replace(/END {77}/, " ".repeat(80));
    const err = await readFits(Buffer.from(header, "latin1"), "frame-001.fits").catch((e) => e);
    expect(err).toBeInstanceOf(MediaError);
    expect(err.code).toBe("fits-header");
    expect(err.message).toMatch(/^frame-001\.fits: the header has no END card/);
  });

  it("refuses a bad BITPIX", async () => {
    const bytes = good();
    bytes.set(Buffer.from("                  12", "latin1"), 80 + 10);
    const err = await readFits(bytes, "frame-002.fits").catch((e) => e);
    expect(err.code).toBe("fits-header");
    expect(err.message).toBe("frame-002.fits: BITPIX = 12 is not one of 8, 16, 32, -32, -64 (FITS 4.0 table 8)");
  });

  it("refuses NAXIS that promises an axis the header lacks", async () => {
    const bytes = good();
    bytes.set(Buffer.from("                   3", "latin1"), 160 + 10);
    const err = await readFits(bytes, "frame-003.fits").catch((e) => e);
    expect(err.code).toBe("fits-header");
    expect(err.message).toMatch(/^frame-003\.fits: NAXIS = 3 but card 6 is not NAXIS3/);
  });

  it("refuses a truncated data unit", async () => {
    const err = await readFits(good().subarray(0, 2880 + 50), "frame-004.fits").catch((e) => e);
    expect(err.code).toBe("truncated");
    expect(err.message).toBe("frame-004.fits: the data unit is cut short: 50 of the 200 bytes that NAXIS1 x NAXIS2 x |BITPIX|/8 promise");
  });

  it("accepts a file whose last block lacks its padding", async () => {
    const image = await readFits(good().subarray(0, 2880 + 200), "frame-005.fits");
    expect(image.width).toBe(10);
  });

  it("refuses card keys and values the standard does not allow when writing", () => {
    expect(() => encodeFitsHeader([{ key: "exposure time", value: 1 }], "out.fits")).toThrow(/out\.fits: FITS keyword "exposure time"/);
    expect(() => encodeFitsHeader([{ key: "EXPTIME", value: Number.NaN }], "out.fits")).toThrow(/not a finite number/);
    expect(() => encodeFits({ width: 2, height: 2, planes: [new Float32Array(3)] }, "out.fits")).toThrow("out.fits: plane 0 holds 3 pixels, not 2 x 2");
  });
});
