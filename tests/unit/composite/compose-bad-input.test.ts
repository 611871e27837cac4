// What the composite refuses, and how it says so: each message names the file
// or option and the fault, and nothing is written.
import { existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { writeFitsFile, type FitsCard } from "@/lib/media";
import { parseComposeArgs, runCompositeOnFiles } from "@/lib/composite-runner";

const root = mkdtempSync(join(tmpdir(), "crownlight-compose-bad-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** A small master with the cards a reduction writes (helio-wcs.ts, master-fits.ts), some of them changed. */
async function writeMaster(name: string, change: Record<string, FitsCard["value"] | undefined> = {}): Promise<string> {
  const cards: Record<string, FitsCard["value"]> = {
    "DATE-AVG": "2027-08-02T10:07:30.000", CTYPE1: "HPLN-TAN", CTYPE2: "HPLT-TAN", CRPIX1: 33, CRPIX2: 33, CRVAL1: 0, CRVAL2: 0,
    CDELT1: 30, CDELT2: 30, PC1_1: 1, PC1_2: 0, PC2_1: 0, PC2_2: -1, RSUN_OBS: 946, MOONX: 33, MOONY: 33, MOONR: 33,
  };
  for (const [k, v] of Object.entries(change)) {
    if (v === undefined) delete cards[k];
    else cards[k] = v;
  }
  const path = join(root, name);
  const plane = Float32Array.from({ length: 64 * 64 }, (_, i) => 1 + (i % 7));
  await writeFitsFile(path, { width: 64, height: 64, planes: [plane], cards: Object.entries(cards).map(([key, value]) => ({ key, value, real: typeof value === "number" && !Number.isInteger(value) })) });
  return path;
}

async function refusal(files: string[]): Promise<string> {
  const out = join(root, `out-${Math.random().toString(36).slice(2)}`);
  const error = await runCompositeOnFiles({ files, outDir: out }).then(() => null, (e: Error) => e);
  expect(error).toBeInstanceOf(Error);
  // Nothing half-written: neither the folder nor its staging folder.
  expect(existsSync(out)).toBe(false);
  expect(readdirSync(root).some((f) => f.includes(".partial-"))).toBe(false);
  return error!.message;
}

describe("composite input checks", () => {
  it("refuses a master without a helioprojective WCS, naming it and saying how to get one", async () => {
    const good = await writeMaster("good.fits");
    const moonOnly = await writeMaster("moon-registered.fits", { CTYPE1: undefined, CTYPE2: undefined });
    const message = await refusal([good, moonOnly]);
    expect(message).toContain("moon-registered.fits");
    expect(message).toContain("has no helioprojective WCS");
    expect(message).toContain("site and capture times");
  });

  it("refuses a WCS that is not centred on the Sun, a mirrored one, and a missing lunar disk", async () => {
    const good = await writeMaster("good2.fits");
    expect(await refusal([good, await writeMaster("offset.fits", { CRVAL1: 12.5 })])).toMatch(/offset\.fits: its WCS is not centred on the Sun/);
    expect(await refusal([good, await writeMaster("mirrored.fits", { PC2_2: 1 })])).toMatch(/mirrored\.fits: its PC matrix/);
    expect(await refusal([good, await writeMaster("no-moon.fits", { MOONR: undefined })])).toMatch(/no-moon\.fits: MOONR \(Moon radius\) is missing/);
  });

  it("refuses masters of different eclipses and the same master twice", async () => {
    const good = await writeMaster("august.fits");
    const later = await writeMaster("april.fits", { "DATE-AVG": "2028-07-22T02:55:00.000" });
    expect(await refusal([good, later])).toMatch(/august\.fits and april\.fits were taken 354\.\d days apart/);
    expect(await refusal([good, good])).toMatch(/august\.fits is given twice/);
  });

  it("refuses a file that is not FITS, naming it", async () => {
    const good = await writeMaster("good3.fits");
    const text = join(root, "notes.fits");
    writeFileSync(text, "these are not pixels\n");
    expect(await refusal([good, text])).toContain("notes.fits");
  });

  it("checks the command line, naming the option", () => {
    expect(() => parseComposeArgs(["a.fits", "b.fits"])).toThrow(/--out DIR is required/);
    expect(() => parseComposeArgs(["--out", "x", "a.fits"])).toThrow(/at least two master FITS files, got 1/);
    expect(() => parseComposeArgs(["--out", "x", "--scale", "-3", "a.fits", "b.fits"])).toThrow(/--scale: expected a positive number of arcsec per pixel, got "-3"/);
    expect(() => parseComposeArgs(["--out", "x", "--filter", "sharp", "a.fits", "b.fits"])).toThrow(/--filter: expected mgn or nrgf/);
    expect(() => parseComposeArgs(["--out", "x", "--colour", "a.fits", "b.fits"])).toThrow(/--colour: no such option/);
    expect(parseComposeArgs(["--out", "x", "--no-refine", "--scale", "2.5", "a.fits", "b.fits"])).toEqual({ outDir: "x", files: ["a.fits", "b.fits"], scaleArcsecPerPx: 2.5, refine: false, filter: undefined });
  });
});
