// report.json: what the reduction did, per frame and overall, in plain numbers
// that the worker will copy into the database and the review desk shows. Its
// contract (the schema every reader parses with) is lib/reductions/report-schema.ts.
// Pixel coordinates here are 0-based pixel centres (lib/imaging's convention);
// the FITS header writes them 1-based.
import type { ReductionResult } from "@/lib/imaging/pipeline";
import type { CalibrationReport } from "./calibration";
import type { FrameProvenance } from "./decode-frames";
import { buildSkyReport, type SkyReportInput } from "./report-sky";
import type { MasterSummary } from "./master-summary";
import type { TilePyramidResult } from "./tiles";
import { REPORT_VERSION, type ReductionReport } from "@/lib/reductions/report-schema";

export { REPORT_VERSION, type ReductionReport } from "@/lib/reductions/report-schema";

function roundTo(value: number, digits = 4): number | null {
  return Number.isFinite(value) ? Number(value.toFixed(digits)) : null;
}

export function buildReport(input: {
  result: ReductionResult;
  provenance: FrameProvenance[];
  exposureOverrideSource?: string;
  timingsMs: Record<string, number>;
  tiles: Record<string, TilePyramidResult>;
  createdMs: number;
  sky?: SkyReportInput;
  /** Radial profile and coverage (master-summary.ts). */
  summary?: MasterSummary;
  /** Frame ids by frame name, when the caller knows them (the worker does). */
  frameIds?: Record<string, string>;
  /** Size the renditions, preview and tiles were written at. */
  renditionSize?: { width: number; height: number; scale: number; longSidePx: number };
  /** What the runner had to decide for the person to know (why there is no WCS, an orientation it could not find). */
  notes?: string[];
  calibration?: CalibrationReport;
}): ReductionReport {
  const { result, provenance } = input;
  const sky = buildSkyReport(input.sky ?? { registrationMode: result.overall.parameters.registration, clockOffsetS: 0 });
  const hasWcs = input.sky?.helio !== undefined;
  const { overall } = result;
  const byName = new Map(provenance.map((p) => [p.name, p]));
  const pixelCount = result.master.width * result.master.height;
  return {
    reportVersion: REPORT_VERSION,
    createdUtc: new Date(input.createdMs).toISOString(),
    pipelineVersion: overall.pipelineVersion,
    parameters: overall.parameters,
    exposureOverrideSource: input.exposureOverrideSource,
    frames: result.frames.map((f) => {
      const p = byName.get(f.name)!;
      return {
        name: f.name,
        frameId: input.frameIds?.[f.name] ?? null,
        path: p.path,
        format: p.format,
        bitDepth: p.bitDepth,
        decoded: { width: p.width, height: p.height, planes: p.planeCount },
        exposure: { seconds: f.exposureS, source: p.exposureSource },
        captureTimeUtc: p.captureTimeMs === undefined ? null : new Date(p.captureTimeMs).toISOString(),
        captureTimeSource: p.captureTimeSource ?? null,
        isTimeZoneAssumed: p.isTimeZoneAssumed ?? null,
        limb: {
          x: roundTo(f.limb.x), y: roundTo(f.limb.y), radiusPx: roundTo(f.limb.radiusPx), rmsPx: roundTo(f.limb.rmsPx),
          inlierFraction: roundTo(f.limb.inlierFraction), rayCount: f.limb.rayCount, inlierCount: f.limb.inlierCount,
          clippedRayCount: f.limb.clippedRayCount, verdict: f.limb.verdict, reasons: f.limb.reasons,
        },
        transform: {
          convention: "master to frame: p_frame = scale R(rotation) (p_master - c) + c + (dx, dy), c the image centre",
          dx: roundTo(f.transform.dx), dy: roundTo(f.transform.dy), rotationDeg: roundTo(f.transform.rotationDeg, 5), scale: roundTo(f.transform.scale, 6),
        },
        registration: { peak: roundTo(f.registrationPeak), against: f.registeredAgainst },
        registrationMethod: f.registrationMethod,
        registrationNote: f.registrationNote ?? null,
        offset: f.offset
          ? { dn: roundTo(f.offset.dn, 2), source: f.offset.source, sigmaDn: f.offset.sigmaDn === undefined ? null : roundTo(f.offset.sigmaDn, 2), note: f.offset.note ?? null }
          : null,
        transmission: roundTo(f.transmission),
        effectiveExposureS: roundTo(f.effectiveExposureS, 7),
        transmissionNote: f.transmissionNote ?? null,
        weights: {
          contributingFraction: roundTo(f.weights.contributingFraction),
          wellExposedFraction: roundTo(f.weights.wellExposedFraction),
          weightShare: roundTo(f.weights.weightShare),
          rejectedFraction: roundTo(f.weights.rejectedFraction, 6),
        },
        sky: sky.frames.get(f.name) ?? null,
      };
    }),
    overall: {
      referenceFrame: overall.referenceFrame,
      masterSize: { width: result.master.width, height: result.master.height, planes: result.master.planes.length },
      moonCentrePx: { x: roundTo(overall.moonCentre.x), y: roundTo(overall.moonCentre.y) },
      moonRadiusPx: roundTo(overall.moonRadiusPx),
      moonSource: overall.moonSource,
      sunCentrePx: overall.sunCentre ? { x: roundTo(overall.sunCentre.x), y: roundTo(overall.sunCentre.y) } : null,
      filterCentrePx: { x: roundTo(overall.filterCentre.x), y: roundTo(overall.filterCentre.y) },
      dynamicRangeStops: roundTo(overall.dynamicRangeStops, 3),
      poorlyExposedFraction: roundTo(result.poorlyExposedCount / pixelCount, 6),
      natural: overall.natural,
      sky: sky.overall,
      radialProfile: input.summary?.radialProfile ?? null,
      coverage: input.summary?.coverage ?? null,
    },
    timingsMs: Object.fromEntries(Object.entries(input.timingsMs).map(([k, v]) => [k, Math.round(v)])),
    outputs: {
      master: "master.fits",
      renditions: { natural: "natural.png", structure: "structure.png" },
      preview: "preview.jpg",
      previewStructure: "preview-structure.jpg",
      coverage: input.summary ? "coverage.png" : null,
      renditionSize: input.renditionSize
        ? { ...input.renditionSize, scale: roundTo(input.renditionSize.scale, 6), masterWidth: result.master.width, masterHeight: result.master.height }
        : { width: result.master.width, height: result.master.height, scale: 1, longSidePx: 0, masterWidth: result.master.width, masterHeight: result.master.height },
      tiles: Object.fromEntries(
        Object.entries(input.tiles).map(([name, t]) => [
          name,
          { dzi: `tiles/${name}.dzi`, dziTiles: t.dziTileCount, dziLevels: t.dziLevelCount, iiifInfo: `tiles/${name}-iiif/info.json`, iiifTiles: t.iiifTileCount, iiifScaleFactors: t.iiifScaleFactors },
        ]),
      ),
    },
    calibration: input.calibration ? { source: input.calibration.source, badPixelCount: input.calibration.badPixelCount, masters: input.calibration.summary ?? null } : null,
    framesLeftOut: result.leftOut.map((l) => ({ name: l.name, frameId: input.frameIds?.[l.name] ?? null, reason: l.reason })),
    notes: [
      ...(input.notes ?? []),
      hasWcs
        ? "master.fits carries a helioprojective WCS (HPLN-TAN, HPLT-TAN); its rows are stored top row first, as in the PNGs, and PC accounts for it."
        : "No helioprojective WCS: the observer's site, every frame's capture time and the image orientation are all needed for one; positions are master pixels.",
      "Tile pyramids are halved in linear light; sharp only encodes the tiles.",
      ...(input.renditionSize && input.renditionSize.scale !== 1
        ? [`Renditions, preview and tiles are scaled by ${roundTo(input.renditionSize.scale, 6)} in linear light (long side ${Math.max(input.renditionSize.width, input.renditionSize.height)} px); master.fits and every pixel position in this report are at the master's full size.`]
        : []),
    ],
  };
}
