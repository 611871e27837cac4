// astropy (Debian python3-astropy) reads the helioprojective WCS of a master
// registered on the Sun, and its own ephemeris and geodesy check the sky cards:
// the Sun's centre maps to (0, 0), a solar radius maps to RSUN_OBS, solar north
// points where the chosen image orientation and astropy's P angle put it,
// DSUN_OBS is the Sun's distance, and OBSGEO is the site on WGS 84.
import { readFileSync, rmSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runReductionOnFiles, type ReductionReport } from "@/lib/reduction-runner";
import { applyAffine, toAffine } from "@/lib/imaging/similarity";
import { runSystemPython } from "@/scripts/bench/system-python";
import { CLOCK_AHEAD_S, NORTH_ANGLE_DEG, SUN_SITE, SUN_SIZE_PX, writeSunBracket, type SunBracketFixture } from "../reduction-runner/sun-bracket-fixture";

// Pixels in and out are 0-based (astropy's *_values API); rows are as stored, y down.
const SCRIPT = `
import sys, json, math, warnings
import numpy as np
from astropy.io import fits
from astropy.wcs import WCS
from astropy.time import Time
from astropy.coordinates import SkyCoord, EarthLocation, TETE, get_sun
import astropy.units as u
from astropy.utils import iers
iers.conf.auto_download = False
# Offline: astropy warns that its IERS tables are stale; only geocentric quantities are used below, which need none.
warnings.simplefilter("ignore")
q = json.loads(sys.argv[2])
with fits.open(sys.argv[1]) as hdul:
    hdul.verify("exception")
    h = hdul[0].header
    w = WCS(h, naxis=2)
    def arcsec(v):
        v = float(v) % 360.0
        return (v - 360.0 if v > 180.0 else v) * 3600.0
    def world(x, y):
        tx, ty = w.pixel_to_world_values(x, y)
        return arcsec(tx), arcsec(ty)
    def distance(x, y):
        tx, ty = world(x, y)
        # Angular distance from the disk centre on the helioprojective sphere.
        return math.degrees(math.acos(math.cos(math.radians(tx / 3600)) * math.cos(math.radians(ty / 3600)))) * 3600
    c = q["sun"]
    ring = [distance(c["x"] + q["radiusPx"] * math.cos(a), c["y"] + q["radiusPx"] * math.sin(a)) for a in np.linspace(0, 2 * math.pi, 8, endpoint=False)]
    truthRing = [distance(c["x"] + q["truthRadiusPx"] * math.cos(a), c["y"] + q["truthRadiusPx"] * math.sin(a)) for a in np.linspace(0, 2 * math.pi, 8, endpoint=False)]
    p0 = w.world_to_pixel_values(0.0, 0.0)
    p1 = w.world_to_pixel_values(0.0, 500.0 / 3600.0)
    vi, vj = float(p1[0] - p0[0]), float(p1[1] - p0[1])
    t = Time(h["MOONDATE"], scale="utc")
    frame = TETE(obstime=t)
    sun = get_sun(t).transform_to(frame)
    # IAU WGCCRE north pole of the Sun, ICRF: RA 286.13 deg, Dec 63.87 deg (Archinal et al. 2011, from memory).
    pole = SkyCoord(ra=286.13 * u.deg, dec=63.87 * u.deg, frame="icrs").transform_to(frame)
    loc = EarthLocation.from_geodetic(lon=q["site"]["lonDeg"] * u.deg, lat=q["site"]["latDeg"] * u.deg, height=q["site"]["elevationM"] * u.m)
    print(json.dumps({
        "keys": [k for k in h.keys()],
        "cards": {k: h[k] for k in ("CTYPE1", "CTYPE2", "CUNIT1", "CUNIT2", "CRVAL1", "CRVAL2", "CDELT1", "CDELT2", "RSUN_OBS", "RSUN_REF", "DSUN_OBS", "DATE-OBS", "DATE-AVG", "OBSGEO-X", "OBSGEO-Y", "OBSGEO-Z")},
        "centre": world(c["x"], c["y"]),
        "ring": ring,
        "truthRing": truthRing,
        "solarNorthDeg": math.degrees(math.atan2(-vi, -vj)) % 360.0,
        "pDeg": (float(sun.position_angle(pole).deg) + 180.0) % 360.0 - 180.0,
        "sunDistanceM": float(sun.distance.to(u.m).value),
        "geo": [float(loc.x.to(u.m).value), float(loc.y.to(u.m).value), float(loc.z.to(u.m).value)],
    }))
`;

let fixture: SunBracketFixture;
let outDir: string;
let report: ReductionReport;
let northInMasterDeg: number;
let sunInMaster: { x: number; y: number };
beforeAll(async () => {
  fixture = await writeSunBracket();
  outDir = join(fixture.dir, "..", "out");
  // The reference frame (median exposure, the 4th of 7) defines master pixels; it is turned by its own pointing error.
  northInMasterDeg = NORTH_ANGLE_DEG - fixture.truth.transforms[3].rotationDeg;
  const run = await runReductionOnFiles({
    files: fixture.files, outDir, registration: "sun",
    sky: { site: { kind: "fixed", location: SUN_SITE }, clockOffsetS: CLOCK_AHEAD_S, northAngleDeg: northInMasterDeg },
  });
  report = run.report;
  const ref = report.frames.findIndex((f) => f.name === report.overall.referenceFrame);
  expect(ref).toBe(3);
  sunInMaster = applyAffine(toAffine(fixture.truth.transforms[ref], SUN_SIZE_PX, SUN_SIZE_PX), fixture.truth.sunCentre.x, fixture.truth.sunCentre.y);
}, 120_000);
afterAll(() => rmSync(join(fixture.dir, ".."), { recursive: true, force: true }));

describe("the master's helioprojective WCS read by astropy", () => {
  it("maps the Sun's centre to (0, 0), a solar radius to RSUN_OBS, and solar north where the orientation puts it", () => {
    const sky = report.overall.sky as { sunRadiusPx: number; plateScaleArcsecPerPx: number };
    const a = JSON.parse(runSystemPython(SCRIPT, [join(outDir, "master.fits"), JSON.stringify({
      sun: sunInMaster, radiusPx: sky.sunRadiusPx, truthRadiusPx: fixture.truth.sunRadiusPx, site: SUN_SITE,
    })], ["numpy", "astropy"]));
    const c = a.cards;
    expect(c).toMatchObject({ CTYPE1: "HPLN-TAN", CTYPE2: "HPLT-TAN", CUNIT1: "arcsec", CUNIT2: "arcsec", CRVAL1: 0, CRVAL2: 0, RSUN_REF: 695_700_000 });
    expect(c.CDELT1).toBe(c.CDELT2);
    // One rotation convention: the PC matrix, never CROTA2 beside it (Thompson 2006; WCS Paper II).
    expect(a.keys).toEqual(expect.arrayContaining(["PC1_1", "PC1_2", "PC2_1", "PC2_2", "DATE-OBS", "DATE-AVG", "OBSGEO-X"]));
    expect(a.keys.some((k: string) => k.startsWith("CROTA") || k.startsWith("CD1_"))).toBe(false);

    // The true Sun centre (synthetic truth) maps to the disk centre: within 0.2 px of the registration, in arcsec.
    expect(Math.hypot(a.centre[0], a.centre[1])).toBeLessThan(0.2 * c.CDELT1); // measured 0.006 px
    // One solar radius as the report states it, in 8 directions, is RSUN_OBS within 0.1 % (the requirement).
    for (const d of a.ring) expect(Math.abs(d / c.RSUN_OBS - 1)).toBeLessThan(1e-3);
    // The synthetic Sun's true radius: the plate scale comes from the fitted lunar limb, whose radius lib/imaging
    // finds 0.26 px (0.3 %) short on this bracket (PSF sigma 1 px against a steep limb corona); 0.5 % leaves room for that bias.
    for (const d of a.truthRing) expect(Math.abs(d / c.RSUN_OBS - 1)).toBeLessThan(5e-3);

    // Solar north: celestial north at the chosen angle, turned by the P angle astropy derives from the IAU pole.
    // Tolerance 0.05 deg: the pole from memory to 0.01 deg, and aberration of the pole's direction (20 arcsec at 90 deg) in astropy's transform.
    const expected = (((northInMasterDeg + a.pDeg) % 360) + 360) % 360;
    const diff = ((a.solarNorthDeg - expected + 540) % 360) - 180;
    expect(Math.abs(diff)).toBeLessThan(0.05);
    expect(a.pDeg).toBeLessThan(-20); // early April: P near -26 deg (Astronomical Almanac 2013, April 1: -26.15)
  });

  it("states the Sun's distance, its apparent radius and the observer as astropy computes them", () => {
    const a = JSON.parse(runSystemPython(SCRIPT, [join(outDir, "master.fits"), JSON.stringify({
      sun: sunInMaster, radiusPx: 1, truthRadiusPx: 1, site: SUN_SITE,
    })], ["numpy", "astropy"]));
    const c = a.cards;
    // Topocentric DSUN_OBS against astropy's geocentric Sun: the Earth's radius is 4.3e-5 of 1 au, so 1e-4.
    expect(Math.abs(c.DSUN_OBS / a.sunDistanceM - 1)).toBeLessThan(1e-4);
    // RSUN_OBS is 959.63 arcsec at 1 au (Auwers; REFERENCES.md) scaled by distance; the card is rounded to 1e-4 arcsec.
    const auM = 149_597_870_700; // IAU 2012 Resolution B2
    expect(c.RSUN_OBS * (c.DSUN_OBS / auM)).toBeCloseTo(959.63, 2);
    // OBSGEO: WGS 84 geodetic to geocentric, astropy's EarthLocation; cards rounded to 0.01 m.
    expect(Math.abs(c["OBSGEO-X"] - a.geo[0])).toBeLessThan(0.05);
    expect(Math.abs(c["OBSGEO-Y"] - a.geo[1])).toBeLessThan(0.05);
    expect(Math.abs(c["OBSGEO-Z"] - a.geo[2])).toBeLessThan(0.05);
    // DATE-OBS is the true start of the first exposure: the camera time less the clock offset.
    expect(Date.parse(`${c["DATE-OBS"]}Z`)).toBe(fixture.trueStartsMs[0]);
    const history = readFileSync(join(outDir, "master.fits"), "latin1");
    expect(history).toContain("Registered on the Sun");
    expect(history).not.toContain("No WCS");
  });
});
