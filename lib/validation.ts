// zod at the boundary: a validation error names the field by the words people
// read (lib/field-labels.ts) and says what was expected. What came is kept
// apart, in `received`, for API clients and logs: it is never part of the
// sentence a person reads.
import type { z } from "zod";
import { AppError, type FieldProblem } from "./errors";
import { capitalize, fieldLabel } from "./field-labels";

function describeReceived(input: unknown, path: PropertyKey[]): string {
  let value: unknown = input;
  for (const key of path) {
    if (value && typeof value === "object") value = (value as Record<PropertyKey, unknown>)[key];
    else return "nothing";
  }
  if (value === undefined || value === null) return "nothing";
  if (typeof value === "string") return value.length > 40 ? `a text of ${value.length} characters` : JSON.stringify(value);
  if (typeof value === "number" || typeof value === "boolean") return String(value);
  return Array.isArray(value) ? "a list" : typeof value;
}

/** zod's own English ("Too small: expected number to be >=1") is for developers; ours is not. */
const ZOD_DEFAULT = /^(Invalid\b|Too (small|big): expected|Unrecognized key)/;

const KIND_WORDS: Record<string, string> = {
  number: "a number",
  int: "a whole number",
  string: "text",
  boolean: "yes or no",
  date: "a date",
  array: "a list",
  object: "a set of values",
};

const FORMAT_WORDS: Record<string, string> = {
  email: "is not an e-mail address",
  uuid: "does not name anything we know",
  url: "is not a web address",
  date: "must be a date written as YYYY-MM-DD",
  datetime: "must be a date and time",
  time: "must be a time of day",
};

function sizeWords(origin: string | undefined, n: number | bigint, inclusive: boolean | undefined, dir: "min" | "max"): string {
  const v = Number(n);
  if (origin === "string") {
    if (dir === "min" && v <= 1) return "is required";
    return dir === "min" ? `needs at least ${v} characters` : `must be at most ${v} characters`;
  }
  if (origin === "array" || origin === "set") {
    if (dir === "min" && v <= 1) return "needs at least one";
    return dir === "min" ? `needs at least ${v}` : `takes at most ${v}`;
  }
  if (dir === "min") return inclusive === false ? `must be more than ${v}` : `must be at least ${v}`;
  return inclusive === false ? `must be less than ${v}` : `must be at most ${v}`;
}

/** One sentence, without the field's name, for one zod issue. */
export function describeIssue(issue: z.core.$ZodIssue, received: string): string {
  if (!ZOD_DEFAULT.test(issue.message)) return issue.message;
  switch (issue.code) {
    case "invalid_type":
      if (received === "nothing" || received === '""') return "is required";
      return `must be ${KIND_WORDS[issue.expected] ?? issue.expected}`;
    case "too_small":
      return sizeWords(issue.origin, issue.minimum, issue.inclusive, "min");
    case "too_big":
      return sizeWords(issue.origin, issue.maximum, issue.inclusive, "max");
    case "invalid_value":
      return issue.values.length <= 8 ? `must be one of: ${issue.values.map(String).join(", ")}` : "is not one of the choices";
    case "invalid_format":
      return FORMAT_WORDS[issue.format] ?? "is not in the expected form";
    case "not_multiple_of":
      return `must be a multiple of ${String(issue.divisor)}`;
    case "unrecognized_keys":
      return "holds values we do not take";
    default:
      return "is not valid";
  }
}

export function fieldProblems(error: z.ZodError, input: unknown): FieldProblem[] {
  return error.issues.map((issue) => {
    const field = issue.path.map(String).join(".") || "(input)";
    const received = describeReceived(input, issue.path);
    return { field, message: describeIssue(issue, received), received };
  });
}

/** "Title: a title is required; Exposure time: must be at least 0.00001." */
export function summarizeProblems(fields: FieldProblem[]): string {
  return `${fields.map((f) => `${capitalize(fieldLabel(f.field))}: ${f.message}`).join("; ")}.`;
}

export function parseInput<S extends z.ZodType>(schema: S, input: unknown): z.infer<S> {
  const result = schema.safeParse(input);
  if (result.success) return result.data;
  const fields = fieldProblems(result.error, input);
  throw new AppError("invalid_input", summarizeProblems(fields), fields);
}
