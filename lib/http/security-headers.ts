// The Content-Security-Policy and HSTS every page is sent with (proxy.ts).
// Scripts run only from our origin with the request's nonce ('strict-dynamic'
// lets them load the chunks they need); Next.js puts the nonce on its own
// scripts, and the root layout on the theme script. Browsers send frames
// straight to S3 and may show images from it, so its origin is allowed for
// connections and images. Inline style attributes stay allowed: React and the
// viewers set them, and styles cannot run code.
import type { Env } from "@/lib/env";

/** The limit proxy.ts enforces on server-action bodies; next.config.mjs says the same ("25mb"). */
export const SERVER_ACTION_BODY_LIMIT_BYTES = 25 * 1024 ** 2;

type S3Env = Pick<Env, "S3_ENDPOINT" | "S3_REGION" | "S3_FORCE_PATH_STYLE">;

/** Origins the browser reaches S3 at, for presigned uploads and downloads. */
export function s3Origins(env: S3Env): string[] {
  if (env.S3_ENDPOINT) {
    const url = new URL(env.S3_ENDPOINT);
    // Virtual-hosted style puts the bucket in the host name.
    return env.S3_FORCE_PATH_STYLE ? [url.origin] : [url.origin, `${url.protocol}//*.${url.host}`];
  }
  const region = env.S3_REGION;
  return [`https://s3.${region}.amazonaws.com`, `https://*.s3.${region}.amazonaws.com`, "https://*.s3.amazonaws.com"];
}

export function contentSecurityPolicy(input: { nonce: string; isDev: boolean; appUrl: string; s3: string[] }): string {
  const https = new URL(input.appUrl).protocol === "https:";
  const s3 = input.s3.join(" ");
  const directives = [
    "default-src 'self'",
    // React rebuilds server error stacks with eval in development only.
    `script-src 'self' 'nonce-${input.nonce}' 'strict-dynamic'${input.isDev ? " 'unsafe-eval'" : ""}`,
    "style-src 'self' 'unsafe-inline'",
    `img-src 'self' blob: data: ${s3}`,
    "font-src 'self' data:",
    `connect-src 'self' ${s3}${input.isDev ? " ws: wss:" : ""}`,
    "worker-src 'self' blob:",
    "media-src 'self' blob:",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'self'",
  ];
  if (https) directives.push("upgrade-insecure-requests");
  return directives.join("; ");
}

/** Strict-Transport-Security for an https APP_URL (two years, as hstspreload.org asks), none otherwise. */
export function strictTransportSecurity(appUrl: string): string | null {
  return new URL(appUrl).protocol === "https:" ? "max-age=63072000; includeSubDomains" : null;
}
