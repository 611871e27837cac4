// Registration on the Sun refuses what it cannot use, naming the option, file or
// field and the fault, and leaves no output or staging folder behind.
import { existsSync, mkdirSync, rmSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { encodeFits } from "@/lib/media";
import { parseReduceArgs, parseSiteText, parseSiteTrackText, runReductionOnFiles, type SiteSpec } from "@/lib/reduction-runner";
import { estimateNorthAngle } from "@/lib/reduction-runner/sun-geometry";
import { listStagingLeftovers, writeBracketFixture, type BracketFixture } from "./bracket-fixture";

let fixture: BracketFixture;
let work: string;
beforeAll(async () => {
  fixture = await writeBracketFixture();
  work = join(fixture.dir, "..", "bad-sun");
  mkdirSync(work);
}, 60_000);
afterAll(() => rmSync(join(fixture.dir, ".."), { recursive: true, force: true }));

async function refusal(options: Omit<Parameters<typeof runReductionOnFiles>[0], "outDir">): Promise<string> {
  const outDir = join(work, `out-${Math.random().toString(36).slice(2)}`);
  const error = await runReductionOnFiles({ ...options, outDir }).then(() => undefined, (e: unknown) => e);
  expect(error).toBeInstanceOf(Error);
  expect(existsSync(outDir)).toBe(false);
  expect(listStagingLeftovers(outDir)).toEqual([]);
  return (error as Error).message;
}

const LUXOR: SiteSpec = { kind: "fixed", location: { latDeg: 25.69, lonDeg: 32.64, elevationM: 80 } };

describe("runReductionOnFiles with --register sun refuses bad input", () => {
  it("without a site, saying what is missing in words (the command line adds its options)", async () => {
    expect(await refusal({ files: fixture.filesOf("fits"), registration: "sun" })).toMatch(/^registration on the Sun needs the observer's site: give where the frames were taken/);
  });

  it("without capture times, naming every file and the field", async () => {
    const files = ["undated-01.fits", "undated-02.fits"].map((name, k) => {
      const path = join(work, name);
      const plane = new Float32Array(64 * 64).fill(100 + k);
      writeFileSync(path, encodeFits({ width: 64, height: 64, planes: [plane], cards: [{ key: "EXPTIME", value: 0.01 * (k + 1) }] }));
      return path;
    });
    const message = await refusal({ files, registration: "sun", sky: { site: LUXOR } });
    expect(message).toMatch(/^undated-01\.fits, undated-02\.fits: no capture time, neither in the file \(its EXIF DateTimeOriginal or FITS DATE-OBS\) nor given by the photographer; registration on the Sun needs each frame's time/);
  });

  it("with a site track that does not cover the frames, naming the track file and the frame", async () => {
    const track = parseSiteTrackText("time,lat,lon\n2027-08-02T09:00:00Z,34.6,11.4\n2027-08-02T09:30:00Z,34.7,11.5\n", "ship-track.csv");
    const message = await refusal({ files: fixture.filesOf("fits"), registration: "sun", sky: { site: track } });
    expect(message).toMatch(/^ship-track\.csv: the track runs from 2027-08-02T09:00:00\.000Z to 2027-08-02T09:30:00\.000Z but does not cover synthetic-\d+\.fits, taken at 2027-08-02T10:0/);
  });

  it("when the Sun and Moon do not overlap at a frame's time and place, naming the frame", async () => {
    // The fixture's frames are stamped 2027 August 2 near 10:03 UTC; an hour's clock error puts the Moon far off the Sun.
    const message = await refusal({ files: fixture.filesOf("fits"), registration: "sun", sky: { site: LUXOR, clockOffsetS: 3 * 3600 } });
    expect(message).toMatch(/^synthetic-01\.fits: at 2027-08-02T07:0\d.* the Moon's centre is \d+ arcsec from the Sun's .* so the disks do not touch; check the capture time, --clock-offset and the site$/);
  });
});

describe("the command line's sky options", () => {
  const base = ["--out", "o", "a.fits", "b.fits"];
  it("parses --register sun with a site, a clock offset and a north angle", () => {
    expect(parseReduceArgs(["--register", "sun", "--site", "25.29,-104.14,1200", "--clock-offset", "-2.5", "--north-angle=12", ...base])).toMatchObject({
      registration: "sun", siteText: "25.29,-104.14,1200", clockOffsetS: -2.5, northAngleDeg: 12,
    });
    expect(parseSiteText("25.29,-104.14,1200")).toEqual({ kind: "fixed", location: { latDeg: 25.29, lonDeg: -104.14, elevationM: 1200 } });
  });

  it("names the option at fault", () => {
    expect(() => parseReduceArgs(["--register", "sky", ...base])).toThrow(/^--register: expected sun, moon or corona, got "sky"/);
    expect(() => parseReduceArgs(["--clock-offset", "2 s", ...base])).toThrow(/^--clock-offset: expected a number of seconds, got "2 s"/);
    expect(() => parseReduceArgs(["--north-angle", "north", ...base])).toThrow(/^--north-angle: expected a number of degrees/);
    expect(() => parseReduceArgs(["--site", "1,2,3", "--site-file", "t.gpx", ...base])).toThrow(/^--site and --site-file: give one of them/);
    expect(() => parseSiteText("25.29;-104.14")).toThrow(/^--site "25\.29;-104\.14": expected LAT,LON,ELEV/);
    expect(() => parseSiteText("95,10,0")).toThrow(/^--site "95,10,0": latDeg must be a finite number in \[-90, 90\], got 95/);
    expect(() => parseSiteTrackText("time,lat,lon\n2027-08-02T09:00:00,34.6,11.4\n", "bad.csv")).toThrow(/^bad\.csv: line 2: the timestamp "2027-08-02T09:00:00" is not an ISO 8601 UTC time/);
  });
});

describe("estimateNorthAngle", () => {
  // Moon centres laid out from the definition: north at theta counter-clockwise from image up (y down), east 90 deg further.
  function layOut(thetaDeg: number, scale: number, sun: { x: number; y: number }, offsets: { n: number; e: number }[]) {
    const t = (thetaDeg * Math.PI) / 180;
    const north = { x: -Math.sin(t), y: -Math.cos(t) };
    const east = { x: -Math.cos(t), y: Math.sin(t) };
    return offsets.map(({ n, e }) => ({ x: sun.x + (n * north.x + e * east.x) / scale, y: sun.y + (n * north.y + e * east.y) / scale, weight: 1, northArcsec: n, eastArcsec: e }));
  }
  const path = Array.from({ length: 6 }, (_, k) => ({ n: -10 + 4 * k, e: -12 + 5 * k }));

  it("recovers the angle and the Sun's centre exactly from noise-free centres (an analytic invariant)", () => {
    for (const theta of [0, 30, 135, 250, 359]) {
      const est = estimateNorthAngle(layOut(theta, 2.5, { x: 400.25, y: 300.5 }, path), 2.5);
      expect(Math.abs(((est.northAngleDeg - theta + 540) % 360) - 180)).toBeLessThan(1e-9);
      expect(Math.hypot(est.sunCentre.x - 400.25, est.sunCentre.y - 300.5)).toBeLessThan(1e-9);
      expect(est.rmsPx).toBeLessThan(1e-9);
    }
  });

  it("says how poorly a short path fixes the angle", () => {
    // The Moon moves 0.06 px in all: against the 0.05 px floor of a centre, the angle is unknown.
    const est = estimateNorthAngle(layOut(40, 20, { x: 10, y: 10 }, [{ n: 0, e: 0 }, { n: 0.6, e: 0.6 }, { n: 1.2, e: 1.2 }]), 20);
    expect(est.sigmaDeg).toBeGreaterThan(30);
    expect(() => estimateNorthAngle(layOut(40, 20, { x: 10, y: 10 }, [{ n: 0, e: 0 }]), 20)).toThrow(/at least 2 frames .* --north-angle on the command line/);
  });
});
