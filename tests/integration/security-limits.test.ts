// Abuse limits over HTTP against the running app, which trusts no proxy
// (TRUSTED_PROXY_HOPS=0): every client below connects from its own loopback
// address, and a forged X-Forwarded-For must change nothing. Also the limits
// on request bodies, the origin and content-type checks of route handlers,
// and what sign-up accepts.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { plates } from "@/db/schema";
import { SIGN_IN_FAILURES_PER_EMAIL } from "@/lib/auth/auth-hooks";
import { SIGN_IN_ATTEMPTS_PER_MINUTE } from "@/lib/auth/auth";
import { PLATE_REPORT_RATE, REPORT_RATE } from "@/lib/plates/reports";
import { closeProducerRedis } from "@/lib/queue/connection";
import { APP, MAILBOX, requireTestDatabase } from "../support/env";
import { Client, randomLoopback } from "../support/http";
import { type Captured, firstLink, waitForMail } from "../support/mailbox";
import { makeExportablePlate, person } from "./edition-fixtures";

requireTestDatabase();
const db = getDb();
const unique = () => randomUUID().slice(0, 8);
const forged = (i: number) => `198.51.100.${i + 1}`;

afterAll(async () => {
  await closeProducerRedis();
  await closeDb();
});

/** A JSON POST with chosen extra headers. */
async function post(client: Client, path: string, body: unknown, headers: Record<string, string> = {}) {
  const res = await client.request(path, { method: "POST", headers: { "content-type": "application/json", ...headers }, body: JSON.stringify(body) });
  const text = await res.text();
  return { status: res.status, text };
}

describe("sign-in limits", () => {
  it("refuses 15 sign-ins with a rotating X-Forwarded-For after 10 (the header is not trusted)", async () => {
    const client = new Client();
    const email = `target.${unique()}@limits-test.example`;
    const statuses: number[] = [];
    for (let i = 0; i < 15; i++) statuses.push((await post(client, "/api/auth/sign-in/email", { email, password: "wrong-password-0" }, { "x-forwarded-for": forged(i) })).status);
    expect(statuses.slice(0, SIGN_IN_ATTEMPTS_PER_MINUTE)).toEqual(Array(10).fill(401));
    expect(statuses.slice(SIGN_IN_ATTEMPTS_PER_MINUTE)).toEqual(Array(5).fill(429));
  });

  it("counts per client even when every attempt names another account", async () => {
    const client = new Client();
    const statuses: number[] = [];
    for (let i = 0; i < 12; i++) statuses.push((await post(client, "/api/auth/sign-in/email", { email: `nobody.${unique()}@limits-test.example`, password: "wrong-password-0" }, { "x-forwarded-for": forged(i) })).status);
    expect(statuses).toEqual([...Array(10).fill(401), 429, 429]);
  });

  it("refuses an account after 10 failures from 10 addresses, even with its right password, and no other account", async () => {
    // A real account, so that the right password is refused for the limit's sake only.
    const email = `locked.${unique()}@limits-test.example`;
    const signUp = await post(new Client(), "/api/auth/sign-up/email", { name: "Ines Calloway", email, password: "umbra-penumbra-7" });
    expect(signUp.status).toBe(200);
    const mail = await waitForMail(email, (m) => m.subject.startsWith("Confirm your address"));
    const link = new URL(firstLink(mail.text));
    await new Client().request(link.pathname + link.search);

    const statuses: number[] = [];
    for (let i = 0; i < SIGN_IN_FAILURES_PER_EMAIL; i++) statuses.push((await post(new Client(), "/api/auth/sign-in/email", { email, password: `wrong-password-${i}` })).status);
    expect(statuses).toEqual(Array(10).fill(401));
    const locked = await post(new Client(), "/api/auth/sign-in/email", { email: email.toUpperCase(), password: "umbra-penumbra-7" });
    expect(locked.status).toBe(429);
    expect(locked.text).toContain("Too many failed sign-ins for this address");
    expect(locked.text).toMatch(/Try again in \d+ minutes/);
    // The limit is this address's alone.
    expect((await post(new Client(), "/api/auth/sign-in/email", { email: `other.${unique()}@limits-test.example`, password: "wrong-password-0" })).status).toBe(401);
  });
});

describe("sign-up", () => {
  it("refuses a common password, saying why", async () => {
    const res = await post(new Client(), "/api/auth/sign-up/email", { name: "Common Password", email: `common.${unique()}@limits-test.example`, password: "1234567890" });
    expect(res.status).toBe(400);
    expect(JSON.parse(res.text)).toMatchObject({ code: "PASSWORD_TOO_COMMON", message: expect.stringContaining("common passwords that attackers try first") });
  });

  it("refuses a name that is long, has a web address or line breaks, and keeps nothing", async () => {
    for (const [name, why] of [
      ["x".repeat(81), "at most 80 characters"],
      ["Prize winner: claim at https://evil.example/win", "web address"],
      ["Wren\nClaim your prize", "control characters"],
    ]) {
      const email = `name.${unique()}@limits-test.example`;
      const res = await post(new Client(), "/api/auth/sign-up/email", { name, email, password: "umbra-penumbra-1" });
      expect(res.status, name).toBe(400);
      expect(JSON.parse(res.text)).toMatchObject({ code: "INVALID_NAME", message: expect.stringContaining(why) });
    }
  });

  it("refuses the same names when a signed-in person changes theirs", async () => {
    const email = `rename.${unique()}@limits-test.example`;
    const client = new Client();
    expect((await post(client, "/api/auth/sign-up/email", { name: "Wren Calloway", email, password: "umbra-penumbra-2" })).status).toBe(200);
    const mail = await waitForMail(email, (m) => m.subject.startsWith("Confirm your address"));
    const link = new URL(firstLink(mail.text));
    await client.request(link.pathname + link.search);
    await client.signIn(email, "umbra-penumbra-2");
    const refused = await post(client, "/api/auth/update-user", { name: "Visit www.evil.example" });
    expect(refused.status).toBe(400);
    expect(refused.text).toContain("web address");
    expect((await post(client, "/api/auth/update-user", { name: "Wren Calloway-Eze" })).status).toBe(200);
    const me = await client.json("/api/me");
    expect(me.body).toMatchObject({ name: "Wren Calloway-Eze" });
  });

  it("sends a confirmation mail that starts with the society's words, not the name typed", async () => {
    const email = `mail.${unique()}@limits-test.example`;
    const name = `Ansel Brightwater ${unique()}`;
    expect((await post(new Client(), "/api/auth/sign-up/email", { name, email, password: "umbra-penumbra-3" })).status).toBe(200);
    const mail = await waitForMail(email, (m) => m.subject.startsWith("Confirm your address"));
    expect(mail.text.startsWith("Someone signed up for the Kestrel Ridge Astronomical Society")).toBe(true);
    expect(mail.text).not.toContain(name);
  });

  it("refuses a sign-up body over its limit with 413 naming it", async () => {
    const res = await post(new Client(), "/api/auth/sign-up/email", { name: "Big Body", email: `big.${unique()}@limits-test.example`, password: "x".repeat(100_000) });
    expect(res.status).toBe(413);
    expect(res.text).toContain("larger than the 64 kB this request accepts");
  });
});

describe("public plate reports", () => {
  const tag = Date.now().toString(36);
  let slug = "";
  let title = "";
  beforeAll(async () => {
    const plateId = await makeExportablePlate(db, `limits-${tag}`, 1, "rounded", false, false);
    const [row] = await db.select({ slug: plates.slug, title: plates.title }).from(plates).where(eq(plates.id, plateId));
    slug = row.slug;
    title = row.title;
  });
  const report = (client: Client, i: number, headers: Record<string, string> = {}) =>
    post(client, `/api/plates/${slug}/reports`, { kind: "other", message: `Report number ${i} about this plate.`, email: `visitor-${i}@visitors.example` }, headers);

  async function curatorMails(): Promise<Captured[]> {
    const res = await fetch(`${MAILBOX}/api/messages?to=${encodeURIComponent(person("curator").email)}`);
    return ((await res.json()) as Captured[]).filter((m) => m.subject.startsWith("Plate reported") && m.subject.includes(tag));
  }

  it("sends the curators one e-mail for a burst of eight reports from eight addresses", async () => {
    const statuses = await Promise.all(Array.from({ length: 8 }, (_, i) => report(new Client(), i).then((r) => r.status)));
    expect(statuses).toEqual(Array(8).fill(201));
    await waitForMail(person("curator").email, (m) => m.subject.includes(tag));
    // Give any further mail time to arrive through the queue before counting.
    await new Promise((r) => setTimeout(r, 3000));
    const mails = await curatorMails();
    expect(mails).toHaveLength(1);
    expect(mails[0].text).toContain("the plate editor lists every open report");
    expect(title).toContain(tag);
  });

  it("counts a forged X-Forwarded-For as the same client", async () => {
    const client = new Client();
    const statuses: number[] = [];
    for (let i = 0; i < REPORT_RATE.max + 2; i++) statuses.push((await report(client, 100 + i, { "x-forwarded-for": forged(i) })).status);
    expect(statuses).toEqual([...Array(REPORT_RATE.max).fill(201), 429, 429]);
  });

  it("limits reports about one plate from every address together", async () => {
    // 8 + 5 reports so far; the rest of the hour's allowance, then refusals naming the reason.
    const left = PLATE_REPORT_RATE.max - 8 - REPORT_RATE.max;
    for (let i = 0; i < left; i++) expect((await report(new Client(), 200 + i)).status).toBe(201);
    const refused = await report(new Client(), 300);
    expect(refused.status).toBe(429);
    expect(refused.text).toContain("many reports in the last hour");
  });
});

describe("request guards on route handlers", () => {
  it("refuses a cross-site origin with 403 and text/plain JSON with 415", async () => {
    const client = new Client();
    const body = { kind: "other", message: "Cross-site attempt.", email: "x@visitors.example" };
    const cross = await post(client, "/api/plates/no-such-plate/reports", body, { origin: "https://evil.example" });
    expect(cross.status).toBe(403);
    expect(cross.text).toContain("another site");
    const plain = await client.request("/api/plates/no-such-plate/reports", { method: "POST", headers: { "content-type": "text/plain" }, body: JSON.stringify(body) });
    expect(plain.status).toBe(415);
    expect(await plain.text()).toContain("application/json");
  });

  it("refuses a JSON body over 1 MB with 413 naming the limit", async () => {
    const res = await post(new Client(), "/api/plates/no-such-plate/reports", { kind: "other", message: "x".repeat(1_200_000), email: "x@visitors.example" });
    expect(res.status).toBe(413);
    expect(res.text).toContain("larger than the 1.0 MB this request accepts");
  });

  it("answers a 41 MB server-action body with 413 naming the limit, not 500", async () => {
    const client = new Client({ address: randomLoopback() });
    const res = await client.request("/studio/sites/new", {
      method: "POST",
      headers: { "next-action": "0".repeat(42), "content-type": "multipart/form-data; boundary=x" },
      body: Buffer.alloc(41 * 1024 * 1024, 0x61),
    });
    expect(res.status).toBe(413);
    expect(await res.text()).toContain("larger than the 25.0 MB this site accepts");
  });
});

describe("headers", () => {
  it("sends pages with a nonce policy and no unsafe-eval", async () => {
    const res = await new Client().request("/");
    const policy = res.headers.get("content-security-policy") ?? "";
    expect(policy).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]+' 'strict-dynamic'/);
    expect(policy).not.toContain("unsafe-eval");
    // The test world is served over http: no HSTS (lib/http/security-headers.ts sends it for https).
    expect(APP.startsWith("http:")).toBe(true);
    expect(res.headers.get("strict-transport-security")).toBeNull();
  });
});
