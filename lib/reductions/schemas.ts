// The parameters of a reduction, checked in the browser (the start form) and on
// the server (the route and the service) with the same schema. Client-safe: no
// database or Node imports.
import "@/lib/zod-in-browser";
import { z } from "zod";

export const REGISTRATION_MODES = ["sun", "moon", "corona"] as const;
export type RegistrationModeInput = (typeof REGISTRATION_MODES)[number];
export const STRUCTURE_FILTERS = ["mgn", "nrgf"] as const;
export type StructureFilterInput = (typeof STRUCTURE_FILTERS)[number];

/** Long side of the renditions and tiles in px; 0 keeps the master's full size. */
export const OUTPUT_LONG_SIDES_PX = [0, 1024, 2048, 4096] as const;
export const DEFAULT_FILTER_STRENGTH = 0.3;

export const reductionParamsSchema = z.object({
  registration: z.enum(REGISTRATION_MODES, { error: "expected sun, moon or corona" }).default("sun"),
  filter: z.enum(STRUCTURE_FILTERS, { error: "expected mgn or nrgf" }).default("mgn"),
  /** Weight of local structure against the overall brightness: 0.05 gentle to 1 strongest. */
  filterStrength: z.coerce
    .number({ error: "expected a number from 0.05 to 1" })
    .min(0.05, { error: "must be at least 0.05" })
    .max(1, { error: "must be at most 1" })
    .default(DEFAULT_FILTER_STRENGTH),
  outputLongSidePx: z.coerce
    .number({ error: "expected a size in pixels" })
    .int({ error: "expected a whole number of pixels" })
    .refine((v) => v === 0 || (v >= 512 && v <= 16_384), { error: "expected 0 (full size) or 512 to 16384 px" })
    .default(0),
  recoverResponse: z.boolean({ error: "expected true or false" }).default(false),
  /** Reduce only this group of the set's frames; null takes every included light frame. */
  groupNumber: z.coerce
    .number({ error: "expected a group number" })
    .int({ error: "expected a whole group number" })
    .min(1, { error: "groups are numbered from 1" })
    .max(999)
    .nullish()
    .transform((v) => v ?? null),
});
export type ReductionParamsInput = z.infer<typeof reductionParamsSchema>;
/** What a caller may pass: defaults fill the rest. */
export type ReductionParamsRequest = z.input<typeof reductionParamsSchema>;
