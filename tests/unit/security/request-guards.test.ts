// The checks every route handler makes before reading a request.
import path from "node:path";
import { pathToFileURL } from "node:url";
import { describe, expect, it } from "vitest";
import { AppError } from "@/lib/errors";
import { readJsonBody, requireSameOrigin } from "@/lib/http/request-guards";
import { contentSecurityPolicy, s3Origins, strictTransportSecurity } from "@/lib/http/security-headers";
import { SERVER_ACTION_BODY_LIMIT_BYTES } from "@/lib/http/security-headers";

const APP_URL = "http://127.0.0.1:3000";

function refusal(fn: () => unknown): AppError {
  try {
    fn();
  } catch (err) {
    expect(err).toBeInstanceOf(AppError);
    return err as AppError;
  }
  throw new Error("expected a refusal");
}

const req = (method: string, headers: Record<string, string>, body?: string) => new Request("http://127.0.0.1:3000/api/x", { method, headers, body });

describe("same-origin check", () => {
  it("lets reads through and our own pages change things", () => {
    requireSameOrigin(req("GET", { origin: "https://evil.example" }), APP_URL);
    requireSameOrigin(req("POST", { origin: APP_URL, host: "127.0.0.1:3000" }), APP_URL);
    // The host the browser used (localhost rather than 127.0.0.1) is the same origin.
    requireSameOrigin(req("DELETE", { origin: "http://localhost:3000", host: "localhost:3000" }), APP_URL);
    // Tools that send neither Origin nor Fetch Metadata are not browsers: no cross-site request to forge.
    requireSameOrigin(req("PATCH", {}), APP_URL);
  });

  it("refuses another site, an opaque origin and cross-site fetch metadata with 403", () => {
    const cases: Record<string, string>[] = [{ origin: "https://evil.example", host: "127.0.0.1:3000" }, { origin: "null" }, { "sec-fetch-site": "cross-site" }, { "sec-fetch-site": "same-site" }];
    for (const headers of cases) {
      const err = refusal(() => requireSameOrigin(req("POST", headers), APP_URL));
      expect(err.status).toBe(403);
      expect(err.message).toMatch(/another site/);
    }
  });
});

describe("JSON bodies", () => {
  it("reads JSON sent as JSON", async () => {
    expect(await readJsonBody(req("POST", { "content-type": "application/json; charset=utf-8" }, '{"a":1}'), 100)).toEqual({ a: 1 });
  });

  it("refuses text/plain with 415, whatever it holds", async () => {
    const err = await readJsonBody(req("POST", { "content-type": "text/plain" }, '{"a":1}'), 100).catch((e: AppError) => e);
    expect(err).toBeInstanceOf(AppError);
    expect((err as AppError).status).toBe(415);
    expect((err as AppError).message).toContain("application/json");
  });

  it("refuses a body over the limit with 413 naming the limit, declared or not", async () => {
    const big = JSON.stringify({ text: "x".repeat(3000) });
    const declared = await readJsonBody(req("POST", { "content-type": "application/json" }, big), 2048).catch((e: AppError) => e);
    expect((declared as AppError).status).toBe(413);
    expect((declared as AppError).message).toBe("The request body is larger than the 2 kB this request accepts.");
    // Chunked: no length declared, counted while reading.
    const stream = new ReadableStream({
      start(c) {
        c.enqueue(new TextEncoder().encode(big));
        c.close();
      },
    });
    const chunked = new Request("http://127.0.0.1:3000/api/x", { method: "POST", headers: { "content-type": "application/json" }, body: stream, duplex: "half" } as RequestInit);
    const counted = await readJsonBody(chunked, 2048).catch((e: AppError) => e);
    expect((counted as AppError).status).toBe(413);
  });
});

describe("security headers", () => {
  it("allows scripts by nonce only, without eval in production, and S3 for images and uploads", () => {
    const s3 = s3Origins({ S3_ENDPOINT: "http://127.0.0.1:4569", S3_REGION: "us-east-1", S3_FORCE_PATH_STYLE: true });
    const policy = contentSecurityPolicy({ nonce: "abc123", isDev: false, appUrl: APP_URL, s3 });
    const directive = (name: string) => policy.split("; ").find((d) => d.startsWith(name + " ")) ?? "";
    expect(directive("script-src")).toBe("script-src 'self' 'nonce-abc123' 'strict-dynamic'");
    expect(policy).not.toContain("unsafe-eval");
    expect(directive("img-src")).toContain("http://127.0.0.1:4569");
    expect(directive("connect-src")).toContain("http://127.0.0.1:4569");
    expect(directive("object-src")).toBe("object-src 'none'");
    expect(contentSecurityPolicy({ nonce: "n", isDev: true, appUrl: APP_URL, s3 })).toContain("'unsafe-eval'");
  });

  it("names the bucket hosts of real S3", () => {
    expect(s3Origins({ S3_ENDPOINT: "", S3_REGION: "eu-west-1", S3_FORCE_PATH_STYLE: false })).toContain("https://*.s3.eu-west-1.amazonaws.com");
    expect(s3Origins({ S3_ENDPOINT: "https://objects.example.org", S3_REGION: "x", S3_FORCE_PATH_STYLE: false })).toEqual(["https://objects.example.org", "https://*.objects.example.org"]);
  });

  it("sends HSTS only for an https APP_URL", () => {
    expect(strictTransportSecurity("https://eclipse.kestrel-ridge.example")).toBe("max-age=63072000; includeSubDomains");
    expect(strictTransportSecurity(APP_URL)).toBeNull();
    expect(contentSecurityPolicy({ nonce: "n", isDev: false, appUrl: "https://eclipse.kestrel-ridge.example", s3: [] })).toContain("upgrade-insecure-requests");
  });

  it("keeps the proxy's server-action limit equal to Next.js's own", async () => {
    const nextConfig: unknown = (await import(pathToFileURL(path.resolve("next.config.mjs")).href)).default;
    const experimental = (nextConfig as { experimental: { serverActions: { bodySizeLimit: string }; proxyClientMaxBodySize: string } }).experimental;
    const bytes = (s: string) => Number(/^(\d+)mb$/.exec(s)![1]) * 1024 ** 2;
    expect(bytes(experimental.serverActions.bodySizeLimit)).toBe(SERVER_ACTION_BODY_LIMIT_BYTES);
    expect(bytes(experimental.proxyClientMaxBodySize)).toBe(SERVER_ACTION_BODY_LIMIT_BYTES);
  });
});
