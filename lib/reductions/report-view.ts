// The parts of report.json that the reduction page shows, read leniently: a
// report from an older pipeline that lacks a section gives null for it rather
// than failing the page. Client-safe.
import { z } from "zod";

const num = z.number().nullable().catch(null);

const frameSchema = z.object({
  name: z.string(),
  frameId: z.string().nullable().optional().catch(null),
  decoded: z.object({ width: z.number(), height: z.number() }).nullable().catch(null),
  exposure: z.object({ seconds: num }).nullable().catch(null),
  captureTimeUtc: z.string().nullable().optional().catch(null),
  limb: z.object({ x: num, y: num, radiusPx: num, rmsPx: num, inlierFraction: num, verdict: z.string().catch("unknown") }).nullable().catch(null),
  weights: z.object({ weightShare: num, rejectedFraction: num.optional().catch(null) }).nullable().catch(null),
  registrationMethod: z.enum(["reference", "corona", "limb"]).nullable().optional().catch(null),
  registrationNote: z.string().nullable().optional().catch(null),
  offset: z
    .object({ dn: num, source: z.enum(["calibrated", "file", "solved", "none"]).catch("none"), sigmaDn: num.optional().catch(null), note: z.string().nullable().optional().catch(null) })
    .nullable()
    .optional()
    .catch(null),
  transmission: num.optional().catch(null),
  effectiveExposureS: num.optional().catch(null),
  transmissionNote: z.string().nullable().optional().catch(null),
});

const ringSchema = z.object({ innerR: z.number(), outerR: z.number(), meanR: z.number(), meanLuminance: z.number(), pixelCount: z.number(), ringFraction: z.number().catch(1) });

const profileSchema = z.object({
  centreSource: z.enum(["sun", "moon"]).catch("moon"),
  solarRadiusPx: num,
  stepR: num,
  unit: z.string().catch(""),
  powerLaw: z.object({ fromR: z.number(), toR: z.number(), exponent: num }).nullable().catch(null),
  rings: z.array(ringSchema).catch([]),
});

const coverageSchema = z.object({
  frameCount: z.number(),
  pixelsByFrames: z.array(z.number()),
  meanFrames: num,
  uncoveredFraction: num,
  map: z.object({ width: z.number(), height: z.number() }).nullable().catch(null),
});

export const reportViewSchema = z.object({
  pipelineVersion: z.string().catch("unknown"),
  createdUtc: z.string().nullable().catch(null),
  frames: z.array(frameSchema).catch([]),
  overall: z
    .object({
      referenceFrame: z.string().nullable().catch(null),
      moonSource: z.string().nullable().optional().catch(null),
      dynamicRangeStops: num,
      masterSize: z.object({ width: z.number(), height: z.number() }).nullable().catch(null),
      radialProfile: profileSchema.nullable().optional().catch(null),
      coverage: coverageSchema.nullable().optional().catch(null),
      sky: z.record(z.string(), z.unknown()).nullable().optional().catch(null),
    })
    .catch({ referenceFrame: null, dynamicRangeStops: null, masterSize: null }),
  timingsMs: z.record(z.string(), z.number()).catch({}),
  framesLeftOut: z.array(z.object({ name: z.string(), frameId: z.string().nullable().catch(null), reason: z.string() })).optional().catch([]),
  notes: z.array(z.string()).optional().catch([]),
  outputs: z
    .object({
      coverage: z.string().nullable().optional().catch(null),
      previewStructure: z.string().nullable().optional().catch(null),
      renditionSize: z.object({ width: z.number(), height: z.number(), scale: z.number() }).nullable().optional().catch(null),
    })
    .catch({}),
});

export type ReductionReportView = z.infer<typeof reportViewSchema>;
export type ReportFrameView = ReductionReportView["frames"][number];
export type RadialProfileView = NonNullable<ReductionReportView["overall"]["radialProfile"]>;
export type CoverageView = NonNullable<ReductionReportView["overall"]["coverage"]>;

/** The report's shown parts; throws a SyntaxError-like error only when the input is not an object at all. */
export function parseReportView(input: unknown): ReductionReportView {
  if (!input || typeof input !== "object") throw new SyntaxError("report.json does not hold an object");
  return reportViewSchema.parse(input);
}
