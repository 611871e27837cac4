// A synthetic master (lib/imaging/synth-composite.ts) written as a reduction
// writes its master: the planes and the helioprojective WCS cards
// (lib/reduction-runner/helio-wcs.ts's convention), the Moon and the time.
// Invented data for tests, the benchmark and the demo.
import type { CompositeInput } from "@/lib/imaging/composite";
import { encodeFits, type FitsCard } from "@/lib/media";

export function encodeSyntheticMaster(input: CompositeInput, dateAvg: string, history: string[] = []): Uint8Array {
  const a = (input.grid.solarNorthDeg * Math.PI) / 180;
  const cards: FitsCard[] = [
    { key: "BUNIT", value: "DN/s" },
    { key: "DATE-AVG", value: dateAvg },
    { key: "CTYPE1", value: "HPLN-TAN" }, { key: "CTYPE2", value: "HPLT-TAN" },
    { key: "CUNIT1", value: "arcsec" }, { key: "CUNIT2", value: "arcsec" },
    { key: "CRPIX1", value: input.grid.sunX + 1, real: true }, { key: "CRPIX2", value: input.grid.sunY + 1, real: true },
    { key: "CRVAL1", value: 0, real: true }, { key: "CRVAL2", value: 0, real: true },
    { key: "CDELT1", value: input.grid.scaleArcsecPerPx, real: true }, { key: "CDELT2", value: input.grid.scaleArcsecPerPx, real: true },
    { key: "PC1_1", value: Math.cos(a), real: true }, { key: "PC1_2", value: -Math.sin(a), real: true },
    { key: "PC2_1", value: -Math.sin(a), real: true }, { key: "PC2_2", value: -Math.cos(a), real: true },
    { key: "RSUN_OBS", value: input.rsunArcsec, real: true },
    { key: "MOONX", value: input.moon.x + 1, real: true }, { key: "MOONY", value: input.moon.y + 1, real: true }, { key: "MOONR", value: input.moon.radiusPx, real: true },
  ];
  return encodeFits({ width: input.grid.width, height: input.grid.height, planes: input.planes, cards, history: ["Synthetic master (invented data).", ...history] });
}
