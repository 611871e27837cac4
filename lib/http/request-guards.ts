// Checks every route handler makes before reading a request (lib/http/route.ts):
// state-changing requests come from our own pages, JSON bodies say they are
// JSON (a cross-site form can send text/plain without asking first, JSON it
// cannot), and no body is read past its limit.
import { AppError } from "@/lib/errors";
import { getEnv } from "@/lib/env";
import { formatBytes } from "@/lib/format/bytes";

export const MAX_JSON_BODY_BYTES = 1024 ** 2;

const STATE_CHANGING = new Set(["POST", "PUT", "PATCH", "DELETE"]);

/** Origins a state-changing request may come from: APP_URL's, and the host the request was sent to. */
function allowedOrigins(req: Request, appUrl: string): Set<string> {
  const allowed = new Set([new URL(appUrl).origin]);
  const host = req.headers.get("host");
  if (host) allowed.add(`${new URL(req.url).protocol}//${host}`);
  return allowed;
}

export function requireSameOrigin(req: Request, appUrl: string = getEnv().APP_URL): void {
  if (!STATE_CHANGING.has(req.method.toUpperCase())) return;
  const origin = req.headers.get("origin");
  if (origin !== null) {
    if (!allowedOrigins(req, appUrl).has(origin)) throw new AppError("forbidden", "This request came from another site and was refused.");
    return;
  }
  // Browsers send Origin with every such request; without it, trust only what
  // Fetch Metadata says was not cross-site (scripts and tools send neither).
  const site = req.headers.get("sec-fetch-site");
  if (site !== null && site !== "same-origin" && site !== "none") throw new AppError("forbidden", "This request came from another site and was refused.");
}

function isJson(contentType: string | null): boolean {
  const type = (contentType ?? "").split(";")[0].trim().toLowerCase();
  return type === "application/json";
}

function tooLarge(limit: number): AppError {
  return new AppError("too_large", `The request body is larger than the ${formatBytes(limit)} this request accepts.`);
}

/** The body's bytes; 413 naming the limit past `limit` bytes, declared or counted while reading. */
export async function readBodyBytes(req: Request, limit: number): Promise<Buffer> {
  const declared = Number(req.headers.get("content-length") ?? NaN);
  if (Number.isFinite(declared) && declared > limit) throw tooLarge(limit);
  // The declared length may be absent (chunked) or wrong: count while reading.
  const chunks: Uint8Array[] = [];
  let size = 0;
  if (req.body) {
    const reader = req.body.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      size += value.byteLength;
      if (size > limit) {
        await reader.cancel();
        throw tooLarge(limit);
      }
      chunks.push(value);
    }
  }
  return Buffer.concat(chunks);
}

/** The body parsed as JSON: 415 unless it says it is JSON, 413 past `limit` bytes, 400 when it is not JSON. */
export async function readJsonBody(req: Request, limit: number): Promise<unknown> {
  if (!isJson(req.headers.get("content-type"))) {
    throw new AppError("unsupported_media", "The request body must be JSON, sent with Content-Type: application/json.");
  }
  const bytes = await readBodyBytes(req, limit);
  try {
    return JSON.parse(bytes.toString("utf8"));
  } catch {
    throw new AppError("invalid_input", "The request body must be JSON.");
  }
}
