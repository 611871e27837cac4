// One error type for the imaging core: a machine-readable code, the frame (file)
// the fault belongs to when there is one, and a message a person can act on.

export type ImagingErrorCode =
  | "too-few-frames"
  | "size-mismatch"
  | "bad-exposure"
  | "bad-levels"
  | "bad-parameter"
  | "limb-not-found"
  | "registration-failed"
  | "singular-system"
  | "too-large";

export class ImagingError extends Error {
  readonly code: ImagingErrorCode;
  readonly frameName?: string;

  /** The message without the frame's name in front. */
  readonly detail: string;

  constructor(code: ImagingErrorCode, message: string, frameName?: string) {
    super(frameName ? `${frameName}: ${message}` : message);
    this.detail = message;
    this.name = "ImagingError";
    this.code = code;
    this.frameName = frameName;
  }
}

/** Throws a bad-parameter error naming the field unless the value is a finite number within [min, max]. */
export function requireNumberInRange(field: string, value: number, min: number, max: number): void {
  if (typeof value !== "number" || !Number.isFinite(value) || value < min || value > max) {
    throw new ImagingError("bad-parameter", `${field} must be a finite number in [${min}, ${max}], got ${String(value)}`);
  }
}
