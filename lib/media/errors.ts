// One error type for every fault in a file we were given. The message always
// starts with the file name so that a photographer reading it in the upload list
// knows which frame to look at; the code lets the worker decide between "fail at
// once" (all of these) and "retry" (anything that is not a MediaError).

export type MediaErrorCode =
  | "empty-file"
  | "unknown-format"
  | "format-mismatch"
  | "truncated"
  | "corrupt"
  | "too-large"
  | "unsupported"
  | "fits-header"
  | "fits-data"
  | "raw-decode-failed"
  | "missing-exposure"
  | "bad-argument";

export class MediaError extends Error {
  readonly code: MediaErrorCode;
  readonly fileName: string;

  constructor(code: MediaErrorCode, fileName: string, fault: string, options?: { cause?: unknown }) {
    super(`${fileName}: ${fault}`, options);
    this.name = "MediaError";
    this.code = code;
    this.fileName = fileName;
  }
}

export function isMediaError(error: unknown): error is MediaError {
  return error instanceof MediaError;
}
