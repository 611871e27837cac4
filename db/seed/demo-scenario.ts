// The demo scenario's three observing parties at the total solar eclipse of
// 2027 August 2 (invented people of the Kestrel Ridge Astronomical Society):
// each with a site, a kit and a synthetic bracket. Places and times follow
// DESIGN.md section 7; the frames are rendered for the sky at each site.
import type { SiteInput } from "@/lib/sites/sites";
import type { KitInput } from "@/lib/kits/kits";
import type { DemoSitePlace } from "./demo-geometry";

export const DEMO_ECLIPSE_ID = "2027-08-02";
/** Corona brackets run from about 1/1000 s to several seconds (REFERENCES.md, common practice); 5 steps of 2 stops here. */
export const DEMO_EXPOSURES_S = [1 / 1000, 1 / 250, 1 / 60, 1 / 15, 1 / 4];
/** One corona for the whole demo: every observer's brackets show the same Sun, so that their reductions compose. */
export const DEMO_CORONA_SEED = 2027_0802;
export const SYNTHETIC_NOTE = "Synthetic frames made by Crownlight's own generator for the demo scenario, with the Sun and Moon placed as seen from this site; not an observation.";

export interface DemoParty {
  email: string;
  site: SiteInput;
  kit: KitInput;
  setName: string;
  setNotes: string;
  width: number;
  height: number;
  channels: 1 | 3;
  frameIntervalS: number;
  seed: number;
  filePrefix: string;
}

/**
 * The ship's short track in the Gulf of Gabes off Sfax: steaming north-east at
 * about 7 knots from 09:00 to 09:30 UTC (invented), one point every 5 minutes.
 */
export function buildShipTrackCsv(): string {
  const startMs = Date.UTC(2027, 7, 2, 9, 0, 0);
  const lines = ["time,lat,lon,elevation_m"];
  for (let k = 0; k <= 6; k++) {
    const t = new Date(startMs + k * 5 * 60_000).toISOString();
    // 7 knots is 3.6 m/s: 1.08 km per 5 min, north-east, about 0.0069 deg of latitude and 0.0084 deg of longitude here.
    lines.push(`${t},${(34.56 + k * 0.0069).toFixed(4)},${(11.36 + k * 0.0084).toFixed(4)},8`);
  }
  return `${lines.join("\n")}\n`;
}

export const DEMO_PARTIES: DemoParty[] = [
  {
    email: "oskar.lindqvist@kestrel-ridge.example",
    site: { kind: "fixed", name: "Luxor, west bank of the Nile", publicLabel: "Luxor", latDeg: 25.69, lonDeg: 32.64, elevationM: 80, precision: "rounded" },
    kit: {
      name: "Tracking mount, 100 mm lens, mono camera",
      camera: "Cooled mono camera",
      sensorWidthMm: 6.144,
      sensorHeightMm: 4.608,
      pixelPitchUm: 4.8,
      focalMm: 100,
      teleconverter: 1,
      fNumber: 5.6,
      mount: "equatorial",
      flipHorizontal: false,
      flipVertical: false,
      notes: "Demo kit. Camera squared to north on the equatorial mount.",
    },
    setName: "Luxor corona bracket",
    setNotes: `Five exposures from 1/1000 s to 1/4 s at mid-totality. ${SYNTHETIC_NOTE}`,
    width: 1280,
    height: 960,
    channels: 1,
    frameIntervalS: 2,
    seed: 2027_0802_1,
    filePrefix: "luxor",
  },
  {
    email: "oskar.lindqvist@kestrel-ridge.example",
    site: { kind: "fixed", name: "Luxor, west bank of the Nile", publicLabel: "Luxor", latDeg: 25.69, lonDeg: 32.64, elevationM: 80, precision: "rounded" },
    kit: {
      name: "Tracking mount, 400 mm lens, mono camera",
      camera: "Cooled mono camera",
      sensorWidthMm: 6.144,
      sensorHeightMm: 4.608,
      pixelPitchUm: 4.8,
      focalMm: 400,
      teleconverter: 1,
      fNumber: 5.6,
      mount: "equatorial",
      flipHorizontal: false,
      flipVertical: false,
      notes: "Demo kit. A long lens on the same mount, for the inner corona and prominences.",
    },
    setName: "Luxor inner corona, long lens",
    setNotes: `Five exposures from 1/1000 s to 1/4 s through the 400 mm lens, beside the 100 mm bracket. ${SYNTHETIC_NOTE}`,
    width: 1280,
    height: 960,
    channels: 1,
    frameIntervalS: 2,
    seed: 2027_0802_4,
    filePrefix: "luxor-long",
  },
  {
    email: "nadia.fairweather@kestrel-ridge.example",
    site: { kind: "fixed", name: "Cadiz, Campo del Sur", publicLabel: "Cadiz", latDeg: 36.53, lonDeg: -6.29, elevationM: 10, precision: "exact" },
    kit: {
      name: "Tripod, 120 mm lens, colour camera",
      camera: "Colour mirrorless camera",
      sensorWidthMm: 7.08,
      sensorHeightMm: 4.72,
      pixelPitchUm: 5.9,
      focalMm: 120,
      teleconverter: 1,
      fNumber: 8,
      mount: "fixed-tripod",
      flipHorizontal: false,
      flipVertical: false,
      notes: "Demo kit. Levelled camera on a fixed tripod.",
    },
    setName: "Cadiz corona bracket",
    setNotes: `Five exposures from 1/1000 s to 1/4 s in the short totality at Cadiz. ${SYNTHETIC_NOTE}`,
    width: 1200,
    height: 800,
    channels: 3,
    frameIntervalS: 1.5,
    seed: 2027_0802_2,
    filePrefix: "cadiz",
  },
  {
    email: "priya.raman-holt@kestrel-ridge.example",
    site: { kind: "moving", name: "Ship's deck, Gulf of Gabes off Sfax", publicLabel: "Gulf of Gabes (at sea)", trackFileName: "gulf-of-gabes-track.csv", trackText: buildShipTrackCsv(), precision: "rounded" },
    kit: {
      name: "Gyro-levelled alt-az head, 90 mm lens, colour camera",
      camera: "Colour mirrorless camera",
      sensorWidthMm: 4.4032,
      sensorHeightMm: 3.3024,
      pixelPitchUm: 4.3,
      focalMm: 90,
      teleconverter: 1,
      fNumber: 5.6,
      mount: "alt-az",
      flipHorizontal: false,
      flipVertical: false,
      notes: "Demo kit. An alt-az head kept level on the ship's deck.",
    },
    setName: "Gulf of Gabes corona bracket, from the ship",
    setNotes: `Five exposures from 1/1000 s to 1/4 s from the deck of a moving ship. ${SYNTHETIC_NOTE}`,
    width: 1024,
    height: 768,
    channels: 3,
    frameIntervalS: 2,
    seed: 2027_0802_3,
    filePrefix: "gabes",
  },
];

/** Where the generator puts the observer: the same place the site row holds. */
export function toDemoPlace(site: SiteInput, track: { timeMs: number; latDeg: number; lonDeg: number; elevationM?: number }[] | null): DemoSitePlace {
  if (site.kind === "fixed") return { kind: "fixed", location: { latDeg: site.latDeg, lonDeg: site.lonDeg, elevationM: site.elevationM } };
  if (!track) throw new Error(`demo site ${site.name}: the moving site has no track`);
  return { kind: "moving", track };
}
