// Faults in what a reduction was given (files, exposures, options), as opposed
// to faults of the machine. The message names the file, line or option and says
// what is wrong; the worker fails such a job at once instead of retrying it.
import { isMediaError } from "@/lib/media";
import { ImagingError } from "@/lib/imaging/errors";

export type ReductionInputCode =
  | "too-few-frames"
  | "size-mismatch"
  | "missing-exposure"
  | "bad-exposure"
  | "bad-exposures-csv"
  | "bad-option"
  | "unreadable-file"
  | "bad-site"
  | "missing-capture-time"
  | "no-eclipse"
  | "orientation-unknown";

export class ReductionInputError extends Error {
  readonly code: ReductionInputCode;

  constructor(code: ReductionInputCode, message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = "ReductionInputError";
    this.code = code;
  }
}

/** True for faults in the input (a file, a parameter) that a retry cannot fix. */
export function isBadInputError(error: unknown): boolean {
  return error instanceof ReductionInputError || isMediaError(error) || error instanceof ImagingError;
}
