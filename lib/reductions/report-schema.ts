// report.json's contract: one versioned schema for what a reduction writes
// (lib/reduction-runner/report.ts builds it and a test parses the result with
// the strict form) and for every reader (the reduction page, a plate's facts and
// geometry, a print bundle's sky), which parse with the lenient form: a report
// from an older pipeline that lacks a section gives null or an empty list for
// it rather than failing. A change of meaning raises REPORT_VERSION; readers
// then branch on `reportVersion`. Client-safe. Pixel coordinates are 0-based
// pixel centres (lib/imaging's convention); the FITS header writes them 1-based.
import { z } from "zod";

export const REPORT_VERSION = 1;

/** The schema in two forms: strict (the writer's output must pass) or lenient (every reader). */
function buildReportSchema(lenient: boolean) {
  /** In the lenient form, a missing or malformed value reads as `fallback`. */
  const or = <T extends z.ZodType>(schema: T, fallback: z.output<T>): T => (lenient ? (schema.catch(fallback) as unknown as T) : schema);
  const num = () => or(z.number().nullable(), null);
  const text = () => or(z.string().nullable(), null);
  const point = () => z.object({ x: z.number().nullable(), y: z.number().nullable() });
  const blob = () => or(z.record(z.string(), z.unknown()).nullable(), null);

  const frameSky = z.object({
    midExposureUtc: text(),
    moonMinusSunArcsec: or(z.object({ north: z.number().nullable(), east: z.number().nullable() }).nullable(), null),
    moonMinusSunPx: or(z.object({ dx: z.number().nullable(), dy: z.number().nullable() }).nullable(), null),
  });

  const frame = z.object({
    name: or(z.string(), ""),
    frameId: or(z.string().nullable().optional(), null),
    path: or(z.string().optional(), undefined),
    format: or(z.string().optional(), undefined),
    bitDepth: or(z.number().optional(), undefined),
    decoded: or(z.object({ width: z.number(), height: z.number(), planes: or(z.number().optional(), undefined) }).nullable(), null),
    exposure: or(z.object({ seconds: num(), source: or(z.string().optional(), undefined) }).nullable(), null),
    captureTimeUtc: or(z.string().nullable().optional(), null),
    captureTimeSource: or(z.string().nullable().optional(), null),
    isTimeZoneAssumed: or(z.boolean().nullable().optional(), null),
    limb: or(
      z
        .object({
          x: num(), y: num(), radiusPx: num(), rmsPx: num(), inlierFraction: num(),
          rayCount: or(z.number().optional(), undefined), inlierCount: or(z.number().optional(), undefined), clippedRayCount: or(z.number().optional(), undefined),
          verdict: or(z.string(), "unknown"), reasons: or(z.array(z.string()).optional(), undefined),
        })
        .nullable(),
      null,
    ),
    transform: or(z.object({ convention: z.string(), dx: z.number().nullable(), dy: z.number().nullable(), rotationDeg: z.number().nullable(), scale: z.number().nullable() }).optional(), undefined),
    registration: or(z.object({ peak: z.number().nullable(), against: z.string().nullable() }).optional(), undefined),
    registrationMethod: or(z.enum(["reference", "corona", "limb"]).nullable().optional(), null),
    registrationNote: or(z.string().nullable().optional(), null),
    offset: or(
      z
        .object({
          dn: num(),
          source: or(z.enum(["calibrated", "file", "solved", "none"]), "none"),
          sigmaDn: or(z.number().nullable().optional(), null),
          note: or(z.string().nullable().optional(), null),
        })
        .nullable()
        .optional(),
      null,
    ),
    transmission: or(z.number().nullable().optional(), null),
    effectiveExposureS: or(z.number().nullable().optional(), null),
    transmissionNote: or(z.string().nullable().optional(), null),
    weights: or(
      z.object({ contributingFraction: or(z.number().nullable().optional(), null), wellExposedFraction: or(z.number().nullable().optional(), null), weightShare: num(), rejectedFraction: or(z.number().nullable().optional(), null) }).nullable(),
      null,
    ),
    sky: or(frameSky.nullable().optional(), null),
  });

  /** The sky geometry (report-sky.ts): the registration always; the rest only with a helioprojective WCS. */
  const sky = z.object({
    registrationMode: or(z.string().optional(), undefined),
    clockOffsetS: or(z.number().optional(), undefined),
    site: blob().optional(),
    plateScaleArcsecPerPx: num().optional(),
    plateScaleSource: text().optional(),
    limbRadiusPx: num().optional(),
    pAngleDeg: num().optional(),
    northAngleDeg: num().optional(),
    northAngleSource: text().optional(),
    northAngleSigmaDeg: num().optional(),
    northAngleFitRmsPx: num().optional(),
    solarNorthAngleDeg: num().optional(),
    sunCentrePx: or(point().nullable().optional(), null),
    sunRadiusPx: num().optional(),
    rsunObsArcsec: num().optional(),
    dsunObsM: num().optional(),
    /** The exact site: never for the public (print bundles and public masters round it). */
    observer: or(z.object({ latDeg: z.number(), lonDeg: z.number(), elevationM: or(z.number(), 0) }).nullable().optional(), null),
    moonSilhouetteUtc: text().optional(),
    conventions: text().optional(),
  });

  // A ring's values are null where they are not finite (an empty ring); readers get the complete rings only.
  const ring = z.object({ innerR: z.number().nullable(), outerR: z.number().nullable(), meanR: z.number().nullable(), meanLuminance: z.number().nullable(), pixelCount: z.number(), ringFraction: or(z.number().nullable(), 1) });
  type Ring = z.output<typeof ring>;
  type CompleteRing = { [K in keyof Ring]: NonNullable<Ring[K]> };
  const isComplete = (r: Ring): r is CompleteRing => r.innerR !== null && r.outerR !== null && r.meanR !== null && r.meanLuminance !== null && r.ringFraction !== null;
  const radialProfile = z.object({
    centreSource: or(z.enum(["sun", "moon"]), "moon"),
    centrePx: or(point().optional(), undefined),
    solarRadiusPx: num(),
    stepR: num(),
    unit: or(z.string(), ""),
    excluded: or(z.string().optional(), undefined),
    powerLaw: or(z.object({ fromR: z.number(), toR: z.number(), exponent: z.number().nullable(), ringCount: or(z.number().optional(), undefined) }).nullable(), null),
    rings: or(z.array(ring).transform((rings) => rings.filter(isComplete)), []),
  });
  const coverage = z.object({
    frameCount: z.number(),
    pixelsByFrames: z.array(z.number()),
    meanFrames: num(),
    uncoveredFraction: num(),
    map: or(z.object({ file: or(z.string().optional(), undefined), width: z.number(), height: z.number(), blockPx: or(z.number().optional(), undefined), meaning: or(z.string().optional(), undefined) }).nullable(), null),
  });

  const overall = z.object({
    referenceFrame: text(),
    masterSize: or(z.object({ width: z.number(), height: z.number(), planes: or(z.number().optional(), undefined) }).nullable(), null),
    moonCentrePx: or(point().nullable().optional(), null),
    moonRadiusPx: or(z.number().nullable().optional(), null),
    moonSource: or(z.string().nullable().optional(), null),
    sunCentrePx: or(point().nullable().optional(), null),
    filterCentrePx: or(point().nullable().optional(), null),
    dynamicRangeStops: num(),
    poorlyExposedFraction: or(z.number().nullable().optional(), null),
    natural: blob().optional(),
    sky: or(sky.nullable().optional(), null),
    radialProfile: or(radialProfile.nullable().optional(), null),
    coverage: or(coverage.nullable().optional(), null),
  });

  const calibration = z.object({
    source: or(z.enum(["masters", "bracket", "none"]), "none"),
    badPixelCount: or(z.number(), 0),
    masters: or(
      z
        .object({
          bias: or(z.object({ frameNames: z.array(z.string()) }).nullable().optional(), null),
          darks: or(z.array(z.object({ exposureS: z.number(), frameNames: z.array(z.string()) })), []),
          darkModel: or(z.string(), "none"),
          flat: or(z.object({ frameNames: z.array(z.string()) }).nullable().optional(), null),
        })
        
        .nullable(),
      null,
    ),
  });

  return z.object({
    reportVersion: or(z.number().int().min(1), REPORT_VERSION),
    createdUtc: text(),
    pipelineVersion: or(z.string(), "unknown"),
    /** The reduction's parameters (lib/imaging/types.ts ReductionParams). */
    parameters: or(z.unknown(), null),
    exposureOverrideSource: or(z.string().optional(), undefined),
    frames: or(z.array(frame), []),
    overall: or(overall, { referenceFrame: null, dynamicRangeStops: null, masterSize: null }),
    timingsMs: or(z.record(z.string(), z.number()), {}),
    outputs: or(
      z.object({
        master: or(z.string().optional(), undefined),
        renditions: or(z.record(z.string(), z.string()).optional(), undefined),
        preview: or(z.string().optional(), undefined),
        coverage: or(z.string().nullable().optional(), null),
        previewStructure: or(z.string().nullable().optional(), null),
        renditionSize: or(z.object({ width: z.number(), height: z.number(), scale: z.number().nullable(), longSidePx: or(z.number().optional(), undefined), masterWidth: or(z.number().optional(), undefined), masterHeight: or(z.number().optional(), undefined) }).nullable().optional(), null),
        tiles: or(z.record(z.string(), z.record(z.string(), z.unknown())).optional(), undefined),
      }),
      {},
    ),
    calibration: or(calibration.nullable().optional(), null),
    framesLeftOut: or(z.array(z.object({ name: z.string(), frameId: or(z.string().nullable(), null), reason: z.string() })), []),
    notes: or(z.array(z.string()), []),
  });
}

/** What the writer must produce: every value of its type, no fallbacks. */
export const strictReportSchema = buildReportSchema(false);
/** What readers parse with: older or partial reports read with fallbacks. */
export const reportSchema = buildReportSchema(true);

/** report.json as the writer builds it (lib/reduction-runner/report.ts). */
export type ReductionReport = z.input<typeof strictReportSchema>;
/** Sections other modules build for the writer (report-sky.ts, master-summary.ts). */
export type ReportFrameSkyInput = NonNullable<ReductionReport["frames"][number]["sky"]>;
export type ReportSkyInput = NonNullable<NonNullable<ReductionReport["overall"]>["sky"]>;
export type RadialProfileInput = NonNullable<NonNullable<ReductionReport["overall"]>["radialProfile"]>;
export type CoverageInput = NonNullable<NonNullable<ReductionReport["overall"]>["coverage"]>;
/** report.json as every reader sees it. */
export type ParsedReport = z.output<typeof reportSchema>;
export type ReportFrame = ParsedReport["frames"][number];
export type ReportSky = NonNullable<ParsedReport["overall"]["sky"]>;
export type RadialProfileView = NonNullable<ParsedReport["overall"]["radialProfile"]>;
export type CoverageView = NonNullable<ParsedReport["overall"]["coverage"]>;

/** Reads a report (any version so far) for display or facts; throws a SyntaxError only when it is not an object at all. */
export function parseReport(input: unknown): ParsedReport {
  if (!input || typeof input !== "object") throw new SyntaxError("report.json does not hold an object");
  return reportSchema.parse(input);
}
