import nodemailer, { type Transporter } from 'nodemailer';

/** SMTP_URL (smtp://host:port), by default the local mail catcher on loopback. */
export function smtpUrl(): string {
  return process.env.SMTP_URL || 'smtp://127.0.0.1:1025';
}

export const MAIL_FROM = () => process.env.MAIL_FROM || 'Oscillab <no-reply@oscillab.invalid>';

let cached: { url: string; transporter: Transporter } | null = null;

export function transporter(): Transporter {
  const url = smtpUrl();
  if (!cached || cached.url !== url) {
    cached = {
      url,
      transporter: nodemailer.createTransport(url, { connectionTimeout: 5000, greetingTimeout: 5000, socketTimeout: 10000 }),
    };
  }
  return cached.transporter;
}

export type MailMessage = {
  to: string;
  subject: string;
  text: string;
  html?: string;
  attachments?: { filename: string; content: Buffer; contentType: string }[];
  headers?: Record<string, string>;
  /** A fixed Message-ID (with angle brackets); nodemailer makes a random one otherwise. */
  messageId?: string;
};

/** Send one message now. Most callers queue through the outbox instead (lib/mail/outbox.ts). */
export async function sendMail(message: MailMessage): Promise<{ messageId: string }> {
  const info = await transporter().sendMail({ from: MAIL_FROM(), ...message });
  return { messageId: info.messageId };
}
