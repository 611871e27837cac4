// nodemailer transport from env: the SMTP fake locally, a real relay in
// production, chosen by SMTP_URL alone.
import nodemailer, { type Transporter } from "nodemailer";

let transport: Transporter | undefined;

export function getTransport(): Transporter {
  if (!transport) {
    const url = process.env.SMTP_URL;
    if (!url) throw new Error("SMTP_URL is missing");
    const ignoreTLS = process.env.SMTP_IGNORE_TLS === "true" || process.env.SMTP_IGNORE_TLS === "1";
    transport = nodemailer.createTransport(url, { ignoreTLS } as never);
  }
  return transport;
}

export function mailFrom(): string {
  return process.env.MAIL_FROM ?? "Crownlight <crownlight@localhost>";
}
