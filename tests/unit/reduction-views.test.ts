// The reduction page's server-rendered pieces, rendered to HTML: the profile
// plot and its table, the limb circles laid over frame thumbnails, the coverage
// legend, and the lenient reading of report.json they are fed from.
import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { CoverageMap } from "@/components/reductions/coverage-map";
import { FrameLimbs } from "@/components/reductions/frame-limbs";
import { RadialProfilePlot } from "@/components/reductions/radial-profile-plot";
import { parseReport } from "@/lib/reductions/report-schema";

const rings = Array.from({ length: 40 }, (_, k) => {
  const innerR = 1 + 0.05 * k;
  const meanR = innerR + 0.025;
  return { innerR, outerR: innerR + 0.05, meanR, meanLuminance: 1e-6 * meanR ** -2.5, pixelCount: 100 + k, ringFraction: k > 35 ? 0.3 : 1 };
});

const report = parseReport({
  pipelineVersion: "crownlight-imaging 0.1.0",
  frames: [
    { name: "f1.fits", frameId: null, decoded: { width: 320, height: 256, planes: 1 }, exposure: { seconds: 0.008, source: "fits-header" }, limb: { x: 160.25, y: 120.5, radiusPx: 40.2, rmsPx: 0.31, inlierFraction: 0.9, verdict: "sound" }, weights: { weightShare: 0.25 } },
    { name: "f2.fits", decoded: { width: 320, height: 256 }, exposure: { seconds: 2 }, limb: { x: null, y: null, radiusPx: null, rmsPx: null, verdict: "failed" }, weights: { weightShare: 0 } },
  ],
  overall: { referenceFrame: "f1.fits", dynamicRangeStops: 14.2, radialProfile: { centreSource: "sun", solarRadiusPx: 40, stepR: 0.05, unit: "", powerLaw: { fromR: 1.5, toR: 3, exponent: 2.5 }, rings } },
  timingsMs: { decode: 1200, total: 5000 },
  outputs: { coverage: "coverage.png" },
});

describe("report.json as the page reads it", () => {
  it("keeps what it shows and gives null for what an older report lacks", () => {
    expect(report.frames).toHaveLength(2);
    expect(report.overall.radialProfile?.rings).toHaveLength(40);
    expect(report.overall.coverage ?? null).toBeNull();
    const old = parseReport({ frames: [{ name: "x" }], overall: {} });
    expect(old.overall.referenceFrame).toBeNull();
    expect(old.frames[0].limb).toBeNull();
    expect(() => parseReport("not an object")).toThrow(SyntaxError);
  });
});

describe("RadialProfilePlot", () => {
  const html = renderToStaticMarkup(createElement(RadialProfilePlot, { profile: report.overall.radialProfile! }));

  it("draws an SVG with a title, a description naming the fall-off, and axes in solar radii", () => {
    expect(html).toMatch(/<svg[^>]*role="img"/);
    expect(html).toContain("<title");
    expect(html).toMatch(/roughly as r to the power −2\.50 between 1\.5 and 3 solar radii/);
    expect(html).toContain("Distance from the Sun&#x27;s centre (solar radii)");
    expect(html).toContain("Mean brightness (log scale)");
    // One point per ring with light, on a log scale from 1e-8 to 1e-6.
    expect(html.match(/<circle/g)).toHaveLength(40);
    // Decades labelled as powers of ten: 10 with a raised exponent.
    expect(html).toMatch(/10<tspan[^>]*>-6<\/tspan>/);
  });

  it("offers the same numbers as a table", () => {
    expect(html).toContain("<table");
    expect(html.match(/<tr/g)!.length).toBe(41);
    expect(html).toContain("1.00–1.05");
  });
});

describe("FrameLimbs", () => {
  const html = renderToStaticMarkup(createElement(FrameLimbs, { setId: "s1", frames: report.frames, frameIds: { "f1.fits": "frame-1" }, referenceFrame: "f1.fits" }));

  it("lays the fitted limb over the thumbnail in the frame's own pixel grid", () => {
    expect(html).toContain('src="/api/bracket-sets/s1/frames/frame-1/thumbnail"');
    expect(html).toContain('viewBox="0 0 320 256"');
    // Report positions are 0-based pixel centres: the circle sits half a pixel further in SVG units.
    expect(html).toMatch(/<circle cx="160.75" cy="121" r="40.2"/);
    expect(html).toContain("f1.fits (reference)");
    expect(html).toContain("1/125 s; sound fit, residual 0.31 px; 25% of the weight");
  });

  it("draws no circle for a failed fit and says when a frame has no thumbnail", () => {
    expect(html.match(/<circle/g)).toHaveLength(1);
    expect(html).toContain("No thumbnail: the frame is no longer in the set.");
    expect(html).toContain("2.00 s; no fit");
  });
});

describe("CoverageMap", () => {
  it("describes the map in its alt text and lists the counts", () => {
    const html = renderToStaticMarkup(
      createElement(CoverageMap, { src: "/c.png", coverage: { frameCount: 2, pixelsByFrames: [10, 30, 60], meanFrames: 1.5, uncoveredFraction: 0.1, map: { width: 8, height: 6 } } }),
    );
    expect(html).toContain("On average 1.5 frames per pixel; 10.0% of the master has no frame.");
    expect(html).toContain("all 2 frames");
    expect(html).toContain(">60.0%<");
  });
});

describe("a stage's frame count as the progress shows it", () => {
  it("names what the stage counts, and says nothing for stages that do not count frames", async () => {
    const { describeStageFrames } = await import("@/components/reductions/labels");
    expect(describeStageFrames("limb", { done: 41, total: 120 })).toBe("Frames measured: 41 of 120");
    expect(describeStageFrames("merge-pilot", { done: 3, total: 9 })).toBe("Frames merged in the first pass: 3 of 9");
    expect(describeStageFrames("tiles", null)).toBeNull();
    expect(describeStageFrames("limb", { done: 0, total: 0 })).toBeNull();
  });
});
