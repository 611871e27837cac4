// Faults in what a composite was given (master files, options): the message
// names the file or option and says what is wrong; a retry cannot fix them.
import { isMediaError } from "@/lib/media";
import { ImagingError } from "@/lib/imaging/errors";

export type CompositeInputCode = "bad-option" | "not-a-master" | "no-wcs" | "other-eclipse" | "too-few-masters";

export class CompositeInputError extends Error {
  readonly code: CompositeInputCode;

  constructor(code: CompositeInputCode, message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = "CompositeInputError";
    this.code = code;
  }
}

/** True for faults in the input (a master, an option) that a retry cannot fix. */
export function isCompositeInputError(error: unknown): boolean {
  return error instanceof CompositeInputError || isMediaError(error) || error instanceof ImagingError;
}
