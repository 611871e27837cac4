// Sign-in rules over HTTP against the running app: unverified accounts cannot
// sign in, password reset works through the mailed link, and repeated sign-in
// attempts are refused with 429 by the Redis-backed limiter.
import { randomUUID } from "node:crypto";
import { describe, expect, it } from "vitest";
import { SIGN_IN_ATTEMPTS_PER_MINUTE } from "@/lib/auth/auth";
import { APP } from "../support/env";
import { Client } from "../support/http";
import { firstLink, waitForMail } from "../support/mailbox";

const unique = () => randomUUID().slice(0, 8);

async function signUp(client: Client, email: string, password: string) {
  const res = await client.json("/api/auth/sign-up/email", { name: "Wren Calloway", email, password, callbackURL: "/welcome" });
  expect(res.status).toBe(200);
}

describe("sign-up and sign-in", () => {
  it("refuses sign-in until the address is confirmed, then lets the person in", async () => {
    const client = new Client();
    const email = `wren.${unique()}@auth-test.example`;
    await signUp(client, email, "umbra-penumbra-1");

    const early = await client.json("/api/auth/sign-in/email", { email, password: "umbra-penumbra-1" });
    expect(early.status).toBe(403);
    expect(JSON.stringify(early.body)).toContain("EMAIL_NOT_VERIFIED");

    const mail = await waitForMail(email, (m) => m.subject.startsWith("Confirm your address"));
    const verify = await client.request(new URL(firstLink(mail.text)).pathname + new URL(firstLink(mail.text)).search);
    expect([200, 302, 307]).toContain(verify.status);

    await client.signIn(email, "umbra-penumbra-1");
    const me = await client.json("/api/me");
    expect(me.status).toBe(200);
    expect(me.body).toMatchObject({ email, roles: ["member"] });
  });

  it("refuses a password shorter than 10 characters", async () => {
    const res = await new Client().json("/api/auth/sign-up/email", {
      name: "Short Password",
      email: `short.${unique()}@auth-test.example`,
      password: "corona",
    });
    expect(res.status).toBe(400);
    expect(JSON.stringify(res.body)).toContain("PASSWORD_TOO_SHORT");
  });

  it("resets a forgotten password through the mailed link", async () => {
    const client = new Client();
    const email = `reset.${unique()}@auth-test.example`;
    await signUp(client, email, "first-password-1");
    const confirm = await waitForMail(email, (m) => m.subject.startsWith("Confirm your address"));
    const confirmUrl = new URL(firstLink(confirm.text));
    await client.request(confirmUrl.pathname + confirmUrl.search);

    const asked = await client.json("/api/auth/request-password-reset", { email, redirectTo: "/reset-password" });
    expect(asked.status).toBe(200);
    const mail = await waitForMail(email, (m) => m.subject.startsWith("Set a new password"));
    // The mailed link passes through better-auth, which redirects to our page with the token.
    const link = new URL(firstLink(mail.text));
    expect(link.origin).toBe(APP);
    const hop = await client.request(link.pathname + link.search);
    const location = new URL(hop.headers.get("location") ?? "", APP);
    expect(location.pathname).toBe("/reset-password");
    const token = location.searchParams.get("token");
    expect(token).toBeTruthy();

    const reset = await client.json("/api/auth/reset-password", { newPassword: "second-password-2", token });
    expect(reset.status).toBe(200);
    const old = await new Client().json("/api/auth/sign-in/email", { email, password: "first-password-1" });
    expect(old.status).toBe(401);
    await new Client().signIn(email, "second-password-2");
  });

  it("limits sign-in attempts from one address and answers 429", async () => {
    const client = new Client();
    const statuses: number[] = [];
    for (let i = 0; i < SIGN_IN_ATTEMPTS_PER_MINUTE + 2; i++) {
      const res = await client.json("/api/auth/sign-in/email", { email: `nobody.${unique()}@auth-test.example`, password: "wrong-password-0" });
      statuses.push(res.status);
    }
    expect(statuses.slice(0, SIGN_IN_ATTEMPTS_PER_MINUTE).every((s) => s === 401)).toBe(true);
    expect(statuses.slice(SIGN_IN_ATTEMPTS_PER_MINUTE)).toEqual([429, 429]);
    // Another address is not affected.
    const other = await new Client().json("/api/auth/sign-in/email", { email: `nobody@auth-test.example`, password: "wrong-password-0" });
    expect(other.status).toBe(401);
  });
});
