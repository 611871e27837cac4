// The SMTP fake stands in for the relay in development and in every test lane;
// if it ends, every later mail of the run is lost (seen in CI: a client dropped
// its connection in the middle of a message, and the fake went with it). This
// test runs its own copy of the fake on free ports, never the shared one.
import { mkdtemp, writeFile } from "node:fs/promises";
import http from "node:http";
import net from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import nodemailer from "nodemailer";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { findFreePort, startOwnScript, type OwnProcess } from "../../support/processes";
import { waitFor } from "../../support/wait";

let fake: OwnProcess;
let smtpPort: number;
let mailboxPort: number;

beforeAll(async () => {
  smtpPort = await findFreePort();
  mailboxPort = await findFreePort();
  const dir = await mkdtemp(join(tmpdir(), "crownlight-mail-"));
  // A message file cut short, as a kill in the middle of writing it leaves one.
  await writeFile(join(dir, "0-cut.json"), '{"id":"0-cut","to":["a@');
  fake = await startOwnScript(
    "smtp-fake",
    "fakes/smtp/server.ts",
    { SMTP_URL: `smtp://127.0.0.1:${smtpPort}`, MAILBOX_PORT: String(mailboxPort), SMTP_FAKE_DIR: dir },
    "mailbox view on",
  );
}, 60_000);

afterAll(async () => {
  await fake?.kill("SIGTERM");
});

async function mailboxFor(to: string): Promise<{ subject: string }[]> {
  const res = await fetch(`http://127.0.0.1:${mailboxPort}/api/messages?to=${encodeURIComponent(to)}`);
  return (await res.json()) as { subject: string }[];
}

/** Opens a session, starts a message, sends half of it, and resets the connection. */
async function dropMidMessage(): Promise<void> {
  const socket = net.connect(smtpPort, "127.0.0.1");
  socket.on("error", () => undefined);
  const commands = ["EHLO probe.example", "MAIL FROM:<probe@example.org>", "RCPT TO:<dropped@example.org>", "DATA"];
  await new Promise<void>((resolve) => {
    socket.on("data", (chunk) => {
      const reply = chunk.toString();
      const next = commands.shift();
      if (next) {
        socket.write(`${next}\r\n`);
        return;
      }
      // Replies may come two to a chunk: look at every line.
      if (/^354/m.test(reply)) {
        socket.write("Subject: half\r\n\r\nhalf of a message");
        setTimeout(() => {
          socket.resetAndDestroy();
          resolve();
        }, 100);
      }
    });
  });
}

/** GET of a raw path, as a client sends it (fetch would normalise it first). */
function getRaw(path: string): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = http.get({ host: "127.0.0.1", port: mailboxPort, path }, (res) => {
      res.resume();
      resolve(res.statusCode ?? 0);
    });
    req.on("error", reject);
  });
}

describe("the SMTP fake", () => {
  it("starts past a message file cut short, and says which", async () => {
    expect(fake.isRunning()).toBe(true);
    expect(await fake.readLog()).toContain("skipped 0-cut.json");
  });

  it("outlives a client that resets its connection in the middle of a message, and takes the next one", async () => {
    await dropMidMessage();
    await waitFor("the fake to log the dropped connection", async () => ((await fake.readLog()).includes("ECONNRESET") ? true : undefined), 10_000);
    expect(fake.isRunning()).toBe(true);
    expect(await mailboxFor("dropped@example.org")).toEqual([]);

    const transport = nodemailer.createTransport({ host: "127.0.0.1", port: smtpPort, ignoreTLS: true });
    await transport.sendMail({ from: "desk@kestrel-ridge.example", to: "after@example.org", subject: "After the drop", text: "Still here." });
    transport.close();
    const after = await mailboxFor("after@example.org");
    expect(after.map((m) => m.subject)).toEqual(["After the drop"]);
    expect(fake.isRunning()).toBe(true);
  });

  it("answers a mailbox path that is no URL with 400, and keeps serving", async () => {
    expect(await getRaw("//%zz/")).toBe(400);
    expect(await getRaw("/api/messages?to=nobody%40example.org")).toBe(200);
    expect(fake.isRunning()).toBe(true);
  });
});
