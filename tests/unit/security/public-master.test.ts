// The public copy of master.fits: the observer at the site's precision, the
// data unit untouched. OBSGEO follows WCS Paper VII (Rots et al. 2015) on WGS 84;
// the geodetic round trip is checked against our forward formula, and the FITS
// structure (80-character cards, 2880-byte blocks, FITS 4.0 section 3.3.1).
import { describe, expect, it } from "vitest";
import { encodeFits } from "@/lib/media";
import { cardKey, cardNumber, findFitsHeaderLength, splitFitsHeader } from "@/lib/media/fits-header-edit";
import { geodeticFromObsGeo, streamPublicMaster, toPublicMasterCards } from "@/lib/plates/public-master";
import { buildHelioWcsCards, computeObsGeoM } from "@/lib/reduction-runner/helio-wcs";
import { publicSkyFromReport } from "@/lib/editions/export/sky";
import { avmSpatial } from "@/lib/editions/export/metadata";
import { toPublicObserver, toPublicSite } from "@/lib/sites/precision";

const EXACT = { latDeg: 25.68734, lonDeg: 32.63921, elevationM: 81 };
const T = Date.UTC(2027, 7, 2, 10, 4, 40);
const wcs = buildHelioWcsCards(
  { sunCentrePx: { x: 20, y: 15 }, plateScaleArcsecPerPx: 24, northAngleDeg: 10, pAngleDeg: 14, rsunObsArcsec: 945.7654, dsunObsM: 151_789_123_456, observer: EXACT, moonSilhouetteMs: T },
  T,
);
const data = Float32Array.from({ length: 40 * 30 }, (_, i) => Math.sin(i) * 100);
const master = encodeFits({ width: 40, height: 30, planes: [data], cards: wcs });
const headerLength = findFitsHeaderLength(master)!;
const cards = splitFitsHeader(master.subarray(0, headerLength));
const value = (list: string[], key: string) => cardNumber(list.find((c) => cardKey(c) === key) ?? "");

function chunked(bytes: Uint8Array, size: number): ReadableStream<Uint8Array> {
  let at = 0;
  return new ReadableStream({
    pull(c) {
      if (at >= bytes.length) return c.close();
      c.enqueue(bytes.slice(at, at + size));
      at += size;
    },
  });
}

async function readAll(stream: ReadableStream<Uint8Array>): Promise<Uint8Array> {
  const parts: Uint8Array[] = [];
  for await (const p of stream as unknown as AsyncIterable<Uint8Array>) parts.push(p);
  return Buffer.concat(parts);
}

describe("geodetic position from OBSGEO", () => {
  it("inverts the WGS 84 forward formula to well under a millimetre", () => {
    for (const site of [EXACT, { latDeg: -33.9, lonDeg: 18.4, elevationM: 0 }, { latDeg: 78.2, lonDeg: -15.6, elevationM: 2500 }]) {
      const g = computeObsGeoM(site);
      const back = geodeticFromObsGeo(g.x, g.y, g.z);
      expect(back.latDeg).toBeCloseTo(site.latDeg, 9);
      expect(back.lonDeg).toBeCloseTo(site.lonDeg, 9);
      expect(back.elevationM).toBeCloseTo(site.elevationM, 3);
    }
  });
});

describe("public header cards", () => {
  it("keep an exact site as it is", () => {
    expect(toPublicMasterCards(cards, "exact")).toEqual(cards);
  });

  it("round a rounded site's observer to the 0.1 degree grid and 100 m, and say so", () => {
    const pub = toPublicMasterCards(cards, "rounded");
    const g = geodeticFromObsGeo(value(pub, "OBSGEO-X")!, value(pub, "OBSGEO-Y")!, value(pub, "OBSGEO-Z")!);
    // OBSGEO in whole metres: within a metre of the grid point (1 m is about 1e-5 degree).
    expect(g.latDeg).toBeCloseTo(25.7, 4);
    expect(g.lonDeg).toBeCloseTo(32.6, 4);
    expect(Math.abs(g.elevationM - 100)).toBeLessThan(2);
    expect(pub.find((c) => cardKey(c) === "LOCPREC")).toMatch(/'rounded '/);
    expect(pub.filter((c) => cardKey(c) === "COMMENT").join("")).toMatch(/rounded to 25\.7 deg, 32\.6 deg/);
    expect(value(pub, "DSUN_OBS")).toBe(151_789_120_000);
    // Everything else, the WCS included, as it was.
    const others = (list: string[]) => list.filter((c) => !/^(OBSGEO|DSUN_OBS|RSUN_OBS|LOCPREC|COMMENT)/.test(cardKey(c)));
    expect(others(pub)).toEqual(others(cards));
  });

  it("leave out a hidden site's observer, coarsen the Sun's distance past the Earth's size, and say so", () => {
    const pub = toPublicMasterCards(cards, "hidden");
    expect(pub.filter((c) => cardKey(c).startsWith("OBSGEO"))).toEqual([]);
    expect(pub.find((c) => cardKey(c) === "LOCPREC")).toMatch(/'hidden  '/);
    expect(value(pub, "DSUN_OBS")).toBe(151_790_000_000);
    expect(value(pub, "RSUN_OBS")).toBe(945.8);
    expect(pub.filter((c) => cardKey(c) === "COMMENT").join("")).toMatch(/position is withheld/);
  });

  it("drop other cards that would state the place (SITELAT, SITELONG)", () => {
    const withSite = [...cards, "SITELAT =             25.68734".padEnd(80), "SITELONG=             32.63921".padEnd(80)];
    expect(toPublicMasterCards(withSite, "rounded").some((c) => /SITEL/.test(cardKey(c)))).toBe(false);
  });
});

describe("the public master stream", () => {
  it("rewrites the header and passes the data unit on byte for byte, whatever the chunk size", async () => {
    for (const size of [7, 700, 2880, 1 << 20]) {
      const { stream, lengthDelta } = await streamPublicMaster(chunked(master, size), "hidden");
      const out = await readAll(stream);
      expect(out.length).toBe(master.length + lengthDelta);
      const newHeader = findFitsHeaderLength(out)!;
      expect(newHeader % 2880).toBe(0);
      expect(Buffer.from(out.subarray(newHeader)).equals(Buffer.from(master.subarray(headerLength)))).toBe(true);
      expect(splitFitsHeader(out.subarray(0, newHeader)).some((c) => cardKey(c) === "OBSGEO-X")).toBe(false);
    }
  });

  it("adds a block when the new cards do not fit in the old ones", async () => {
    // Fill the header so that END is the last card of its block.
    const spare = 36 - ((cards.length + 1) % 36);
    const full = encodeFits({ width: 40, height: 30, planes: [data], cards: [...wcs, ...Array.from({ length: spare % 36 }, (_, i) => ({ key: `PAD${i}`, value: i }))] });
    const oldHeader = findFitsHeaderLength(full)!;
    const { stream, lengthDelta } = await streamPublicMaster(chunked(full, 4096), "rounded");
    const out = await readAll(stream);
    expect(out.length).toBe(full.length + lengthDelta);
    expect(Buffer.from(out.subarray(findFitsHeaderLength(out)!)).equals(Buffer.from(full.subarray(oldHeader)))).toBe(true);
  });

  it("refuses a file with no END card instead of serving it unedited", async () => {
    await expect(streamPublicMaster(chunked(new Uint8Array(2880 * 101).fill(0x20), 2880), "hidden")).rejects.toThrow(/no END card/);
  });
});

describe("what public pages get of a site", () => {
  it("the label and country for a rounded site, never the name; nothing for a hidden one", () => {
    const site = { publicLabel: " Luxor ", latDeg: 25.68734, lonDeg: 32.63921, precision: "rounded" as const };
    expect(toPublicSite(site, "Egypt")).toEqual({ label: "Luxor", country: "Egypt", position: { latDeg: 25.7, lonDeg: 32.6, precision: "rounded" } });
    expect(toPublicSite({ ...site, publicLabel: "" }, "Egypt").label).toBeNull();
    expect(toPublicSite({ ...site, precision: "hidden" }, "Egypt")).toEqual({ label: null, country: null, position: null });
  });

  it("an observer rounded to the grid and 100 m, or none", () => {
    expect(toPublicObserver(EXACT, "rounded")).toEqual({ latDeg: 25.7, lonDeg: 32.6, elevationM: 100 });
    expect(toPublicObserver(EXACT, "exact")).toEqual(EXACT);
    expect(toPublicObserver(EXACT, "hidden")).toBeNull();
  });
});

describe("the print bundle's sky geometry", () => {
  const report = {
    overall: {
      masterSize: { width: 1600, height: 1200 },
      sky: { sunCentrePx: { x: 800, y: 600 }, plateScaleArcsecPerPx: 2, northAngleDeg: 30, moonSilhouetteUtc: "2027-08-02T10:05:00.000Z", observer: EXACT },
    },
  };

  it("keeps an exact observer, rounds a rounded one, and uses the Earth's centre for a hidden one", () => {
    expect(publicSkyFromReport(report, "exact")?.observer).toEqual(EXACT);
    expect(publicSkyFromReport(report, "rounded")?.observer).toEqual({ latDeg: 25.7, lonDeg: 32.6, elevationM: 100 });
    expect(publicSkyFromReport(report, "hidden")?.observer).toBeNull();
    const text = JSON.stringify([publicSkyFromReport(report, "rounded"), publicSkyFromReport(report, "hidden")]);
    for (const exact of ["25.687", "32.639"]) expect(text).not.toContain(exact);
  });

  it("still places the Sun for a hidden site: geocentric, within the solar parallax (8.8 arcsec at most, from memory) of the topocentric place", () => {
    const hidden = avmSpatial(publicSkyFromReport(report, "hidden"), 1600, 1200)!;
    const exact = avmSpatial(publicSkyFromReport(report, "exact"), 1600, 1200)!;
    const [ra1, dec1] = hidden.referenceValue;
    const [ra2, dec2] = exact.referenceValue;
    const sepArcsec = Math.hypot((ra1 - ra2) * Math.cos((dec1 * Math.PI) / 180), dec1 - dec2) * 3600;
    expect(sepArcsec).toBeGreaterThan(0);
    expect(sepArcsec).toBeLessThan(9);
  });
});
