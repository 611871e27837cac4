// The browser's one way to call our route handlers: JSON in and out, and a
// refusal turned into an ApiProblem that carries the server's own message and
// its field-by-field messages (the ErrorBody of lib/errors.ts), so that a form
// can show each message under the field at fault. Imports nothing from the
// server, so client components, TanStack Query functions and tests use it.
import type { ErrorBody, FieldProblem } from "@/lib/errors";

export type HttpMethod = "GET" | "POST" | "PATCH" | "DELETE";

export interface FetchJsonInit {
  /** GET without a body, POST with one, unless given. */
  method?: HttpMethod;
  /** Sent as JSON; leave it out for no body. */
  body?: unknown;
  signal?: AbortSignal;
}

export const UNREACHABLE_MESSAGE = "The server could not be reached. Check the connection and try again.";

/** What a refused or failed call tells the person: the sentence, and one message per field. */
export class ApiProblem extends Error {
  /** The HTTP status; 0 when nothing was answered (no connection) or the browser refused before sending. */
  readonly status: number;
  /** The server's error code (lib/errors.ts), or "unreachable" when no answer came. */
  readonly code: string;
  /** The server's field problems in its order, with their keys. */
  readonly fieldList: readonly FieldProblem[];
  /** Field key to its message, for placing each under its label. */
  readonly fields: Readonly<Record<string, string>>;

  constructor(message: string, options: { status?: number; code?: string; fields?: readonly FieldProblem[] } = {}) {
    super(message);
    this.name = "ApiProblem";
    this.status = options.status ?? 0;
    this.code = options.code ?? (this.status === 0 ? "unreachable" : "internal");
    this.fieldList = options.fields ?? [];
    this.fields = Object.fromEntries(this.fieldList.map((f) => [f.field, f.message]));
  }

  /** A problem found in the browser before anything was sent, worded like the server's. */
  static local(message: string, fields: Record<string, string> = {}): ApiProblem {
    return new ApiProblem(message, { code: "invalid_input", fields: Object.entries(fields).map(([field, m]) => ({ field, message: m })) });
  }

  get hasFields(): boolean {
    return this.fieldList.length > 0;
  }

  /** The server refused the request itself (4xx): sending it again unchanged would be refused again. */
  get isRefusal(): boolean {
    return this.status >= 400 && this.status < 500;
  }
}

/** A field's message as a person reads it under the field's label: without any echo of what was sent. */
export function plainFieldMessage(message: string): string {
  return message.replace(/\s*\(received [^)]*\)$/, "");
}

/**
 * The problem in the page's words: when the server names fields the page has
 * labels for, each is given by its label ("Interval: must be at least 0.1.");
 * otherwise the server's sentence, which is already written for people.
 */
export function describeProblem(problem: ApiProblem, labels?: Readonly<Record<string, string>>): string {
  if (!labels || !problem.fieldList.some((f) => f.field in labels)) return problem.message;
  return problem.fieldList.map((f) => `${labels[f.field] ?? "A value"}: ${plainFieldMessage(f.message)}.`).join(" ");
}

function readErrorBody(data: unknown): ErrorBody["error"] | null {
  const error = (data as Partial<ErrorBody> | null)?.error;
  return error && typeof error.message === "string" ? error : null;
}

/**
 * Calls one of our route handlers and answers its JSON body (null for an empty
 * one). Throws an ApiProblem when the server refuses or cannot be reached; an
 * aborted call rethrows the browser's AbortError, so that callers can tell a
 * cancellation from a failure.
 */
export async function fetchJson<T>(url: string, init: FetchJsonInit = {}): Promise<T> {
  const hasBody = init.body !== undefined;
  let res: Response;
  try {
    res = await fetch(url, {
      method: init.method ?? (hasBody ? "POST" : "GET"),
      headers: hasBody ? { "content-type": "application/json" } : undefined,
      body: hasBody ? JSON.stringify(init.body) : undefined,
      signal: init.signal,
      // Progress and state are read again and again: never from a cache.
      cache: "no-store",
    });
  } catch (err) {
    if ((err as Error).name === "AbortError") throw err;
    throw new ApiProblem(UNREACHABLE_MESSAGE);
  }
  const text = await res.text().catch(() => "");
  let data: unknown = null;
  try {
    data = text ? JSON.parse(text) : null;
  } catch {
    data = null;
  }
  if (res.ok) return data as T;
  const error = readErrorBody(data);
  throw new ApiProblem(error?.message ?? `The server answered ${res.status}.`, { status: res.status, code: error?.code ?? "internal", fields: error?.fields ?? [] });
}
