/**
 * The mail transport. One interface, two kinds:
 * - SMTP (nodemailer) when SMTP_URL or SMTP_HOST is set;
 * - the local outbox otherwise: nodemailer's JSON transport builds the message (so addresses are
 *   checked as for real mail) and it is kept in memory, readable by tests and GET /api/dev/outbox.
 */
import nodemailer from 'nodemailer';
import type { OutboxMessage } from '../../shared/api';
import type { Config } from '../config';

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

export interface Mailer {
  /** 'smtp' or 'outbox'. */
  readonly kind: 'smtp' | 'outbox';
  send(message: MailMessage): Promise<void>;
}

export interface OutboxMailer extends Mailer {
  readonly kind: 'outbox';
  /** Messages sent so far, oldest first (at most `capacity`). */
  messages(): OutboxMessage[];
  clear(): void;
}

export function createOutboxMailer(options: { from: string; capacity?: number }): OutboxMailer {
  const capacity = options.capacity ?? 200;
  const transport = nodemailer.createTransport({ jsonTransport: true });
  const store: OutboxMessage[] = [];
  let nextId = 1;
  return {
    kind: 'outbox',
    async send(message) {
      await transport.sendMail({ from: options.from, ...message });
      store.push({ id: nextId++, ...message, createdAt: new Date().toISOString() });
      if (store.length > capacity) store.splice(0, store.length - capacity);
    },
    messages: () => store.map((m) => ({ ...m })),
    clear: () => {
      store.length = 0;
    },
  };
}

export function createSmtpMailer(config: Pick<Config, 'smtp' | 'mailFrom'>): Mailer {
  const smtp = config.smtp;
  if (!smtp) throw new Error('mail: SMTP is not configured (set SMTP_URL or SMTP_HOST)');
  const transport = smtp.url
    ? nodemailer.createTransport(smtp.url)
    : nodemailer.createTransport({
        host: smtp.host,
        port: smtp.port,
        secure: smtp.port === 465,
        auth: smtp.user ? { user: smtp.user, pass: smtp.pass ?? '' } : undefined,
      });
  return {
    kind: 'smtp',
    async send(message) {
      await transport.sendMail({ from: config.mailFrom, ...message });
    },
  };
}

/** SMTP when configured, else the local outbox. */
export function createMailer(config: Pick<Config, 'smtp' | 'mailFrom'>): Mailer {
  return config.smtp ? createSmtpMailer(config) : createOutboxMailer({ from: config.mailFrom });
}

export function isOutbox(mailer: Mailer): mailer is OutboxMailer {
  return mailer.kind === 'outbox';
}
