// zod schemas for edition input: at the boundary and again in the services.
// Numbers are coerced because forms send strings.
import { z } from "zod";
import { EDITION_KINDS, EDITION_SLOTS, RENDITIONS } from "@/db/schema";
import { CUSTOM_DPI, CUSTOM_MM } from "./print-sizes";
import { strictNumber } from "@/lib/strict-number";

const DATE_EXPECTED = "expected a date as YYYY-MM-DD, or nothing for no embargo";
// null and "" both mean no embargo; one schema, so a bad value gets this message and not a union's "Invalid input".
const isoDate = z
  .string({ error: DATE_EXPECTED })
  .trim()
  .refine((s) => s === "" || (/^\d{4}-\d{2}-\d{2}$/.test(s) && !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s)), {
    error: DATE_EXPECTED,
  })
  .transform((s) => (s === "" ? null : s));
const embargoDate = z.preprocess((v) => (v === null || v === undefined ? "" : v), isoDate);

export const embargoSchema = z.object({ embargoDate });

const title = z.string({ error: "expected a title" }).trim().min(1, { error: "a title is required" }).max(200, { error: "at most 200 characters" });
const kind = z.enum(EDITION_KINDS, { error: "expected newsletter or journal" });
const issueLabel = z.string({ error: "expected an issue label, or nothing" }).trim().max(80, { error: "at most 80 characters" }).default("");

export const newEditionSchema = z.object({ title, kind, issueLabel, embargoDate });

/** Title, kind and issue label: only what the edition is called, so it may change in any state. */
export const editionNameSchema = z.object({ title, kind, issueLabel });

export const addItemSchema = z.object({
  plateId: z.uuid({ error: "expected a plate id" }),
  rendition: z.enum(RENDITIONS, { error: "expected natural or structure" }).optional(),
});

const optionalNumber = z.preprocess((v) => (v === null ? undefined : v), strictNumber(z.number({ error: "expected a number" }).optional()));

export const updateItemSchema = z
  .object({
    slot: z.enum(EDITION_SLOTS, { error: `expected one of ${EDITION_SLOTS.join(", ")}` }),
    customWidthMm: optionalNumber,
    customDpi: optionalNumber,
    rendition: z.enum(RENDITIONS, { error: "expected natural or structure" }),
    captionOverride: z.string().max(2000, { error: "at most 2000 characters" }).default(""),
  })
  .superRefine((v, ctx) => {
    if (v.slot !== "custom") return;
    if (v.customWidthMm === undefined || !(v.customWidthMm >= CUSTOM_MM.min && v.customWidthMm <= CUSTOM_MM.max)) {
      ctx.addIssue({ code: "custom", path: ["customWidthMm"], message: `a custom slot needs a width from ${CUSTOM_MM.min} to ${CUSTOM_MM.max} mm` });
    }
    if (v.customDpi === undefined || !Number.isInteger(v.customDpi) || v.customDpi < CUSTOM_DPI.min || v.customDpi > CUSTOM_DPI.max) {
      ctx.addIssue({ code: "custom", path: ["customDpi"], message: `a custom slot needs a whole dpi from ${CUSTOM_DPI.min} to ${CUSTOM_DPI.max}` });
    }
  });

export const moveItemSchema = z.object({ direction: z.enum(["up", "down"], { error: "expected up or down" }) });

export type EditionNameInput = z.infer<typeof editionNameSchema>;
export type NewEditionInput = z.infer<typeof newEditionSchema>;
export type UpdateItemInput = z.infer<typeof updateItemSchema>;
