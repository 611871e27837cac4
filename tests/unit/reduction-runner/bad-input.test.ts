// Bad input stops a reduction with a message naming the file (or CSV line, or
// option) and the fault, and leaves no output folder and no staging folder.
import { spawnSync } from "node:child_process";
import { copyFileSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { encodeFits } from "@/lib/media";
import { runReductionOnFiles } from "@/lib/reduction-runner";
import { parseExposuresCsv } from "@/lib/reduction-runner/exposures-csv";
import { parseReduceArgs } from "@/lib/reduction-runner/cli-args";
import { listStagingLeftovers, writeBracketFixture, type BracketFixture } from "./bracket-fixture";
import { makeClaimingPng } from "../../support/bad-files";

let fixture: BracketFixture;
let work: string;
beforeAll(async () => {
  fixture = await writeBracketFixture();
  work = join(fixture.dir, "..", "bad");
  mkdirSync(work);
}, 60_000);
afterAll(() => rmSync(join(fixture.dir, ".."), { recursive: true, force: true }));

/** Runs the reduction expecting a refusal; checks that nothing was left behind. */
async function refusal(files: string[], extra: Partial<Parameters<typeof runReductionOnFiles>[0]> = {}): Promise<string> {
  const outDir = join(work, `out-${Math.random().toString(36).slice(2)}`);
  const error = await runReductionOnFiles({ files, outDir, ...extra }).then(() => undefined, (e: unknown) => e);
  expect(error).toBeInstanceOf(Error);
  expect(existsSync(outDir)).toBe(false);
  expect(listStagingLeftovers(outDir)).toEqual([]);
  return (error as Error).message;
}

function place(name: string, content: Buffer | Uint8Array): string {
  const path = join(work, name);
  writeFileSync(path, content);
  return path;
}


describe("runReductionOnFiles refuses bad input, naming the file and the fault", () => {
  it("a truncated JPEG", async () => {
    const [first, second] = fixture.filesOf("jpeg");
    const bytes = readFileSync(second);
    const cut = place("cut-02.jpg", bytes.subarray(0, Math.floor(bytes.length / 2)));
    // libvips keeps its error text in one process-wide buffer; with two decodes at once the
    // "premature end" text is sometimes gone and sharp reports only the failed warning check.
    // Either way the message names the file and says it cannot be read.
    expect(await refusal([first, cut])).toMatch(/^cut-02\.jpg: the image (is cut short|cannot be decoded, the data are corrupt)/);
  });

  it("a TIFF renamed .fits", async () => {
    const [first, second] = fixture.filesOf("fits");
    const renamed = join(work, "really-a-tiff.fits");
    copyFileSync(fixture.filesOf("tiff")[1], renamed);
    expect(await refusal([first, second, renamed])).toBe("really-a-tiff.fits: the content is a TIFF image, not FITS");
  });

  it("a FITS file with a broken header", async () => {
    const fits = Buffer.from(encodeFits({ width: 4, height: 4, planes: [new Float32Array(16)], cards: [{ key: "EXPTIME", value: 1 }] }));
    const broken = place("no-end.fits", Buffer.from(fits.toString("latin1").replace(/END {77}/, " ".repeat(80)), "latin1"));
    expect(await refusal([fixture.filesOf("fits")[0], broken])).toMatch(/^no-end\.fits: the header has no END card/);
  });

  it("a decompression bomb", async () => {
    const bomb = place("bomb.png", makeClaimingPng(50000, 50000));
    expect(await refusal([fixture.filesOf("jpeg")[0], bomb])).toMatch(/^bomb\.png: .*200-megapixel limit \(a decompression bomb/);
  });

  it("a zero-byte file", async () => {
    const empty = place("empty.tif", Buffer.alloc(0));
    expect(await refusal([fixture.filesOf("jpeg")[0], empty])).toBe("empty.tif: the file is empty (0 bytes)");
  });

  it("frames of different sizes", async () => {
    const small = await sharp({ create: { width: 100, height: 80, channels: 3, background: "#202020" }, limitInputPixels: 1e6 }).jpeg().toBuffer();
    const other = place("small.jpg", small);
    const [first] = fixture.filesOf("jpeg");
    const message = await refusal([first, other], { exposureOverrides: new Map([["small.jpg", 0.01]]) });
    expect(message).toBe("small.jpg: the frame is 100 x 80 with 3 colour planes, but synthetic-01.jpg is 320 x 256 with 3; a bracket's frames must all be one size");
  });

  it("a bracket of one frame", async () => {
    expect(await refusal([fixture.filesOf("jpeg")[0]])).toBe("a bracket needs at least 2 frames, got 1: synthetic-01.jpg alone");
  });

  it("a frame without an exposure (JPEG without EXIF, no CSV)", async () => {
    const bare = await sharp(readFileSync(fixture.filesOf("jpeg")[1])).jpeg().toBuffer(); // sharp drops EXIF unless asked to keep it
    const path = place("no-exif.jpg", bare);
    expect(await refusal([fixture.filesOf("jpeg")[0], path])).toMatch(/^no-exif\.jpg: no exposure time in the file \(no EXIF ExposureTime\); give one .*exposures CSV/);
  });

  it("an exposure override for a file that is not in the bracket", async () => {
    const message = await refusal(fixture.filesOf("jpeg").slice(0, 2), { exposureOverrides: new Map([["synthetic-09.jpg", 0.1]]), exposureOverrideSource: "list.csv" });
    expect(message).toMatch(/^list\.csv: synthetic-09\.jpg is not among the 2 frames given/);
  });

  it("an output folder that already holds a reduction, which stays as it was", async () => {
    const outDir = join(work, "earlier");
    mkdirSync(outDir);
    writeFileSync(join(outDir, "report.json"), "{}");
    const error = await runReductionOnFiles({ files: fixture.filesOf("jpeg").slice(0, 2), outDir }).then(() => undefined, (e: unknown) => e);
    expect((error as Error).message).toMatch(/earlier: the folder exists and is not empty; a reduction never overwrites another/);
    expect(readdirSync(outDir)).toEqual(["report.json"]);
  });
});

describe("the exposures CSV", () => {
  it("reads decimals and shutter fractions by file name", () => {
    const map = parseExposuresCsv("file,exposure_s,note\nframes/a.jpg,0.004,x\n\"b, c.jpg\",1/250,\n", "e.csv");
    expect([...map]).toEqual([["a.jpg", 0.004], ["b, c.jpg", 1 / 250]]);
  });

  it.each([
    ["name,seconds\na.jpg,1\n", /^e\.csv line 1: the header row needs the columns file and exposure_s, found "name", "seconds"$/],
    ["file,exposure_s\na.jpg,1\nb.jpg,fast\n", /^e\.csv line 3: exposure_s "fast" is not a positive number of seconds/],
    ["file,exposure_s\na.jpg,-2\n", /^e\.csv line 2: exposure_s "-2" is not a positive/],
    ["file,exposure_s\na.jpg,1,2\n", /^e\.csv line 2: 3 fields, but the header row has 2$/],
    ["file,exposure_s\na.jpg,1\n\na.jpg,2\n", /^e\.csv line 4: a\.jpg is listed again \(first on line 2\)$/],
    ["file,exposure_s\n\"a.jpg,1\n", /^e\.csv line 2: a quoted field is not closed$/],
    ["", /^e\.csv: the file is empty/],
  ])("refuses %j naming the line", (text, message) => {
    expect(() => parseExposuresCsv(text, "e.csv")).toThrow(message);
  });
});

describe("npm run reduce on bad input", () => {
  it("exits 2 with the CSV line at fault and writes nothing", () => {
    const csv = place("exposures.csv", Buffer.from("file,exposure_s\nsynthetic-01.tif,0.0005\nsynthetic-02.tif,1/0.x\n"));
    const outDir = join(work, "cli-out");
    const run = spawnSync("npx", ["tsx", "scripts/reduce.ts", "--out", outDir, "--exposures", csv, ...fixture.filesOf("tiff")], { encoding: "utf8" });
    expect(run.status).toBe(2);
    expect(run.stderr.trim()).toBe('exposures.csv line 3: exposure_s "1/0.x" is not a positive number of seconds (write 0.004 or 1/250)');
    expect(existsSync(outDir)).toBe(false);
  });

  it("names a bad option and shows the usage", () => {
    // "sun" became a mode with registration on the Sun; an unknown mode is still refused with the usage.
    expect(() => parseReduceArgs(["--out", "x", "--register", "limb", "a.jpg"])).toThrow(/^--register: expected sun, moon or corona, got "limb"\nusage:/);
    expect(() => parseReduceArgs(["a.jpg", "b.jpg"])).toThrow(/^--out: a folder to write the reduction into is required/);
    expect(() => parseReduceArgs(["--out", "x"])).toThrow(/^no frames given/);
    expect(parseReduceArgs(["--out=x", "--filter", "nrgf", "a.jpg", "b.jpg"])).toMatchObject({ outDir: "x", filter: "nrgf", files: ["a.jpg", "b.jpg"] });
  });
});
