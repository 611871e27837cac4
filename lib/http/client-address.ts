// The address of the client, for rate limits. X-Forwarded-For is written by
// whoever sends the request, so it counts only as far as our own proxies wrote
// it: with TRUSTED_PROXY_HOPS = N, each of the N proxies appended the address
// it saw, and the entry N from the right is what the outermost one saw. With
// no trusted proxy the header is ignored and the socket's peer is the client.
// The web process stamps the result on every request under CLIENT_ADDRESS_HEADER
// (instrumentation.ts), replacing anything a client sent under that name, and
// everything else (better-auth's limiter, plate reports) reads only that.
import { isIP } from "node:net";

export const CLIENT_ADDRESS_HEADER = "x-crownlight-client-address";

/** Written when no address can be known: every such request shares one bucket. */
export const UNKNOWN_CLIENT = "unknown";

function normalize(address: string | undefined | null): string | null {
  if (!address) return null;
  let a = address.trim();
  if (a.startsWith("[") && a.includes("]")) a = a.slice(1, a.indexOf("]")); // [v6]:port
  if (a.startsWith("::ffff:") && isIP(a.slice(7)) === 4) a = a.slice(7); // v4 mapped into v6
  return isIP(a) ? a.toLowerCase() : null;
}

export function resolveClientAddress(input: { forwardedFor: string | string[] | undefined; socketAddress: string | undefined; trustedProxyHops: number }): string {
  const socket = normalize(input.socketAddress);
  if (input.trustedProxyHops > 0) {
    const header = Array.isArray(input.forwardedFor) ? input.forwardedFor.join(",") : (input.forwardedFor ?? "");
    const entries = header
      .split(",")
      .map((e) => e.trim())
      .filter(Boolean);
    // Fewer entries than proxies: the request did not come through all of them,
    // so nothing in the header can be trusted.
    if (entries.length >= input.trustedProxyHops) {
      const forwarded = normalize(entries[entries.length - input.trustedProxyHops]);
      if (forwarded) return forwarded;
    }
  }
  return socket ?? UNKNOWN_CLIENT;
}

/** The client address the web process stamped on a request. */
export function clientAddressOf(headers: Headers): string {
  return headers.get(CLIENT_ADDRESS_HEADER) ?? UNKNOWN_CLIENT;
}
