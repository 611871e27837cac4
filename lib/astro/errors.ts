// One error type for sky geometry and planning: a machine-readable code, the
// field (or track line) at fault, and a message a person can act on.

export type AstroErrorCode = "bad-parameter" | "bad-track" | "out-of-range" | "not-found";

export class AstroError extends Error {
  readonly code: AstroErrorCode;
  readonly field?: string;

  constructor(code: AstroErrorCode, message: string, field?: string) {
    super(message);
    this.name = "AstroError";
    this.code = code;
    this.field = field;
  }
}

/** Throws a bad-parameter error naming the field unless the value is a finite number within [min, max]. */
export function requireFinite(field: string, value: number, min = -Infinity, max = Infinity): void {
  if (typeof value !== "number" || !Number.isFinite(value) || value < min || value > max) {
    const range = Number.isFinite(min) || Number.isFinite(max) ? ` in [${min}, ${max}]` : "";
    throw new AstroError("bad-parameter", `${field} must be a finite number${range}, got ${String(value)}`, field);
  }
}

/** Throws unless the value is a finite number strictly greater than zero. */
export function requirePositive(field: string, value: number): void {
  if (typeof value !== "number" || !Number.isFinite(value) || value <= 0) {
    throw new AstroError("bad-parameter", `${field} must be a finite number greater than 0, got ${String(value)}`, field);
  }
}
