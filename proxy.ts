// Runs before every page (Next.js proxy, Node.js runtime): a fresh nonce and the
// Content-Security-Policy built with it (Next.js reads the nonce from the
// request's policy and puts it on its scripts; the layout reads x-nonce), HSTS
// when the app is served over https, and server-action bodies over the limit
// refused with 413 and a message naming it (Next.js itself would answer 500).
import { NextResponse, type NextRequest } from "next/server";
import { getEnv } from "@/lib/env";
import { formatBytes } from "@/lib/format/bytes";
import { MAX_TRACK_LABEL } from "@/lib/sites/limits";
import { contentSecurityPolicy, s3Origins, SERVER_ACTION_BODY_LIMIT_BYTES, strictTransportSecurity } from "@/lib/http/security-headers";

export function proxy(request: NextRequest) {
  const env = getEnv();
  if (request.method === "POST" && request.headers.has("next-action")) {
    const declared = Number(request.headers.get("content-length") ?? NaN);
    if (Number.isFinite(declared) && declared > SERVER_ACTION_BODY_LIMIT_BYTES) {
      return new NextResponse(`The form is larger than the ${formatBytes(SERVER_ACTION_BODY_LIMIT_BYTES)} this site accepts. A track file may have at most ${MAX_TRACK_LABEL}.`, {
        status: 413,
        headers: { "content-type": "text/plain; charset=utf-8" },
      });
    }
  }
  const nonce = Buffer.from(crypto.randomUUID()).toString("base64");
  const policy = contentSecurityPolicy({ nonce, isDev: process.env.NODE_ENV === "development", appUrl: env.APP_URL, s3: s3Origins(env) });
  const requestHeaders = new Headers(request.headers);
  requestHeaders.set("x-nonce", nonce);
  requestHeaders.set("content-security-policy", policy);
  const response = NextResponse.next({ request: { headers: requestHeaders } });
  response.headers.set("content-security-policy", policy);
  const hsts = strictTransportSecurity(env.APP_URL);
  if (hsts) response.headers.set("strict-transport-security", hsts);
  return response;
}

export const config = {
  // Pages and server actions; not API routes, IIIF files or static assets,
  // which run no scripts of ours (and tiles are many).
  matcher: ["/((?!api/|iiif/|_next/static|_next/image|favicon.ico).*)"],
};
