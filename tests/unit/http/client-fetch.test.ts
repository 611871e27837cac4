import { afterEach, describe, expect, it, vi } from "vitest";
import { AppError, toErrorBody } from "@/lib/errors";
import { ApiProblem, describeProblem, fetchJson, UNREACHABLE_MESSAGE } from "@/lib/http/client-fetch";

/** The server's answer to a refused call, built as route handlers build it. */
function refusal(err: unknown): Response {
  const { status, body } = toErrorBody(err);
  return new Response(JSON.stringify(body), { status, headers: { "content-type": "application/json" } });
}

afterEach(() => {
  vi.unstubAllGlobals();
});

describe("fetchJson", () => {
  it("sends JSON with its content type and reads the JSON answer", async () => {
    let seen: Request | null = null;
    vi.stubGlobal("fetch", async (url: string, init: RequestInit) => {
      seen = new Request(`http://app.test${url}`, init);
      return Response.json({ id: "e1" }, { status: 201 });
    });
    await expect(fetchJson<{ id: string }>("/api/editions", { body: { title: "Corona Notes" } })).resolves.toEqual({ id: "e1" });
    expect(seen!.method).toBe("POST");
    expect(seen!.headers.get("content-type")).toBe("application/json");
    await expect(seen!.json()).resolves.toEqual({ title: "Corona Notes" });
  });

  it("answers null for an empty body and uses GET without one", async () => {
    const methods: string[] = [];
    vi.stubGlobal("fetch", async (_url: string, init: RequestInit) => {
      methods.push(init.method ?? "");
      return new Response(null, { status: 204 });
    });
    await expect(fetchJson("/api/reductions/r1")).resolves.toBeNull();
    await expect(fetchJson("/api/editions/e1", { method: "DELETE" })).resolves.toBeNull();
    expect(methods).toEqual(["GET", "DELETE"]);
  });

  it("turns the server's error body into a problem with its message and each field's message", async () => {
    const fields = [
      { field: "title", message: "is required", received: '""' },
      { field: "embargoDate", message: "must be a date written as YYYY-MM-DD", received: '"soon"' },
    ];
    vi.stubGlobal("fetch", async () => refusal(new AppError("invalid_input", "Title: is required; Embargo date: must be a date.", fields)));
    const problem = await fetchJson("/api/editions", { body: {} }).catch((e: unknown) => e);
    expect(problem).toBeInstanceOf(ApiProblem);
    const p = problem as ApiProblem;
    expect(p.status).toBe(400);
    expect(p.code).toBe("invalid_input");
    expect(p.message).toBe("Title: is required; Embargo date: must be a date.");
    expect(p.fields).toEqual({ title: "is required", embargoDate: "must be a date written as YYYY-MM-DD" });
    expect(p.hasFields).toBe(true);
    expect(p.isRefusal).toBe(true);
  });

  it("says the status when the answer is not our error body, and never shows an internal error's detail", async () => {
    vi.stubGlobal("fetch", async () => new Response("<html>Bad gateway</html>", { status: 502 }));
    await expect(fetchJson("/api/health")).rejects.toMatchObject({ status: 502, message: "The server answered 502." });
    vi.spyOn(console, "error").mockImplementation(() => {});
    vi.stubGlobal("fetch", async () => refusal(new Error("relation frames does not exist")));
    await expect(fetchJson("/api/health")).rejects.toMatchObject({ status: 500, code: "internal", message: "Something went wrong on our side. It has been logged." });
  });

  it("says the server could not be reached when the connection fails, and lets a cancellation through", async () => {
    vi.stubGlobal("fetch", async () => {
      throw new TypeError("Failed to fetch");
    });
    await expect(fetchJson("/api/health")).rejects.toMatchObject({ status: 0, code: "unreachable", message: UNREACHABLE_MESSAGE, isRefusal: false });
    vi.stubGlobal("fetch", async () => {
      throw new DOMException("The operation was aborted.", "AbortError");
    });
    await expect(fetchJson("/api/health")).rejects.toMatchObject({ name: "AbortError" });
  });
});

describe("describeProblem", () => {
  const problem = new ApiProblem("Interval: must be at least 0.1.", {
    status: 400,
    code: "invalid_input",
    fields: [
      { field: "intervalS", message: "must be at least 0.1 (received 0)" },
      { field: "other", message: "is not valid" },
    ],
  });

  it("names each field by the page's label, without the echo of what was sent", () => {
    expect(describeProblem(problem, { intervalS: "Interval" })).toBe("Interval: must be at least 0.1. A value: is not valid.");
  });

  it("keeps the server's sentence when the page has no label for any field", () => {
    expect(describeProblem(problem)).toBe("Interval: must be at least 0.1.");
    expect(describeProblem(problem, { firstAt: "First frame's time" })).toBe("Interval: must be at least 0.1.");
  });

  it("words a problem found before sending like the server's", () => {
    const local = ApiProblem.local("Please correct the marked field.", { title: "Give the composite a title." });
    expect(local.fields.title).toBe("Give the composite a title.");
    expect(local.code).toBe("invalid_input");
  });
});
