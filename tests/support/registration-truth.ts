// How far a found master-to-frame map is from the true one where the corona is:
// the RMS distance between the two maps' images of points on rings at 1.3, 1.9
// and 2.5 solar radii about the Sun (72 points a ring), in frame pixels.
import { applyAffine, type AffineSimilarity } from "@/lib/imaging/similarity";

export function measureCoronaRmsPx(found: AffineSimilarity, expected: AffineSimilarity, sunCentre: { x: number; y: number }, sunRadiusPx: number): number {
  let sum2 = 0;
  let count = 0;
  for (let k = 0; k < 72; k++) {
    for (const rr of [1.3, 1.9, 2.5]) {
      const x = sunCentre.x + rr * sunRadiusPx * Math.cos((k * Math.PI) / 36);
      const y = sunCentre.y + rr * sunRadiusPx * Math.sin((k * Math.PI) / 36);
      const p = applyAffine(found, x, y);
      const q = applyAffine(expected, x, y);
      sum2 += (p.x - q.x) ** 2 + (p.y - q.y) ** 2;
      count++;
    }
  }
  return Math.sqrt(sum2 / count);
}
