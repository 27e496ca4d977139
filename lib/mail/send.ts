import 'server-only';
import nodemailer, { type Transporter } from 'nodemailer';
import { env } from '@/lib/env';

let transport: Transporter | undefined;

function getTransport(): Transporter {
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

export type Mail = { to: string; subject: string; text: string; html?: string; attachments?: { filename: string; content: Buffer }[] };

export async function sendMail(mail: Mail): Promise<void> {
  await getTransport().sendMail({ from: env().MAIL_FROM, ...mail });
}
