import { toNextJsHandler } from "better-auth/next-js";
import { getAuth } from "@/lib/auth/auth";
import { toErrorBody } from "@/lib/errors";
import { json } from "@/lib/http/route";
import { readBodyBytes } from "@/lib/http/request-guards";

// better-auth's own endpoints (sign-up, sign-in, verification, reset). Its
// handler is built on first request so that the build needs no environment.
// better-auth checks the origin itself (trustedOrigins in lib/auth/auth.ts).
export const dynamic = "force-dynamic";

/** Its forms are a few fields: anything larger is refused before better-auth reads it. */
const MAX_AUTH_BODY_BYTES = 64 * 1024;

export async function GET(req: Request) {
  return toNextJsHandler(getAuth()).GET(req);
}

export async function POST(req: Request) {
  let body: Buffer;
  try {
    body = await readBodyBytes(req, MAX_AUTH_BODY_BYTES);
  } catch (err) {
    const { status, body: error } = toErrorBody(err);
    return json(error, { status });
  }
  return toNextJsHandler(getAuth()).POST(new Request(req.url, { method: "POST", headers: req.headers, body: new Uint8Array(body) }));
}
