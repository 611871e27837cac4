// JSON calls from client components (the desks, the edition builder) to our route handlers, with
// the server's field-by-field messages kept for the form that sent them.
export interface ApiProblem {
  message: string;
  fields: Record<string, string>;
}

export type ApiResult<T> = { ok: true; data: T } | { ok: false; problem: ApiProblem };

export async function callApi<T = unknown>(method: "GET" | "POST" | "PATCH" | "DELETE", url: string, body?: unknown): Promise<ApiResult<T>> {
  try {
    const res = await fetch(url, {
      method,
      headers: body === undefined ? undefined : { "content-type": "application/json" },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const data = (await res.json().catch(() => ({}))) as { error?: { message?: string; fields?: { field: string; message: string }[] } };
    if (res.ok) return { ok: true, data: data as T };
    const fields = Object.fromEntries((data.error?.fields ?? []).map((f) => [f.field, f.message]));
    return { ok: false, problem: { message: data.error?.message ?? `The server answered ${res.status}.`, fields } };
  } catch {
    return { ok: false, problem: { message: "The server could not be reached. Check your connection and try again.", fields: {} } };
  }
}
