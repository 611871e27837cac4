// Mail texts in the society's voice. Plain text first; the HTML is the same
// words with a link.
import type { MailDraft } from "./outbox";

const esc = (s: string) => s.replace(/[&<>"]/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;" })[c] ?? c);

function wrap(society: string, paragraphs: string[], link: { href: string; label: string }): string {
  return `<div style="font-family:system-ui,sans-serif;line-height:1.5">${paragraphs
    .map((p) => `<p>${esc(p)}</p>`)
    .join("")}<p><a href="${esc(link.href)}">${esc(link.label)}</a></p><p style="color:#666">${esc(society)}</p></div>`;
}

export function verificationMail(society: string, to: string, name: string, url: string): MailDraft {
  const lines = [`Hello ${name},`, `Please confirm that ${to} is your address for the ${society} eclipse workspace.`];
  return {
    to,
    subject: `Confirm your address for ${society}`,
    text: `${lines.join("\n\n")}\n\nConfirm: ${url}\n\nIf you did not sign up, you can ignore this message.\n\n${society}`,
    html: wrap(society, [...lines, "If you did not sign up, you can ignore this message."], { href: url, label: "Confirm my address" }),
  };
}

export function passwordResetMail(society: string, to: string, name: string, url: string): MailDraft {
  const lines = [`Hello ${name},`, "Someone asked to set a new password for your account. The link works for one hour."];
  return {
    to,
    subject: `Set a new password for ${society}`,
    text: `${lines.join("\n\n")}\n\nNew password: ${url}\n\nIf it was not you, ignore this message; your password stays as it is.\n\n${society}`,
    html: wrap(society, [...lines, "If it was not you, ignore this message; your password stays as it is."], {
      href: url,
      label: "Choose a new password",
    }),
  };
}
