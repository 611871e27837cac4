// Header of a composite's master FITS: the helioprojective WCS of its grid (north
// up: PC = [[1, 0], [0, -1]] in helio-wcs.ts's convention, rows stored top first),
// the reference input's solar radius and distance, the span of the inputs' times,
// and the provenance: every input with its factors and refinement, and the first
// lines of each input's own HISTORY (the pipeline that made it and its parameters).
import type { FitsCard } from "@/lib/media";
import type { CompositeResult } from "@/lib/imaging/composite";
import { RSUN_REF_M } from "@/lib/reduction-runner/helio-wcs";
import { formatFitsDateTime } from "@/lib/reduction-runner/master-fits";
import type { MasterProvenance } from "./read-master";

function round(value: number, digits: number): number {
  return Number(value.toFixed(digits));
}

/** Observers closer than this are one observer (one site, ITRS metres). */
const SAME_OBSERVER_M = 1000;

export function buildCompositeCards(result: CompositeResult, provenance: MasterProvenance[], creator: string, createdMs: number): { cards: FitsCard[]; history: string[] } {
  const { grid } = result;
  const ref = result.inputs.findIndex((i) => i.isReference);
  const refProv = provenance[ref];
  const begs = provenance.map((p) => p.dateBegMs ?? p.dateAvgMs).filter((t): t is number => t !== undefined);
  const ends = provenance.map((p) => p.dateEndMs ?? p.dateAvgMs).filter((t): t is number => t !== undefined);
  const avgs = provenance.map((p) => p.dateAvgMs).filter((t): t is number => t !== undefined);
  const cards: FitsCard[] = [
    { key: "BUNIT", value: "DN/s", comment: "reference input's data numbers per second per pixel" },
    { key: "NINPUTS", value: result.inputs.length, comment: "masters composed" },
    { key: "REFINPUT", value: result.inputs[ref].name.slice(0, 68), comment: "input whose units and scale the composite keeps" },
  ];
  if (begs.length && ends.length && avgs.length) {
    cards.push(
      { key: "TIMESYS", value: "UTC" },
      { key: "DATE-BEG", value: formatFitsDateTime(Math.min(...begs)), comment: "start of the earliest input" },
      { key: "DATE-AVG", value: formatFitsDateTime(avgs.reduce((s, t) => s + t, 0) / avgs.length), comment: "mean of the inputs' mean times" },
      { key: "DATE-END", value: formatFitsDateTime(Math.max(...ends)), comment: "end of the latest input" },
      { key: "DATE-OBS", value: formatFitsDateTime(Math.min(...begs)), comment: "start of the earliest input, UTC" },
    );
  }
  cards.push(
    { key: "WCSNAME", value: "Helioprojective-cartesian", comment: "Thompson 2006, A&A 449:791" },
    { key: "CTYPE1", value: "HPLN-TAN", comment: "helioprojective longitude, toward solar west" },
    { key: "CTYPE2", value: "HPLT-TAN", comment: "helioprojective latitude, toward solar north" },
    { key: "CUNIT1", value: "arcsec" },
    { key: "CUNIT2", value: "arcsec" },
    { key: "CRPIX1", value: round(grid.sunX + 1, 4), real: true, comment: "Sun centre, FITS pixels (1-based)" },
    { key: "CRPIX2", value: round(grid.sunY + 1, 4), real: true, comment: "Sun centre; rows are stored top row first" },
    { key: "CRVAL1", value: 0, real: true, comment: "[arcsec]" },
    { key: "CRVAL2", value: 0, real: true, comment: "[arcsec]" },
    { key: "CDELT1", value: round(grid.scaleArcsecPerPx, 8), real: true, comment: "[arcsec/pixel] plate scale" },
    { key: "CDELT2", value: round(grid.scaleArcsecPerPx, 8), real: true, comment: "[arcsec/pixel] plate scale" },
    { key: "PC1_1", value: 1, real: true, comment: "solar north up" },
    { key: "PC1_2", value: 0, real: true },
    { key: "PC2_1", value: 0, real: true },
    { key: "PC2_2", value: -1, real: true, comment: "negative: FITS rows run down the image" },
    { key: "RSUN_OBS", value: round(result.sunRadiusPx * grid.scaleArcsecPerPx, 4), real: true, comment: "[arcsec] apparent solar radius (reference input)" },
    { key: "RSUN_REF", value: RSUN_REF_M, real: true, comment: "[m] IAU 2015 nominal solar radius" },
  );
  if (refProv.dsunObsM !== undefined) cards.push({ key: "DSUN_OBS", value: round(refProv.dsunObsM, 0), real: true, comment: "[m] observer to Sun centre (reference input)" });
  const observers = provenance.map((p) => p.obsGeoM);
  const oneObserver = observers.every((o) => o && observers[0] && Math.hypot(o.x - observers[0].x, o.y - observers[0].y, o.z - observers[0].z) < SAME_OBSERVER_M);
  if (oneObserver && observers[0]) {
    cards.push(
      { key: "OBSGEO-X", value: round(observers[0].x, 2), real: true, comment: "[m] observer, ITRS (WGS 84)" },
      { key: "OBSGEO-Y", value: round(observers[0].y, 2), real: true, comment: "[m] observer, ITRS (WGS 84)" },
      { key: "OBSGEO-Z", value: round(observers[0].z, 2), real: true, comment: "[m] observer, ITRS (WGS 84)" },
    );
  }
  cards.push(
    { key: "SOLARNA", value: 0, real: true, comment: "[deg] solar north, ccw from image up" },
    { key: "SUNR", value: round(result.sunRadiusPx, 3), real: true, comment: "[pixel] apparent solar radius" },
    { key: "SUNX", value: round(grid.sunX + 1, 3), real: true, comment: "Sun centre x, FITS pixels" },
    { key: "SUNY", value: round(grid.sunY + 1, 3), real: true, comment: "Sun centre y, FITS pixels" },
    { key: "MOONCOVR", value: round(result.moonCover.radiusPx, 3), real: true, comment: "[pixel] disk about the Sun holding every input's Moon" },
    { key: "CREATOR", value: creator, comment: "software that made this file" },
    { key: "DATE", value: formatFitsDateTime(createdMs), comment: "UTC time this file was written" },
  );
  if (result.radiance.length === 3) cards.push({ key: "COMMENT", comment: "Planes along NAXIS3: 1 red, 2 green, 3 blue (linear light)." });

  const history = [
    `Composed by ${creator} from ${result.inputs.length} masters, reprojected onto one helioprojective grid (north up, ${grid.scaleArcsecPerPx.toFixed(4)} arcsec/px).`,
    oneObserver ? "All inputs share one observer." : "Inputs come from several observers: each one's OBSGEO is in its own master; no OBSGEO is written here.",
  ];
  result.inputs.forEach((input, k) => {
    const p = provenance[k];
    const factors = input.factors.map((f) => f.toPrecision(5)).join(", ");
    const refine = input.refinement.applied ? `WCS refined by (${input.refinement.lonArcsec.toFixed(2)}, ${input.refinement.latArcsec.toFixed(2)}) arcsec, peak ${input.refinement.peak.toFixed(3)}` : input.refinement.note ?? "WCS not refined";
    history.push(`Input ${k + 1}: ${input.name}${input.isReference ? " (reference)" : ""}, ${input.scaleArcsecPerPx.toFixed(4)} arcsec/px, field ${input.fieldR.inner} to ${input.fieldR.outer} solar radii, factor ${factors}; ${refine}; ${(100 * input.weightShare).toFixed(1)} % of the weight.`);
    for (const line of p.history.slice(0, 12)) history.push(`Input ${k + 1} history: ${line}`);
  });
  return { cards, history };
}
