import 'server-only';
import nodemailer, { type Transporter } from 'nodemailer';
import { env } from '@/lib/env';

let transport: Transporter | undefined;

/** The relay from the environment (the local sink in development and tests, a real relay by configuration). */
export function relay(): Transporter {
  if (!transport) {
    const e = env();
    transport = nodemailer.createTransport({
      host: e.SMTP_HOST,
      port: e.SMTP_PORT,
      secure: e.SMTP_SECURE === '1',
      // The local sink speaks plain SMTP; a production relay negotiates TLS as usual.
      ignoreTLS: e.SMTP_HOST === '127.0.0.1',
      auth: e.SMTP_USER ? { user: e.SMTP_USER, pass: e.SMTP_PASSWORD } : undefined,
    });
  }
  return transport;
}

export type Mail = {
  to: string;
  subject: string;
  text: string;
  html?: string;
  attachments?: { filename: string; content: Buffer; contentType?: string }[];
};

/** What the relay answered: its SMTP reply and the addresses it accepted and refused. */
export type MailAnswer = { messageId: string | null; response: string; accepted: string[]; rejected: string[] };

const addresses = (list: unknown): string[] => (Array.isArray(list) ? list.map((a) => (typeof a === 'string' ? a : String((a as { address?: string }).address ?? a))) : []);

/** Sends one message; rejects when the relay refuses it outright (its SMTP error is on the error's `response`). */
export async function sendMail(mail: Mail, via: Transporter = relay()): Promise<MailAnswer> {
  const info = await via.sendMail({ from: env().MAIL_FROM, ...mail });
  return { messageId: info.messageId ?? null, response: String(info.response ?? ''), accepted: addresses(info.accepted), rejected: addresses(info.rejected) };
}
