// The client address rate limits count: the socket's peer unless our own
// proxies (TRUSTED_PROXY_HOPS) wrote X-Forwarded-For, and never what a client
// wrote itself.
import http from "node:http";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CLIENT_ADDRESS_HEADER, resolveClientAddress, UNKNOWN_CLIENT } from "@/lib/http/client-address";
import { installClientAddressStamp } from "@/lib/http/stamp-client-address";

describe("resolveClientAddress", () => {
  it("ignores X-Forwarded-For when no proxy is trusted", () => {
    expect(resolveClientAddress({ forwardedFor: "203.0.113.9", socketAddress: "198.51.100.7", trustedProxyHops: 0 })).toBe("198.51.100.7");
    expect(resolveClientAddress({ forwardedFor: ["203.0.113.9", "203.0.113.10"], socketAddress: "::ffff:198.51.100.7", trustedProxyHops: 0 })).toBe("198.51.100.7");
  });

  it("takes the entry that many hops from the right with trusted proxies", () => {
    // The client forged the first entry; our one proxy appended what it saw.
    expect(resolveClientAddress({ forwardedFor: "6.6.6.6, 203.0.113.9", socketAddress: "10.0.0.2", trustedProxyHops: 1 })).toBe("203.0.113.9");
    // Two proxies: a CDN appended the client, our balancer appended the CDN.
    expect(resolveClientAddress({ forwardedFor: "6.6.6.6, 203.0.113.9, 192.0.2.50", socketAddress: "10.0.0.2", trustedProxyHops: 2 })).toBe("203.0.113.9");
    expect(resolveClientAddress({ forwardedFor: "2001:DB8::1", socketAddress: "10.0.0.2", trustedProxyHops: 1 })).toBe("2001:db8::1");
  });

  it("falls back to the socket when the header is short, missing or not an address", () => {
    expect(resolveClientAddress({ forwardedFor: "203.0.113.9", socketAddress: "10.0.0.2", trustedProxyHops: 2 })).toBe("10.0.0.2");
    expect(resolveClientAddress({ forwardedFor: undefined, socketAddress: "10.0.0.2", trustedProxyHops: 1 })).toBe("10.0.0.2");
    expect(resolveClientAddress({ forwardedFor: "evil, not-an-ip", socketAddress: "10.0.0.2", trustedProxyHops: 1 })).toBe("10.0.0.2");
    expect(resolveClientAddress({ forwardedFor: "1.2.3.4", socketAddress: undefined, trustedProxyHops: 0 })).toBe(UNKNOWN_CLIENT);
  });
});

describe("the stamp on a real HTTP server", () => {
  let server: http.Server;
  let port = 0;
  beforeAll(async () => {
    installClientAddressStamp(0);
    server = http.createServer((req, res) => res.end(String(req.headers[CLIENT_ADDRESS_HEADER])));
    await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
    port = (server.address() as AddressInfo).port;
  });
  afterAll(() => new Promise<void>((r) => server.close(() => r())));

  const get = (headers: Record<string, string>, localAddress: string) =>
    new Promise<string>((resolve, reject) => {
      http
        .get({ host: "127.0.0.1", port, headers, localAddress }, (res) => {
          let text = "";
          res.on("data", (c) => (text += c));
          res.on("end", () => resolve(text));
        })
        .on("error", reject);
    });

  it("replaces what the client sent with the socket's address", async () => {
    expect(await get({ "x-forwarded-for": "203.0.113.9", [CLIENT_ADDRESS_HEADER]: "203.0.113.10" }, "127.4.5.6")).toBe("127.4.5.6");
    expect(await get({}, "127.7.8.9")).toBe("127.7.8.9");
  });
});
