// Next.js gives route handlers, server actions and better-auth a Request
// without the socket, and fills X-Forwarded-For from the socket only when the
// client sent none. So the web process stamps the client address itself: every
// "request" event of its HTTP servers passes through here before Next.js sees
// it, and gets CLIENT_ADDRESS_HEADER from the socket (and our own proxies'
// X-Forwarded-For entries, as TRUSTED_PROXY_HOPS says), replacing whatever a
// client sent under that name. Installed once by instrumentation.ts.
import http from "node:http";
import https from "node:https";
import { CLIENT_ADDRESS_HEADER, resolveClientAddress } from "./client-address";

const INSTALLED = Symbol.for("crownlight.client-address-stamp");

/** Sets the header on one incoming request (exported for tests). */
export function stampClientAddress(req: http.IncomingMessage, trustedProxyHops: number): void {
  req.headers[CLIENT_ADDRESS_HEADER] = resolveClientAddress({
    forwardedFor: req.headers["x-forwarded-for"],
    socketAddress: req.socket?.remoteAddress,
    trustedProxyHops,
  });
}

export function installClientAddressStamp(trustedProxyHops: number): void {
  for (const proto of [http.Server.prototype, https.Server.prototype] as unknown as Record<symbol | string, unknown>[]) {
    if (proto[INSTALLED]) continue;
    const emit = proto.emit as (this: unknown, event: string | symbol, ...args: unknown[]) => boolean;
    proto.emit = function (this: unknown, event: string | symbol, ...args: unknown[]) {
      if (event === "request") stampClientAddress(args[0] as http.IncomingMessage, trustedProxyHops);
      return emit.call(this, event, ...args);
    };
    proto[INSTALLED] = true;
  }
}
