// nodemailer transport from env: the SMTP fake locally, a real relay in
// production, chosen by SMTP_URL alone.
import nodemailer, { type Transporter } from "nodemailer";
import { getEnv } from "@/lib/env";

let transport: Transporter | undefined;

export function getTransport(): Transporter {
  if (!transport) {
    const env = getEnv();
    transport = nodemailer.createTransport(env.SMTP_URL, { ignoreTLS: env.SMTP_IGNORE_TLS } as never);
  }
  return transport;
}

export function mailFrom(): string {
  return getEnv().MAIL_FROM;
}
