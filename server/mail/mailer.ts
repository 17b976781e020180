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
  /** The single-use token the mail's link carries: the outbox hides the link once it is used or expired. */
  link?: { tokenHash: string; expiresAt: string };
}

export interface Mailer {
  /** Stores the message in the outbox, and sends it when SMTP is configured. Returns the outbox id. */
  send(message: MailMessage): Promise<number>;
  /** Tries again every message whose next try is due; returns how each ended. */
  retryDue(now?: Date): Promise<{ sent: number; retrying: number; failed: number }>;
}

/**
 * Waits before each further try after a failed send: 1 min, 5 min, 30 min, 2 h, 8 h (common practice
 * for mail queues: growing back-off over hours, from memory). After the last try the message is failed.
 */
export const MAIL_RETRY_DELAYS_MS: readonly number[] = [60_000, 5 * 60_000, 30 * 60_000, 2 * 3_600_000, 8 * 3_600_000];

interface DbOutboxRow {
  id: number;
  site_id: number | null;
  to: string;
  subject: string;
  text: string;
  html: string | null;
  attachments: string;
  status: 'stored' | 'sent' | 'retrying' | 'failed';
  error: string | null;
  created_at: string;
  link_token_hash: string | null;
  link_expires_at: string | null;
  link_closed_at: string | null;
  attempts: number;
  next_attempt_at: string | null;
  last_attempt_at: string | null;
  pruned_at: string | null;
}

interface Transport {
  sendMail(mail: object): Promise<unknown>;
}

export interface MailerOptions {
  smtpUrl?: string | undefined;
  from: string;
  /** Another transport (tests); counts as really sending, like SMTP. */
  transport?: Transport;
  retryDelaysMs?: readonly number[];
}

/**
 * All mail goes through nodemailer. Without SMTP_URL the transport is nodemailer's JSON transport (the
 * message is composed, not sent) and the outbox table is the local stand-in for a mail service.
 * A send that fails is tried again with back-off (MAIL_RETRY_DELAYS_MS) by `retryDue`, which the
 * server runs every minute; after the last try the message shows as failed in the outbox.
 */
export function createMailer(db: Knex, options: MailerOptions): Mailer {
  const transport: Transport =
    options.transport ?? (options.smtpUrl ? nodemailer.createTransport(options.smtpUrl) : nodemailer.createTransport({ jsonTransport: true }));
  const delivers = Boolean(options.transport ?? options.smtpUrl);
  const delays = options.retryDelaysMs ?? MAIL_RETRY_DELAYS_MS;

  async function attempt(row: DbOutboxRow, now: Date): Promise<DbOutboxRow['status']> {
    const atts = JSON.parse(row.attachments) as { filename: string; contentType: string; base64: string }[];
    const attempts = row.attempts + 1;
    try {
      await transport.sendMail({
        from: options.from,
        to: row.to,
        subject: row.subject,
        text: row.text,
        ...(row.html ? { html: row.html } : {}),
        attachments: atts.map((a) => ({ filename: a.filename, contentType: a.contentType, content: Buffer.from(a.base64, 'base64') })),
      });
      const status = delivers ? 'sent' : 'stored';
      await db('mail_outbox').where({ id: row.id }).update({ status, attempts, error: null, next_attempt_at: null, last_attempt_at: now.toISOString() });
      return status;
    } catch (err) {
      const delay = delays[attempts - 1];
      const status = delay === undefined ? 'failed' : 'retrying';
      await db('mail_outbox')
        .where({ id: row.id })
        .update({
          status,
          attempts,
          error: (err as Error).message.slice(0, 500),
          last_attempt_at: now.toISOString(),
          next_attempt_at: delay === undefined ? null : new Date(now.getTime() + delay).toISOString(),
        });
      return status;
    }
  }

  return {
    async send(m) {
      const attachments = (m.attachments ?? []).map((a) => ({ filename: a.filename, contentType: a.contentType, base64: a.content.toString('base64') }));
      const [{ id }] = await db('mail_outbox').insert(
        {
          site_id: m.siteId ?? null,
          to: m.to,
          subject: m.subject,
          text: m.text,
          html: m.html ?? null,
          attachments: JSON.stringify(attachments),
          status: 'stored',
          created_at: new Date().toISOString(),
          link_token_hash: m.link?.tokenHash ?? null,
          link_expires_at: m.link?.expiresAt ?? null,
        },
        'id',
      );
      await attempt((await db<DbOutboxRow>('mail_outbox').where({ id: id! }).first())!, new Date());
      return id!;
    },
    async retryDue(now = new Date()) {
      const due = await db<DbOutboxRow>('mail_outbox').where({ status: 'retrying' }).where('next_attempt_at', '<=', now.toISOString()).orderBy('id').limit(100);
      const tally = { sent: 0, retrying: 0, failed: 0 };
      for (const row of due) {
        const status = await attempt(row, now);
        if (status === 'failed') tally.failed++;
        else if (status === 'retrying') tally.retrying++;
        else tally.sent++;
      }
      return tally;
    },
  };
}

/** A link that carries a single-use token (`…?token=…`). */
const TOKEN_LINK = /https?:\/\/[^\s<>"']*[?&]token=[\w-]+/g;

/** Replaces every token link of a mail with a note; the token itself is gone from the text. */
export function maskTokenLinks(text: string, why: 'used' | 'expired'): string {
  return text.replace(TOKEN_LINK, `[link ${why} — no longer shown]`);
}

/**
 * Removes the links of used tokens from the stored mail (at rest, not only on screen). Called when a
 * reset link or an invitation is used; expired links are closed when the outbox is read.
 */
export async function closeOutboxLinks(db: Knex, tokenHashes: string[], why: 'used' | 'expired'): Promise<void> {
  if (tokenHashes.length === 0) return;
  const rows = await db<DbOutboxRow>('mail_outbox').whereIn('link_token_hash', tokenHashes).whereNull('link_closed_at');
  for (const r of rows) {
    await db('mail_outbox')
      .where({ id: r.id })
      .update({
        text: maskTokenLinks(r.text, why),
        html: r.html === null ? null : maskTokenLinks(r.html, why),
        link_closed_at: new Date().toISOString(),
      });
  }
}

async function closeExpiredLinks(db: Knex): Promise<void> {
  const expired = await db<DbOutboxRow>('mail_outbox')
    .whereNotNull('link_token_hash')
    .whereNull('link_closed_at')
    .where('link_expires_at', '<', new Date().toISOString())
    .pluck('link_token_hash');
  await closeOutboxLinks(db, expired as string[], 'expired');
}

function linkStateOf(r: DbOutboxRow): OutboxMessage['linkState'] {
  if (r.link_token_hash === null) return null;
  if (r.link_closed_at !== null) return /\[link used/.test(r.text) ? 'used' : 'expired';
  return r.link_expires_at !== null && r.link_expires_at < new Date().toISOString() ? 'expired' : 'live';
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
    linkState: linkStateOf(r),
    attempts: r.attempts,
    nextAttemptAt: r.next_attempt_at,
    prunedAt: r.pruned_at,
  };
}

export async function listOutbox(db: Knex, limit = 200): Promise<OutboxMessage[]> {
  await closeExpiredLinks(db);
  const rows = await db<DbOutboxRow>('mail_outbox').orderBy('id', 'desc').limit(limit);
  return rows.map(toMessage);
}

export async function getOutboxMessage(db: Knex, id: number): Promise<OutboxMessage | null> {
  await closeExpiredLinks(db);
  const r = await db<DbOutboxRow>('mail_outbox').where({ id }).first();
  return r ? toMessage(r) : null;
}

export async function getOutboxAttachment(db: Knex, id: number, index: number): Promise<MailAttachment | null> {
  const r = await db<DbOutboxRow>('mail_outbox').where({ id }).first();
  if (!r) return null;
  const a = (JSON.parse(r.attachments) as { filename: string; contentType: string; base64: string }[])[index];
  return a ? { filename: a.filename, contentType: a.contentType, content: Buffer.from(a.base64, 'base64') } : null;
}
