/**
 * The mail port: one `send` over an SMTP transport (nodemailer). `SMTP_URL` names the real
 * server; without it the local capture server (api/fakes/smtp.ts) receives everything.
 * Sending happens only inside jobs (api/jobs/), never in a request.
 */
import nodemailer from 'nodemailer';
import type { Config } from '../config';

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html: string;
  headers?: Record<string, string>;
}

export interface Mailer {
  /** Resolves once the server accepted the message; rejects (so the job retries) otherwise. */
  send(message: MailMessage): Promise<void>;
}

/** Header values are ours, but payload text ends up in some: never let a line break through. */
const oneLine = (value: string) => value.replace(/[\r\n]+/g, ' ').trim();

export function createMailer(config: Pick<Config, 'SMTP_URL' | 'MAIL_FROM'>, fakeSmtpUrl?: string): Mailer {
  const url = config.SMTP_URL ?? fakeSmtpUrl;
  if (!url) {
    return {
      send: () => Promise.reject(new Error('No mail server: set SMTP_URL or start the local mail capture.')),
    };
  }
  const transport = nodemailer.createTransport(
    {
      url,
      // A server that hangs must fail the attempt well within the job's time limit, so the
      // queue retries it later instead of holding a worker.
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
      socketTimeout: 30_000,
    },
    { from: config.MAIL_FROM },
  );
  return {
    async send(message) {
      const headers = Object.fromEntries(
        Object.entries(message.headers ?? {}).map(([k, v]) => [oneLine(k), oneLine(v)]),
      );
      const info = await transport.sendMail({
        to: message.to,
        subject: oneLine(message.subject),
        text: message.text,
        html: message.html,
        headers,
      });
      if (info.rejected.length > 0) throw new Error(`The mail server refused ${info.rejected.length} recipient(s).`);
    },
  };
}
