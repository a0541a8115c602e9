import nodemailer from 'nodemailer';
import type { Logger } from 'pino';
import type { Config } from '../config';
import type { Db } from '../db/connection';
import { startLocalMailServer } from './local-mail-server';

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** The federation the message is about (its slug): lets that federation's leads see it in the Outbox. */
  federation?: string;
}

export interface Mailer {
  /** Sends one message; resolves once the relay accepted it. */
  send(message: MailMessage): Promise<void>;
  /** Whether messages land in the local outbox (development, tests, demo) instead of a real relay. */
  local: boolean;
  close(): Promise<void>;
}

export const MAIL_FROM = 'Panelwise <no-reply@panelwise.invalid>';

/**
 * E-mail through nodemailer over SMTP: to SMTP_URL when set, otherwise (never in production) to
 * a local fake SMTP server on loopback that stores every message for the Outbox page.
 * In production without SMTP_URL there is no mailer: sending fails with a clear log line.
 */
export async function startMailer(options: { config: Config; db: Db; logger: Logger; from?: string }): Promise<Mailer> {
  const { config, db, logger } = options;
  const from = options.from ?? process.env.MAIL_FROM ?? MAIL_FROM;
  let url = config.smtpUrl;
  let closeServer: (() => Promise<void>) | null = null;
  if (!url) {
    if (config.env === 'production') {
      logger.error('SMTP_URL is not set: e-mail (invitations, password resets, flags) cannot be sent');
      return {
        local: false,
        async send() {
          throw new Error('No SMTP relay configured (SMTP_URL)');
        },
        async close() {},
      };
    }
    const server = await startLocalMailServer(db);
    url = `smtp://127.0.0.1:${server.port}`;
    closeServer = server.close;
    if (config.env !== 'test') logger.info(`local mail server on ${url}: messages are kept in the Outbox, not delivered`);
  }
  const local = closeServer !== null;
  const transport = nodemailer.createTransport(
    local ? { host: '127.0.0.1', port: Number(new URL(url).port), secure: false, ignoreTLS: true } : url,
  );
  return {
    local,
    async send(message) {
      await transport.sendMail({
        from,
        to: message.to,
        subject: message.subject,
        text: message.text,
        html: message.html,
        headers: message.federation ? { 'X-Panelwise-Federation': message.federation } : undefined,
      });
    },
    async close() {
      transport.close();
      await closeServer?.();
    },
  };
}
