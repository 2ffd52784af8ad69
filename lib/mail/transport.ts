// Outgoing mail. Everything goes over SMTP to SMTP_HOST:SMTP_PORT, which in this project is the local fake
// server (scripts/fake-smtp.ts) that files every message into the outbox table instead of delivering it.
import nodemailer, { type Transporter } from 'nodemailer';
import { smtpSettings } from '@/lib/config';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html: string;
}

const globalForMail = globalThis as unknown as { modeshelfMailer?: Transporter };

function transporter(): Transporter {
  if (!globalForMail.modeshelfMailer) {
    const { host, port } = smtpSettings();
    globalForMail.modeshelfMailer = nodemailer.createTransport({
      host,
      port,
      secure: false,
      ignoreTLS: true, // loopback to our own fake server; there is nothing to encrypt against
      connectionTimeout: 5_000,
      greetingTimeout: 5_000,
      socketTimeout: 10_000,
    });
  }
  return globalForMail.modeshelfMailer;
}

export async function sendMail(mail: OutgoingMail): Promise<string> {
  const info = await transporter().sendMail({ from: smtpSettings().from, ...mail });
  return info.messageId;
}
