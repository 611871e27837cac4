// lib/imaging's OpenCV-weighted 8-bit merge against OpenCV's own MergeDebevec
// (Debian python3-opencv 4.6) on the same codes with the same linear response.
import { rmSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { decodeFrame } from "@/lib/media";
import { mergeCodesLikeOpenCv } from "@/lib/imaging/merge";
import { mergeWithOpenCvDebevec } from "@/scripts/bench/opencv-merge";
import { writeBracketFixture, type BracketFixture } from "../reduction-runner/bracket-fixture";

const LINEAR_RESPONSE = Float64Array.from({ length: 256 }, (_, z) => z);

let fixture: BracketFixture;
beforeAll(async () => {
  fixture = await writeBracketFixture();
}, 60_000);
afterAll(() => rmSync(join(fixture.dir, ".."), { recursive: true, force: true }));

describe("8-bit merge against OpenCV MergeDebevec", () => {
  it("one pixel: Z = (64, 128, 255) at t = (0.25, 0.5, 1) s gives E = 255.99484 (REFERENCES.md, computed from OpenCV's source)", () => {
    const [e] = mergeCodesLikeOpenCv([[64], [128], [255]], [0.25, 0.5, 1], LINEAR_RESPONSE);
    // Both sides work in float32 (ours stores the result as float32): 1e-4 absolute on 256.
    expect(Math.abs(e - 255.99484)).toBeLessThan(1e-4);
    const cv = mergeWithOpenCvDebevec([Uint8Array.of(64, 64, 64), Uint8Array.of(128, 128, 128), Uint8Array.of(255, 255, 255)], 1, 1, [0.25, 0.5, 1]);
    expect(Math.abs(cv.planes[0][0] - 255.99484)).toBeLessThan(1e-3);
  });

  it("the synthetic JPEG bracket: agrees to 2e-5 relative wherever every frame has a code above 0 and one frame is well exposed", async () => {
    const decoded = await Promise.all(fixture.filesOf("jpeg").map((f) => decodeFrame(f, f.split("/").pop()!)));
    const { width, height } = decoded[0].image;
    const n = width * height;
    let compared = 0;
    let worst = 0;
    for (let c = 0; c < 3; c++) {
      // OpenCV averages the three channels' weights into one weight per pixel; lib/imaging
      // weights each channel by its own code. Handing OpenCV one channel copied into all
      // three makes the two definitions the same, so what is compared is the arithmetic.
      const replicated = decoded.map((d) => {
        const out = new Uint8Array(n * 3);
        const plane = d.image.planes[c];
        for (let i = 0; i < n; i++) out[i * 3] = out[i * 3 + 1] = out[i * 3 + 2] = plane[i];
        return out;
      });
      const cv = mergeWithOpenCvDebevec(replicated, width, height, fixture.exposuresS);
      const ours = mergeCodesLikeOpenCv(decoded.map((d) => d.image.planes[c]), fixture.exposuresS, LINEAR_RESPONSE);
      for (let i = 0; i < n; i++) {
        const codes = decoded.map((d) => d.image.planes[c][i]);
        // ln 0 is -infinity on both sides (a black code in any frame zeroes the pixel): no comparison there.
        if (codes.some((z) => z === 0) || !codes.some((z) => z >= 20 && z <= 235)) continue;
        worst = Math.max(worst, Math.abs(ours[i] / cv.planes[0][i] - 1));
        compared++;
      }
    }
    expect(compared).toBeGreaterThan(0.2 * n);
    // OpenCV sums w (ln Z - ln t) in float32 over 5 frames (ln Z up to 5.5, ln t down to -7.6:
    // terms near 10, float32 epsilon 6e-8 -> about 1e-6 in ln E) and takes its own float32
    // log and exp; ours sums in float64. Both round E to float32 (6e-8). 2e-5 bounds that
    // with room; a wrong weight or a wrong exposure shows as 1e-2 or more.
    expect(worst).toBeLessThan(2e-5);
  }, 60_000);
});
