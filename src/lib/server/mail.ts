/**
 * Outgoing e-mail through nodemailer over SMTP (`SMTP_URL`). `npm start` and the test stack
 * point it at the local fake relay (ingest/fake-smtp.ts), which keeps every message in
 * `outbox_mail` for the admin's "Caught e-mail" page; production points it at the lab's relay.
 */
import nodemailer, { type Transporter } from 'nodemailer';
import { config } from './config.ts';

let transport: Transporter | null = null;

function transporter(): Transporter {
  if (!config.smtpUrl) throw new Error('SMTP_URL is not set, so Coatrail cannot send e-mail.');
  transport ??= nodemailer.createTransport(config.smtpUrl);
  return transport;
}

/** The sender address: `coatrail@<host of the public origin>`. */
export function mailFrom(): string {
  let host = 'localhost';
  try {
    if (config.publicOrigin) host = new URL(config.publicOrigin).hostname;
  } catch {
    /* keep localhost */
  }
  return `Coatrail <coatrail@${host}>`;
}

export async function sendMail(msg: { to: string; subject: string; text: string }): Promise<void> {
  await transporter().sendMail({ from: mailFrom(), to: msg.to, subject: msg.subject, text: msg.text });
}
