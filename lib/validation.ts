// zod at the boundary: a validation error names the field, what was expected
// and what came.
import type { z } from "zod";
import { AppError, type FieldProblem } from "./errors";

function describeReceived(input: unknown, path: PropertyKey[]): string {
  let value: unknown = input;
  for (const key of path) {
    if (value && typeof value === "object") value = (value as Record<PropertyKey, unknown>)[key];
    else return "nothing";
  }
  if (value === undefined) return "nothing";
  if (typeof value === "string") return value.length > 40 ? `a text of ${value.length} characters` : JSON.stringify(value);
  if (typeof value === "number" || typeof value === "boolean") return String(value);
  return Array.isArray(value) ? "a list" : typeof value;
}

export function fieldProblems(error: z.ZodError, input: unknown): FieldProblem[] {
  return error.issues.map((issue) => {
    const field = issue.path.map(String).join(".") || "(input)";
    return { field, message: `${issue.message} (received ${describeReceived(input, issue.path)})` };
  });
}

export function parseInput<S extends z.ZodType>(schema: S, input: unknown): z.infer<S> {
  const result = schema.safeParse(input);
  if (result.success) return result.data;
  const fields = fieldProblems(result.error, input);
  throw new AppError("invalid_input", fields.map((f) => `${f.field}: ${f.message}`).join("; "), fields);
}
