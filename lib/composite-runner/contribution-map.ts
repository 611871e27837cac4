// The contribution map: each input's share of the weight at every composite
// pixel, drawn in a colour of its own and mixed where inputs share a pixel, so
// that a curator sees at a glance where each camera carries the composite and
// where one hands over to the next. The colours are Okabe and Ito's set for
// colour-blind readers ("Color Universal Design", 2008; from memory).
import type { PlaneImage } from "@/lib/imaging/types";

export const CONTRIBUTION_COLOURS: readonly (readonly [number, number, number])[] = [
  [230, 159, 0], // orange
  [86, 180, 233], // sky blue
  [0, 158, 115], // bluish green
  [213, 94, 0], // vermillion
  [204, 121, 167], // reddish purple
  [0, 114, 178], // blue
  [240, 228, 66], // yellow
];

export function colourOfInput(k: number): string {
  const [r, g, b] = CONTRIBUTION_COLOURS[k % CONTRIBUTION_COLOURS.length];
  return `#${[r, g, b].map((v) => v.toString(16).padStart(2, "0")).join("")}`;
}

/** The map as a three-plane image of display values 0..1 (black where no input reaches). */
export function drawContributionMap(shares: Uint8Array[], width: number, height: number): PlaneImage {
  const n = width * height;
  const planes = [new Float32Array(n), new Float32Array(n), new Float32Array(n)];
  shares.forEach((share, k) => {
    const colour = CONTRIBUTION_COLOURS[k % CONTRIBUTION_COLOURS.length];
    for (let i = 0; i < n; i++) {
      const s = share[i];
      if (s === 0) continue;
      for (let c = 0; c < 3; c++) planes[c][i] += (s / 255) * (colour[c] / 255);
    }
  });
  for (const p of planes) for (let i = 0; i < n; i++) p[i] = Math.min(1, p[i]);
  return { width, height, planes };
}
