// Browser-side calls to our route handlers: JSON in and out, and the server's
// own message (which names the file or field at fault) when a call is refused.

export interface ApiFieldProblem {
  field: string;
  message: string;
}

export class ApiError extends Error {
  constructor(
    message: string,
    readonly status: number,
    readonly fields: ApiFieldProblem[] = [],
  ) {
    super(message);
    this.name = "ApiError";
  }
}

export async function callApi<T>(path: string, init: { method?: string; body?: unknown; signal?: AbortSignal } = {}): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, {
      method: init.method ?? (init.body === undefined ? "GET" : "POST"),
      headers: init.body === undefined ? undefined : { "content-type": "application/json" },
      body: init.body === undefined ? undefined : JSON.stringify(init.body),
      signal: init.signal,
      cache: "no-store",
    });
  } catch (err) {
    if ((err as Error).name === "AbortError") throw err;
    throw new ApiError("The server could not be reached; check the connection and try again.", 0);
  }
  const text = await res.text();
  let data: unknown = null;
  try {
    data = text ? JSON.parse(text) : null;
  } catch {
    data = null;
  }
  if (!res.ok) {
    const error = (data as { error?: { message?: string; fields?: ApiFieldProblem[] } } | null)?.error;
    throw new ApiError(error?.message ?? `The server answered ${res.status}.`, res.status, error?.fields ?? []);
  }
  return data as T;
}

/**
 * A refusal in the page's words: when the server names fields, each is given by
 * its label on the page (not its key) and without the echo of what was sent.
 * Other errors pass unchanged (their message is already written for people).
 */
export async function withFieldLabels<T>(call: Promise<T>, labels: Record<string, string>): Promise<T> {
  try {
    return await call;
  } catch (err) {
    if (!(err instanceof ApiError) || !err.fields.some((f) => f.field in labels)) throw err;
    throw new ApiError(err.fields.map((f) => `${labels[f.field] ?? "A value"}: ${f.message.replace(/\s*\(received [^)]*\)$/, "")}.`).join(" "), err.status, err.fields);
  }
}
