import nodemailer from 'nodemailer';
import type { Knex } from 'knex';
import type { OutboxMessage } from '../../shared/sites';

export interface MailAttachment {
  filename: string;
  contentType: string;
  content: Buffer;
}

export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html?: string;
  attachments?: MailAttachment[];
  siteId?: number | null;
}

export interface Mailer {
  /** Stores the message in the outbox, and sends it when SMTP is configured. Returns the outbox id. */
  send(message: MailMessage): Promise<number>;
}

interface DbOutboxRow {
  id: number;
  site_id: number | null;
  to: string;
  subject: string;
  text: string;
  html: string | null;
  attachments: string;
  status: 'stored' | 'sent' | 'failed';
  error: string | null;
  created_at: string;
}

/**
 * All mail goes through nodemailer. Without SMTP_URL the transport is nodemailer's JSON transport (the
 * message is composed, not sent) and the outbox table is the local stand-in for a mail service.
 */
export function createMailer(db: Knex, options: { smtpUrl?: string | undefined; from: string }): Mailer {
  const transport = options.smtpUrl ? nodemailer.createTransport(options.smtpUrl) : nodemailer.createTransport({ jsonTransport: true });
  return {
    async send(m) {
      const attachments = (m.attachments ?? []).map((a) => ({ filename: a.filename, contentType: a.contentType, base64: a.content.toString('base64') }));
      const [{ id }] = await db('mail_outbox').insert({
        site_id: m.siteId ?? null,
        to: m.to,
        subject: m.subject,
        text: m.text,
        html: m.html ?? null,
        attachments: JSON.stringify(attachments),
        status: 'stored',
        created_at: new Date().toISOString(),
      }, 'id');
      try {
        await transport.sendMail({
          from: options.from,
          to: m.to,
          subject: m.subject,
          text: m.text,
          ...(m.html ? { html: m.html } : {}),
          attachments: (m.attachments ?? []).map((a) => ({ filename: a.filename, contentType: a.contentType, content: a.content })),
        });
        if (options.smtpUrl) await db('mail_outbox').where({ id }).update({ status: 'sent' });
      } catch (err) {
        await db('mail_outbox').where({ id }).update({ status: 'failed', error: (err as Error).message.slice(0, 500) });
      }
      return id!;
    },
  };
}

function toMessage(r: DbOutboxRow): OutboxMessage {
  const atts = JSON.parse(r.attachments) as { filename: string; contentType: string; base64: string }[];
  return {
    id: r.id,
    to: r.to,
    subject: r.subject,
    text: r.text,
    html: r.html,
    attachments: atts.map((a) => ({ filename: a.filename, contentType: a.contentType, bytes: Buffer.from(a.base64, 'base64').length })),
    status: r.status,
    error: r.error,
    createdAt: r.created_at,
  };
}

export async function listOutbox(db: Knex, limit = 200): Promise<OutboxMessage[]> {
  const rows = await db<DbOutboxRow>('mail_outbox').orderBy('id', 'desc').limit(limit);
  return rows.map(toMessage);
}

export async function getOutboxMessage(db: Knex, id: number): Promise<OutboxMessage | null> {
  const r = await db<DbOutboxRow>('mail_outbox').where({ id }).first();
  return r ? toMessage(r) : null;
}

export async function getOutboxAttachment(db: Knex, id: number, index: number): Promise<MailAttachment | null> {
  const r = await db<DbOutboxRow>('mail_outbox').where({ id }).first();
  if (!r) return null;
  const a = (JSON.parse(r.attachments) as { filename: string; contentType: string; base64: string }[])[index];
  return a ? { filename: a.filename, contentType: a.contentType, content: Buffer.from(a.base64, 'base64') } : null;
}
