// What the plate editor sends, checked in the browser (live) and on the server
// (the rule). Client-safe: no database, no Node modules.
import "@/lib/zod-in-browser";
import { z } from "zod";
import type { PlateLicence, PlateReportKind, Rendition, WithdrawalKind } from "@/db/schema/plates";

// Repeated here (checked against the schema's types) so that client components
// importing this file do not pull the database schema into the browser bundle.
const PLATE_LICENCES = ["CC-BY-4.0", "CC-BY-SA-4.0", "CC-BY-NC-4.0", "CC-BY-NC-SA-4.0", "CC0-1.0", "all-rights-reserved"] as const satisfies readonly PlateLicence[];
const PLATE_REPORT_KINDS = ["rights", "error", "other"] as const satisfies readonly PlateReportKind[];
const RENDITIONS = ["natural", "structure"] as const satisfies readonly Rendition[];
const WITHDRAWAL_KINDS = ["temporary", "permanent"] as const satisfies readonly WithdrawalKind[];

/** What the public reads of a plate and who it credits: one shape for the editor, the desk's DTO and publishing. */
export interface PlateTexts {
  title: string;
  caption: string;
  description: string;
  altText: string;
  acquiredBy: string;
  processedBy: string;
  licence: PlateLicence;
}

export const CAPTION_MAX_WORDS = 40;

/**
 * Words as a reader counts them: runs of text between spaces that hold at
 * least one letter or digit. A hyphenated word ("well-exposed") is one word;
 * a dash standing alone or joining words ("corona—streamers") separates them;
 * punctuation on its own ("—", "&", "...") is not a word.
 */
export function countWords(text: string): number {
  return text
    .split(/[\s\u2013\u2014\u2015]+/u)
    .filter((token) => /[\p{L}\p{N}]/u.test(token)).length;
}

const trimmed = (field: string, max: number) => z.string({ error: `expected text for the ${field}` }).trim().max(max, { error: `the ${field} must be at most ${max} characters` });

export const SLUG_PATTERN = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;

export const plateEditSchema = z.object({
  title: trimmed("title", 160).min(3, { error: "the title needs at least 3 characters" }),
  caption: trimmed("caption", 800).superRefine((s, ctx) => {
    const words = countWords(s);
    if (words > CAPTION_MAX_WORDS) ctx.addIssue({ code: "custom", message: `the caption must be at most ${CAPTION_MAX_WORDS} words; it has ${words}` });
  }),
  description: trimmed("description", 8000),
  altText: trimmed("alt text", 600).min(10, { error: "alt text is required: describe what the image shows in at least 10 characters" }),
  acquiredBy: trimmed("data acquisition credit", 160).min(2, { error: "name who acquired the data" }),
  processedBy: trimmed("processing credit", 160).min(2, { error: "name who processed the data, or the pipeline and its version" }),
  licence: z.enum(PLATE_LICENCES, { error: "expected one of the listed licences" }),
  slug: z
    .string()
    .trim()
    .min(3, { error: "the link name needs at least 3 characters" })
    .max(80, { error: "the link name must be at most 80 characters" })
    .regex(SLUG_PATTERN, { error: "the link name may hold lower-case letters, digits and single hyphens only" }),
});
export type PlateEditInput = z.infer<typeof plateEditSchema>;

export const renditionsSchema = z.array(z.enum(RENDITIONS, { error: "expected natural or structure" })).min(1, { error: "choose at least one rendition" });

/** What a plate shows: a finished reduction or a finished composite, exactly one. */
const exactlyOneSource = (v: { reductionId?: string; compositeId?: string }, ctx: z.RefinementCtx) => {
  if (Boolean(v.reductionId) === Boolean(v.compositeId)) {
    ctx.addIssue({ code: "custom", path: ["reductionId"], message: "choose one finished reduction or one finished composite for the plate to show" });
  }
};

export const draftPlateSchema = z
  .object({
    reductionId: z.uuid({ error: "expected the id of a finished reduction" }).optional(),
    compositeId: z.uuid({ error: "expected the id of a finished composite" }).optional(),
    renditions: renditionsSchema,
  })
  .superRefine(exactlyOneSource);

export const withdrawSchema = z.object({
  reason: z.string().trim().min(5, { error: "give a reason of at least 5 characters; the public page shows it" }).max(500, { error: "the reason must be at most 500 characters" }),
  kind: z.enum(WITHDRAWAL_KINDS, { error: "expected temporary or permanent" }),
});

export const newVersionSchema = z
  .object({
    reductionId: z.uuid({ error: "expected the id of a finished reduction" }).optional(),
    compositeId: z.uuid({ error: "expected the id of a finished composite" }).optional(),
    renditions: renditionsSchema,
    changeNote: z.string().trim().min(5, { error: "say in at least 5 characters what changed" }).max(500, { error: "the change note must be at most 500 characters" }),
  })
  .superRefine(exactlyOneSource);

export const plateReportSchema = z.object({
  kind: z.enum(PLATE_REPORT_KINDS, { error: "expected rights, error or other" }),
  message: z.string().trim().min(10, { error: "tell us in at least 10 characters what is wrong" }).max(4000, { error: "the message must be at most 4000 characters" }),
  email: z.email({ error: "expected an e-mail address we can answer" }).max(254),
});

export const reportAnswerSchema = z.object({
  answer: z.string().trim().min(5, { error: "the answer needs at least 5 characters" }).max(4000, { error: "the answer must be at most 4000 characters" }),
  close: z.boolean().default(true),
});
