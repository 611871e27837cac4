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
