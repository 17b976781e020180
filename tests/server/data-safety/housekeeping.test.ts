/** Retention pruning, mail retries with back-off, integration tokens with expiry, and site exports. */
import * as XLSX from 'xlsx';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_RETENTION, PruneCounts, RetentionState } from '../../../shared/data-safety';
import { IntegrationToken, NewIntegrationToken, OutboxMessage } from '../../../shared/sites';
import { createMailer, MAIL_RETRY_DELAYS_MS } from '../../../server/mail/mailer';
import { csrf, makeTestApp, type TestApp } from '../../helpers/app';
import { binaryBody } from '../../helpers/http';

let t: TestApp;
let adminId: number;
beforeAll(async () => {
  t = await makeTestApp();
  adminId = (await t.deps.db('users').where({ role: 'admin' }).first<{ id: number }>('id'))!.id;
});
afterAll(() => t.close());

const DAY = 86_400_000;
const ago = (days: number, now = Date.now()) => new Date(now - days * DAY).toISOString();

describe('retention', () => {
  it('starts from the defaults and stores a change (audited)', async () => {
    const res = await t.as.admin.get('/api/admin/retention');
    expect(RetentionState.parse(res.body).settings).toEqual(DEFAULT_RETENTION);
    const put = await t.as.admin.put('/api/admin/retention').set(csrf).send({ auditDays: 400 });
    expect(put.status, JSON.stringify(put.body)).toBe(200);
    expect(RetentionState.parse(put.body).settings.auditDays).toBe(400);
    expect(await t.deps.db('audit_log').where({ action: 'retention.changed' })).toHaveLength(1);
    expect((await t.as.admin.put('/api/admin/retention').set(csrf).send({ auditDays: 0 })).status).toBe(400);
    expect((await t.as.supervisor.get('/api/admin/retention')).status).toBe(403);
  });

  it('prunes only what is older than each setting, keeps mail awaiting a retry, and audits the run', async () => {
    const db = t.deps.db;
    await db('audit_log').insert([
      { action: 'old.thing', at: ago(401) },
      { action: 'recent.thing', at: ago(399) },
    ]);
    const mail = (status: string, days: number) => ({
      to: 'a@b.test',
      subject: `${status} ${days}`,
      text: 'body',
      attachments: '[{"filename":"x.csv","contentType":"text/csv","base64":"eA=="}]',
      status,
      created_at: ago(days),
    });
    await db('mail_outbox').insert([mail('sent', 91), mail('failed', 91), mail('retrying', 91), mail('sent', 89)]);
    await db('invites').insert([
      { email: 'old@x.test', role: 'engineer', site_ids: '[]', token_hash: 'h1', expires_at: ago(31), created_at: ago(34) },
      { email: 'used@x.test', role: 'engineer', site_ids: '[]', token_hash: 'h2', expires_at: ago(-2), accepted_at: ago(31), created_at: ago(33) },
      { email: 'open@x.test', role: 'engineer', site_ids: '[]', token_hash: 'h3', expires_at: ago(-2), created_at: ago(1) },
    ]);
    await db('password_resets').insert([
      { user_id: adminId, token_hash: 'r1', expires_at: ago(40), created_at: ago(40) },
      { user_id: adminId, token_hash: 'r2', expires_at: ago(-1), created_at: ago(0) },
    ]);

    const res = await t.as.admin.post('/api/admin/retention/prune').set(csrf).send({});
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(PruneCounts.parse(res.body)).toEqual({ idempotencyAnswers: 0, outboxBodies: 2, invites: 2, passwordResets: 1, auditEntries: 1 });
    expect(await db('audit_log').where({ action: 'old.thing' })).toHaveLength(0);
    expect(await db('audit_log').where({ action: 'recent.thing' })).toHaveLength(1);
    const outbox = await db('mail_outbox').orderBy('id');
    expect(outbox.map((m: { status: string; text: string; attachments: string }) => [m.status, m.text, m.attachments])).toEqual([
      ['sent', '', '[]'],
      ['failed', '', '[]'],
      ['retrying', 'body', expect.stringContaining('x.csv')],
      ['sent', 'body', expect.stringContaining('x.csv')],
    ]);
    expect((await db('invites').select('email')).map((r: { email: string }) => r.email)).toEqual(['open@x.test']);
    const run = await db('audit_log').where({ action: 'retention.pruned' }).first<{ user_id: number; detail: string }>();
    expect(run?.user_id).toBe(adminId);
    expect(JSON.parse(run!.detail)).toMatchObject({ auditEntries: 1, outboxBodies: 2 });
    const state = RetentionState.parse((await t.as.admin.get('/api/admin/retention')).body);
    expect(state.lastRun?.counts.invites).toBe(2);
  });
});

describe('mail retries', () => {
  it('retries a failed send with back-off and shows it as failed after the last try', async () => {
    let fail = true;
    const sent: string[] = [];
    const transport = { sendMail: async (m: { subject: string }) => (fail ? Promise.reject(new Error('connection refused')) : (sent.push(m.subject), {})) };
    const mailer = createMailer(t.deps.db, { from: 'x@y.test', transport });
    const id = await mailer.send({ to: 'admin@demo.aislewright.test', subject: 'Retry me', text: 'hello' });
    let row = await t.deps.db('mail_outbox').where({ id }).first();
    expect(row).toMatchObject({ status: 'retrying', attempts: 1, error: 'connection refused' });
    const t0 = new Date(row.last_attempt_at).getTime();
    expect(new Date(row.next_attempt_at).getTime() - t0).toBe(MAIL_RETRY_DELAYS_MS[0]);
    // Not due yet: nothing happens.
    expect(await mailer.retryDue(new Date(t0 + MAIL_RETRY_DELAYS_MS[0]! - 1000))).toEqual({ sent: 0, retrying: 0, failed: 0 });
    // Each further try waits longer; after the last one the message is failed.
    let now = t0;
    for (let k = 1; k <= MAIL_RETRY_DELAYS_MS.length; k++) {
      now += MAIL_RETRY_DELAYS_MS[k - 1]!;
      const tally = await mailer.retryDue(new Date(now));
      row = await t.deps.db('mail_outbox').where({ id }).first();
      expect(row.attempts).toBe(k + 1);
      if (k < MAIL_RETRY_DELAYS_MS.length) {
        expect(tally.retrying).toBe(1);
        expect(new Date(row.next_attempt_at).getTime() - now).toBe(MAIL_RETRY_DELAYS_MS[k]);
      } else {
        expect(tally.failed).toBe(1);
        expect(row).toMatchObject({ status: 'failed', next_attempt_at: null });
      }
    }
    const shown = OutboxMessage.parse((await t.as.admin.get(`/api/mail/outbox/${id}`)).body);
    expect(shown).toMatchObject({ status: 'failed', attempts: MAIL_RETRY_DELAYS_MS.length + 1, error: 'connection refused' });

    // A message that fails once and then goes through ends as sent.
    const id2 = await mailer.send({
      to: 'admin@demo.aislewright.test',
      subject: 'Second',
      text: 'x',
      attachments: [{ filename: 'a.txt', contentType: 'text/plain', content: Buffer.from('a') }],
    });
    fail = false;
    await mailer.retryDue(new Date(Date.now() + MAIL_RETRY_DELAYS_MS[0]!));
    expect(await t.deps.db('mail_outbox').where({ id: id2 }).first()).toMatchObject({ status: 'sent', attempts: 2, error: null });
    expect(sent).toEqual(['Second']);
  });
});

describe('integration tokens', () => {
  it('creates with an expiry, lists who made it, and refuses the token once expired or revoked', async () => {
    const soon = new Date(Date.now() + 60 * 60_000).toISOString();
    const res = await t.as.admin.post(`/api/sites/${t.siteId}/integration-tokens`).set(csrf).send({ name: 'Host ERP', expiresAt: soon });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const made = NewIntegrationToken.parse(res.body);
    expect(made).toMatchObject({ name: 'Host ERP', expiresAt: soon, createdBy: 'Avery Admin', lastUsedAt: null });
    const push = () => t.anon.post(`/api/sites/${t.siteId}/orders/push`).set('authorization', `Bearer ${made.token}`).send({ orders: [] });
    expect((await push()).status).not.toBe(401);
    const list = IntegrationToken.array().parse((await t.as.admin.get(`/api/sites/${t.siteId}/integration-tokens`)).body);
    const listed = list.find((x) => x.id === made.id)!;
    expect(listed.lastUsedAt).not.toBeNull();
    expect(listed).not.toHaveProperty('token');
    await t.deps
      .db('integration_tokens')
      .where({ id: made.id })
      .update({ expires_at: ago(0.001) });
    expect((await push()).status).toBe(401);

    const past = await t.as.admin
      .post(`/api/sites/${t.siteId}/integration-tokens`)
      .set(csrf)
      .send({ name: 'Old', expiresAt: ago(1) });
    expect(past.status).toBe(400);
    expect(past.body.error.details[0].field).toBe('expiresAt');

    const forever = NewIntegrationToken.parse((await t.as.admin.post(`/api/sites/${t.siteId}/integration-tokens`).set(csrf).send({ name: 'No expiry' })).body);
    expect(forever.expiresAt).toBeNull();
    const revoke = await t.as.admin.delete(`/api/sites/${t.siteId}/integration-tokens/${forever.id}`).set(csrf);
    expect(IntegrationToken.parse(revoke.body).revokedAt).not.toBeNull();
    const refused = await t.anon.post(`/api/sites/${t.siteId}/orders/push`).set('authorization', `Bearer ${forever.token}`).send({ orders: [] });
    expect(refused.status).toBe(401);
  });
});

describe('site exports', () => {
  it('exports users and roles as CSV, with formula-like names made inert and no secrets', async () => {
    await t.deps.db('users').where({ role: 'engineer' }).update({ name: '@SUM(1+1)' });
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/exports/users?format=csv`).buffer(true);
    expect(res.status).toBe(200);
    expect(res.text).toContain("'@SUM(1+1)");
    expect(res.text).toContain('supervisor@demo.aislewright.test');
    expect(res.text).not.toMatch(/\$argon2/);
  });

  it('exports the site data as one workbook, a sheet per table, without hashes', async () => {
    const res = await t.as.admin.get(`/api/sites/${t.siteId}/exports/site-data`).buffer(true).parse(binaryBody);
    expect(res.status).toBe(200);
    const wb = XLSX.read(res.body as Buffer, { type: 'buffer' });
    expect(wb.SheetNames).toEqual(expect.arrayContaining(['sites', 'users', 'orders', 'order_lines', 'pick_lines', 'audit_log', 'integration_tokens']));
    const users = XLSX.utils.sheet_to_json<Record<string, unknown>>(wb.Sheets.users!);
    expect(users.length).toBeGreaterThan(3);
    expect(Object.keys(users[0]!)).not.toContain('password_hash');
    const tokens = XLSX.utils.sheet_to_json<Record<string, unknown>>(wb.Sheets.integration_tokens!);
    expect(tokens.length).toBeGreaterThan(0);
    expect(Object.keys(tokens[0]!)).not.toContain('token_hash');
    expect(await t.deps.db('audit_log').where({ action: 'export.downloaded', subject: 'site-data' })).toHaveLength(1);
  });

  it('refuses engineers and pickers', async () => {
    expect((await t.as.engineer.get(`/api/sites/${t.siteId}/exports/orders`)).status).toBe(403);
    expect((await t.as.picker.get(`/api/sites/${t.siteId}/exports/pick-lines`)).status).toBe(403);
  });
});
