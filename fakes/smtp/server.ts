// Local stand-in for an SMTP relay. Captures every message; a developer reads
// them at http://127.0.0.1:MAILBOX_PORT/ and tests read them as JSON from
// /api/messages?to=ADDRESS. Both listeners bind to loopback only, so the
// mailbox is never reachable from another machine.
import fs from "node:fs";
import http from "node:http";
import path from "node:path";
import { simpleParser } from "mailparser";
import { SMTPServer } from "smtp-server";

interface CapturedMessage {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
}

const smtpPort = Number(new URL(process.env.SMTP_URL ?? "smtp://127.0.0.1:2525").port || 2525);
const mailboxPort = Number(process.env.MAILBOX_PORT ?? 1080);
const dir = path.resolve(process.env.SMTP_FAKE_DIR ?? ".data/mail");
fs.mkdirSync(dir, { recursive: true });

// Messages survive a restart of the fake: they are kept as JSON files too.
// A file cut short (the fake killed while writing it) is skipped with a line in
// the log, so that one bad file never keeps the mailbox from starting.
const messages: CapturedMessage[] = fs
  .readdirSync(dir)
  .filter((f) => f.endsWith(".json"))
  .sort()
  .flatMap((f) => {
    try {
      return [JSON.parse(fs.readFileSync(path.join(dir, f), "utf8")) as CapturedMessage];
    } catch (err) {
      console.error(`smtp fake: skipped ${f}: ${(err as Error).message}`);
      return [];
    }
  });
let counter = messages.length;

const smtp = new SMTPServer({
  authOptional: true,
  disabledCommands: ["STARTTLS"],
  logger: false,
  size: 10 * 1024 * 1024,
  onData(stream, session, callback) {
    simpleParser(stream)
      .then((mail) => {
        counter += 1;
        const id = `${Date.now().toString(36)}-${counter}`;
        const msg: CapturedMessage = {
          id,
          receivedAt: new Date().toISOString(),
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : "",
          to: session.envelope.rcptTo.map((r) => r.address.toLowerCase()),
          subject: mail.subject ?? "",
          text: mail.text ?? "",
          html: typeof mail.html === "string" ? mail.html : null,
        };
        messages.push(msg);
        fs.writeFileSync(path.join(dir, `${id}.json`), JSON.stringify(msg));
        callback();
      })
      .catch((err: Error) => callback(err));
  },
});

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c] ?? c);

function page(title: string, body: string): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(title)}</title>
<style>body{font:15px/1.5 system-ui,sans-serif;background:#0b1020;color:#e6e2d6;margin:2rem}a{color:#f2c66d}
table{border-collapse:collapse;width:100%}td,th{border-bottom:1px solid #2a3350;padding:.4rem;text-align:left}
pre{white-space:pre-wrap;background:#141b33;padding:1rem}</style></head><body>${body}</body></html>`;
}

const mailbox = http.createServer((req, res) => {
  // A path that is no URL (say "//%zz/") would throw here and end the fake: it gets a 400 instead.
  let url: URL;
  try {
    url = new URL(req.url ?? "/", `http://127.0.0.1:${mailboxPort}`);
  } catch {
    res.writeHead(400, { "content-type": "text/plain" }).end("Not a path this mailbox knows.");
    return;
  }
  if (url.pathname === "/api/messages" && req.method === "GET") {
    const to = url.searchParams.get("to")?.toLowerCase();
    const list = to ? messages.filter((m) => m.to.includes(to)) : messages;
    res.writeHead(200, { "content-type": "application/json" });
    res.end(JSON.stringify(list));
    return;
  }
  if (url.pathname === "/api/messages" && req.method === "DELETE") {
    for (const m of messages.splice(0)) fs.rmSync(path.join(dir, `${m.id}.json`), { force: true });
    res.writeHead(204).end();
    return;
  }
  const one = url.pathname.match(/^\/messages\/([\w-]+)$/);
  if (one) {
    const m = messages.find((x) => x.id === one[1]);
    if (!m) {
      res.writeHead(404, { "content-type": "text/html" }).end(page("Not found", "<p>No such message.</p>"));
      return;
    }
    res.writeHead(200, { "content-type": "text/html; charset=utf-8" });
    res.end(
      page(
        m.subject,
        `<p><a href="/">All messages</a></p><h1>${escapeHtml(m.subject)}</h1><p>From ${escapeHtml(m.from)} to ${escapeHtml(
          m.to.join(", "),
        )}, ${escapeHtml(m.receivedAt)}</p><pre>${escapeHtml(m.text)}</pre>`,
      ),
    );
    return;
  }
  if (url.pathname === "/") {
    const rows = [...messages]
      .reverse()
      .map(
        (m) =>
          `<tr><td>${escapeHtml(m.receivedAt)}</td><td>${escapeHtml(m.to.join(", "))}</td><td><a href="/messages/${m.id}">${escapeHtml(
            m.subject || "(no subject)",
          )}</a></td></tr>`,
      )
      .join("");
    res.writeHead(200, { "content-type": "text/html; charset=utf-8" });
    res.end(
      page(
        "Captured mail",
        `<h1>Captured mail (${messages.length})</h1><table><thead><tr><th>Received</th><th>To</th><th>Subject</th></tr></thead><tbody>${rows}</tbody></table>`,
      ),
    );
    return;
  }
  res.writeHead(404).end();
});

// A client that drops its connection in the middle of a message (a worker
// killed while sending, say) makes smtp-server emit "error" on the server.
// Without a listener that error ends the process, and every later mail is lost;
// a real relay only drops that one message.
smtp.on("error", (err: Error & { code?: string; remoteAddress?: string }) => {
  console.error(`smtp fake: connection from ${err.remoteAddress ?? "?"} failed: ${err.code ?? err.message}`);
});

smtp.listen(smtpPort, "127.0.0.1", () => console.log(`smtp fake on 127.0.0.1:${smtpPort}`));
mailbox.listen(mailboxPort, "127.0.0.1", () => console.log(`mailbox view on http://127.0.0.1:${mailboxPort}/`));

const shutdown = () => {
  mailbox.close();
  smtp.close(() => process.exit(0));
  setTimeout(() => process.exit(0), 2000).unref();
};
process.on("SIGTERM", shutdown);
process.on("SIGINT", shutdown);
