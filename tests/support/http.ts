// A small HTTP client that keeps the session cookie, for calling the running
// app as a given person.
import { randomUUID } from "node:crypto";
import { APP } from "./env";

export class Client {
  private cookies = new Map<string, string>();
  /** Each client looks like its own address to the rate limiter. */
  readonly ip = `10.${rnd()}.${rnd()}.${rnd()}`;

  async request(path: string, init: RequestInit = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    if (this.cookies.size) headers.set("cookie", [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; "));
    headers.set("origin", APP);
    headers.set("x-forwarded-for", this.ip);
    const res = await fetch(APP + path, { ...init, headers, redirect: "manual" });
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

  async signIn(email: string, password: string): Promise<void> {
    const { status, body } = await this.json("/api/auth/sign-in/email", { email, password });
    if (status !== 200) throw new Error(`sign-in of ${email} answered ${status}: ${JSON.stringify(body)}`);
  }
}

function rnd(): number {
  return parseInt(randomUUID().slice(0, 2), 16);
}
