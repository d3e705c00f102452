import 'server-only';
import nodemailer, { type Transporter } from 'nodemailer';

/** SMTP_URL (smtp://host:port), by default the local mail catcher on loopback. */
export function smtpUrl(): string {
  return process.env.SMTP_URL || 'smtp://127.0.0.1:1025';
}

export const MAIL_FROM = () => process.env.MAIL_FROM || 'Oscillab <no-reply@oscillab.invalid>';

/** How many SMTP connections the pool keeps open at most (SMTP_POOL_SIZE, default 4). */
export function smtpPoolSize(): number {
  const n = Math.floor(Number(process.env.SMTP_POOL_SIZE ?? 4));
  return Number.isFinite(n) && n >= 1 ? Math.min(n, 32) : 4;
}

/** The URL with these parameters added, unless the URL sets them itself. */
function withParameters(url: string, parameters: Record<string, string>): string {
  const [head, query = ''] = url.split('?');
  const q = new URLSearchParams(query);
  for (const [k, v] of Object.entries(parameters)) if (!q.has(k)) q.set(k, v);
  return `${head}?${q.toString()}`;
}

let cached: { url: string; transporter: Transporter } | null = null;

/**
 * One pooled transport per process: messages go over a few kept-open connections instead of a
 * new connection (and greeting) each, and several can be under way at once.
 */
export function transporter(): Transporter {
  const url = smtpUrl();
  if (!cached || cached.url !== url) {
    cached?.transporter.close();
    cached = {
      url,
      // Pool and time limits as URL parameters: nodemailer reads a connection URL for the whole
      // configuration (options passed beside it are taken as message defaults, or dropped).
      transporter: nodemailer.createTransport(
        withParameters(url, {
          // maxRequeues 0: a message whose connection drops mid-send goes back to the outbox (which
          // retries it with back-off and the same Message-ID), not round the pool again unrecorded.
          pool: 'true',
          maxConnections: String(smtpPoolSize()),
          maxMessages: '500',
          maxRequeues: '0',
          connectionTimeout: '5000',
          greetingTimeout: '5000',
          socketTimeout: '10000',
        }),
      ),
    };
  }
  return cached.transporter;
}

/** Close the pooled connections (scripts and tests that end the process cleanly). */
export function closeTransport(): void {
  cached?.transporter.close();
  cached = null;
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
