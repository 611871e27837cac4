// Inputs of the bracket-set services, checked at the boundary (route handlers
// and server actions parse with these before calling the services).
import { z } from "zod";
import { FRAME_KINDS } from "@/db/schema";
import { MAX_PARTS_PER_SIGNING } from "@/lib/storage/limits";
import { DEFAULT_GROUP_GAP_S } from "./grouping";
import { strictNumber } from "@/lib/strict-number";
import { MAX_EXPOSURE_S, MIN_EXPOSURE_S } from "@/lib/media/exposure";

const uuid = (what: string) => z.uuid({ error: `expected the id of ${what}` });

export const createBracketSetSchema = z.object({
  name: z.string().trim().min(2, { error: "needs at least 2 characters" }).max(120),
  eclipseId: z.string().trim().regex(/^\d{4}-\d{2}-\d{2}$/, { error: "expected an eclipse date such as 2027-08-02" }),
  siteId: uuid("one of your sites"),
  // A form's "No kit" sends an empty string.
  kitId: z.preprocess((v) => (v === "" ? null : v), uuid("one of your kits").nullish()).transform((v) => v ?? null),
  notes: z.string().trim().max(4000).optional().default(""),
  clockOffsetS: strictNumber(z.number({ error: "expected seconds" }).min(-86_400).max(86_400).optional().default(0)),
});
export type CreateBracketSetInput = z.infer<typeof createBracketSetSchema>;

export const clockOffsetSchema = z.object({
  clockOffsetS: z.coerce
    .number({ error: "expected seconds" })
    .refine(Number.isFinite, { error: "expected a number of seconds" })
    .min(-86_400, { error: "must be within a day (-86400 to 86400 s)" })
    .max(86_400, { error: "must be within a day (-86400 to 86400 s)" }),
});

export const startUploadSchema = z.object({
  fileName: z.string().trim().min(1, { error: "needs the file's name" }).max(255, { error: "must be at most 255 characters" }),
  // Declared by the browser; checked against what arrives when the upload completes.
  sizeBytes: z.number({ error: "expected the file size in bytes" }).int({ error: "expected a whole number of bytes" }).min(0),
  contentType: z.string().max(120).optional(),
});
export type StartUploadInput = z.infer<typeof startUploadSchema>;

export const signPartsSchema = z.object({
  partNumbers: z
    .array(z.number().int({ error: "expected whole part numbers" }).min(1, { error: "part numbers start at 1" }).max(10_000))
    .min(1, { error: "name at least one part" })
    .max(MAX_PARTS_PER_SIGNING, { error: `at most ${MAX_PARTS_PER_SIGNING} parts at a time` }),
});

export const correctFrameSchema = z
  .object({
    exposureS: z
      .number({ error: "expected seconds" })
      .refine(Number.isFinite, { error: "expected a number of seconds" })
      .min(MIN_EXPOSURE_S, { error: `must be at least ${MIN_EXPOSURE_S} s (a microsecond)` })
      .max(MAX_EXPOSURE_S, { error: `must be at most ${MAX_EXPOSURE_S} s` })
      .optional(),
    kind: z.enum(FRAME_KINDS, { error: `expected one of ${FRAME_KINDS.join(", ")}` }).optional(),
    included: z.boolean({ error: "expected true or false" }).optional(),
    /** A capture time as the camera clock showed it (ISO 8601 with zone, or a UTC time of day on the eclipse's date); null forgets the one given. */
    captureAt: z.string({ error: "expected a time" }).trim().min(1, { error: "needs a time" }).max(64, { error: "must be at most 64 characters" }).nullable().optional(),
  })
  .refine((v) => v.exposureS !== undefined || v.kind !== undefined || v.included !== undefined || v.captureAt !== undefined, {
    error: "give an exposure, a kind, whether the frame is included, or a capture time",
  });
export type CorrectFrameInput = z.infer<typeof correctFrameSchema>;

/**
 * PATCH of a set: either the clock offset typed in seconds, or a frame that
 * shows a trusted clock and the true UTC time that clock showed in it.
 */
export const updateBracketSetSchema = z
  .object({
    clockOffsetS: clockOffsetSchema.shape.clockOffsetS.optional(),
    clockFrameId: uuid("the frame that shows the clock").optional(),
    clockShownAt: z.iso
      .datetime({ offset: true, error: "expected an ISO 8601 time with its zone, such as 2027-08-02T10:04:31.5Z" })
      .optional(),
    /** The kit the frames were taken with; null takes it away. Given alone. */
    kitId: z.preprocess((v) => (v === "" ? null : v), uuid("one of your kits").nullable()).optional(),
    /** North in the image, degrees counter-clockwise from up (after flips); null forgets it. Given alone. */
    northAngleDeg: z.preprocess(
      (v) => (v === "" ? null : v),
      z.coerce.number({ error: "expected degrees" }).refine(Number.isFinite, { error: "expected a number of degrees" }).min(-360, { error: "must be within -360 to 360 degrees" }).max(360, { error: "must be within -360 to 360 degrees" }).nullable(),
    ).optional(),
  })
  .superRefine((v, ctx) => {
    const byFrame = v.clockFrameId !== undefined || v.clockShownAt !== undefined;
    if (v.northAngleDeg !== undefined) {
      if (v.kitId !== undefined || v.clockOffsetS !== undefined || byFrame) ctx.addIssue({ code: "custom", path: ["northAngleDeg"], message: "change the north angle on its own" });
    } else if (v.kitId !== undefined) {
      if (v.clockOffsetS !== undefined || byFrame) ctx.addIssue({ code: "custom", path: ["kitId"], message: "change the kit on its own, not with the clock" });
    } else if (v.clockOffsetS !== undefined && byFrame) {
      ctx.addIssue({ code: "custom", path: ["clockOffsetS"], message: "give either clockOffsetS, or clockFrameId with clockShownAt, not both" });
    } else if (v.clockOffsetS === undefined && !byFrame) {
      ctx.addIssue({ code: "custom", path: ["clockOffsetS"], message: "give clockOffsetS, or clockFrameId with clockShownAt" });
    } else if (byFrame && v.clockFrameId === undefined) {
      ctx.addIssue({ code: "custom", path: ["clockFrameId"], message: "needs the frame that shows the clock" });
    } else if (byFrame && v.clockShownAt === undefined) {
      ctx.addIssue({ code: "custom", path: ["clockShownAt"], message: "needs the time the clock showed in that frame" });
    }
  });
export type UpdateBracketSetInput = z.infer<typeof updateBracketSetSchema>;

export const GROUP_ACTIONS = ["split", "merge", "auto"] as const;

/** Splitting and merging groups of frames, or grouping them by the time between them. */
export const groupActionSchema = z.discriminatedUnion(
  "action",
  [
    z.object({ action: z.literal("split"), frameId: uuid("the frame that starts the new group") }),
    z.object({
      action: z.literal("merge"),
      groupNumber: strictNumber(z.number({ error: "expected a group number" }).int({ error: "expected a whole group number" }).min(2, { error: "the first group has no group before it" }).max(999)),
    }),
    z.object({
      action: z.literal("auto"),
      gapS: z.coerce
        .number({ error: "expected seconds" })
        .refine(Number.isFinite, { error: "expected a number of seconds" })
        .gt(0, { error: "must be more than 0 s" })
        .max(86_400, { error: "must be at most a day (86400 s)" })
        .optional()
        .default(DEFAULT_GROUP_GAP_S),
    }),
  ],
  { error: `expected action to be one of ${GROUP_ACTIONS.join(", ")}` },
);
export type GroupActionInput = z.infer<typeof groupActionSchema>;
