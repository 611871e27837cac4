// Reads messages captured by the SMTP fake.
import { MAILBOX } from "./env";

export interface Captured {
  id: string;
  to: string[];
  subject: string;
  text: string;
}

export async function waitForMail(to: string, match: (m: Captured) => boolean = () => true, timeoutMs = 20_000): Promise<Captured> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const res = await fetch(`${MAILBOX}/api/messages?to=${encodeURIComponent(to)}`);
    const list = (await res.json()) as Captured[];
    const found = list.filter(match).at(-1);
    if (found) return found;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`no mail to ${to} within ${timeoutMs} ms`);
}

export function firstLink(text: string): string {
  const m = text.match(/https?:\/\/\S+/);
  if (!m) throw new Error(`no link in mail: ${text.slice(0, 200)}`);
  return m[0];
}
