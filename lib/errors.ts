// One error type with a code; one table from code to HTTP status. Messages of
// AppError are written for the person who sees them; anything else is logged
// and answered with a generic message.
export const ERROR_STATUS = {
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  invalid_input: 400,
  conflict: 409,
  too_large: 413,
  unsupported_media: 415,
  rate_limited: 429,
  unavailable: 503,
  internal: 500,
} as const;

export type ErrorCode = keyof typeof ERROR_STATUS;

export interface FieldProblem {
  /** The input's key or path (exposureS, frames.2.exposureS): for forms to place the message, never shown. */
  field: string;
  /** Written for the person, without the field's name: the form shows it under the field's label. */
  message: string;
  /** What came, for API clients and logs; never shown to a person. */
  received?: string;
}

export class AppError extends Error {
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly fields: FieldProblem[] = [],
  ) {
    super(message);
    this.name = "AppError";
  }

  get status(): number {
    return ERROR_STATUS[this.code];
  }
}

export const unauthenticated = () => new AppError("unauthenticated", "Sign in to continue.");
export const forbidden = (what = "this") => new AppError("forbidden", `Your roles do not allow ${what}.`);
export const notFound = (what: string) => new AppError("not_found", `${what} was not found.`);

/** The body every error response carries. */
export interface ErrorBody {
  error: { code: ErrorCode; message: string; fields?: FieldProblem[] };
}

export function toErrorBody(err: unknown): { status: number; body: ErrorBody } {
  if (err instanceof AppError) {
    return {
      status: err.status,
      body: { error: { code: err.code, message: err.message, ...(err.fields.length ? { fields: err.fields } : {}) } },
    };
  }
  console.error(err);
  return { status: 500, body: { error: { code: "internal", message: "Something went wrong on our side. It has been logged." } } };
}
