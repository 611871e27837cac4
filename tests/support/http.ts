// A small HTTP client that keeps the session cookie, for calling the running
// app as a given person. The app counts rate limits per socket address (no
// proxy is trusted in the test world), so each client connects from its own
// loopback address (127.x.y.z, all of which reach 127.0.0.1 on Linux).
import { randomUUID } from "node:crypto";
import http from "node:http";
import { APP } from "./env";

export class Client {
  private cookies = new Map<string, string>();
  /** The loopback address this client connects from: its own bucket in the rate limiters. */
  readonly address: string;
  /** Headers sent with every request (e.g. a forged X-Forwarded-For). */
  readonly extraHeaders: Record<string, string>;

  constructor(options: { address?: string; headers?: Record<string, string> } = {}) {
    this.address = options.address ?? randomLoopback();
    this.extraHeaders = options.headers ?? {};
  }

  async request(path: string, init: RequestInit = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    if (this.cookies.size) headers.set("cookie", [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; "));
    if (!headers.has("origin")) headers.set("origin", APP);
    for (const [k, v] of Object.entries(this.extraHeaders)) headers.set(k, v);
    const res = await send(new URL(path, APP), init.method ?? "GET", headers, init.body, this.address);
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair.indexOf("=");
      const name = pair.slice(0, i);
      const value = pair.slice(i + 1);
      if (value === "" || /max-age=0/i.test(c)) this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
    return res;
  }

  async json(path: string, body?: unknown, method = body === undefined ? "GET" : "POST"): Promise<{ status: number; body: unknown }> {
    const res = await this.request(path, {
      method,
      headers: body === undefined ? {} : { "content-type": "application/json" },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const text = await res.text();
    let parsed: unknown = text;
    try {
      parsed = JSON.parse(text);
    } catch {
      /* not JSON: keep the text */
    }
    return { status: res.status, body: parsed };
  }

  /** The cookies this client holds, as name and value. */
  cookieList(): [string, string][] {
    return [...this.cookies];
  }

  async signIn(email: string, password: string): Promise<void> {
    const { status, body } = await this.json("/api/auth/sign-in/email", { email, password });
    if (status !== 200) throw new Error(`sign-in of ${email} answered ${status}: ${JSON.stringify(body)}`);
  }
}

function rnd(): number {
  return parseInt(randomUUID().slice(0, 2), 16);
}

/** 127.x.y.z other than 127.0.0.1, which Chromium and the app's own calls use. */
export function randomLoopback(): string {
  return `127.${1 + (rnd() % 254)}.${rnd()}.${1 + (rnd() % 254)}`;
}

/** One HTTP/1.1 request from a chosen local address (fetch cannot choose it), answered as a Response. */
function send(url: URL, method: string, headers: Headers, body: RequestInit["body"], localAddress: string): Promise<Response> {
  let bytes: Buffer | undefined;
  if (typeof body === "string") bytes = Buffer.from(body);
  else if (body instanceof Uint8Array) bytes = Buffer.from(body);
  else if (body instanceof ArrayBuffer) bytes = Buffer.from(new Uint8Array(body));
  else if (body != null) throw new Error("Client.request sends string or byte bodies only");
  const outgoing: Record<string, string> = Object.fromEntries(headers);
  if (bytes) outgoing["content-length"] = String(bytes.length);
  let answered = false;
  return new Promise((resolve, reject) => {
    const req = http.request(url, { method, headers: outgoing, localAddress }, (res) => {
      answered = true;
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("error", reject);
      res.on("end", () => {
        const h = new Headers();
        for (const [k, v] of Object.entries(res.headers)) {
          if (Array.isArray(v)) for (const one of v) h.append(k, one);
          else if (v !== undefined) h.set(k, v);
        }
        const status = res.statusCode ?? 0;
        const noBody = status === 204 || status === 304 || method === "HEAD";
        resolve(new Response(noBody ? null : Buffer.concat(chunks), { status, headers: h }));
      });
    });
    // A server may answer before reading the whole body (a 413) and close: that is the answer.
    req.on("error", (err) => {
      if (!answered) reject(err);
    });
    if (bytes) req.write(bytes);
    req.end();
  });
}
