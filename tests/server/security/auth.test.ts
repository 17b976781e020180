/**
 * Security spec for sign-in, sessions, password resets and data at rest: each probe is an attack a
 * hostile or careless client can run from one address. Work is compared by counting (hash checks,
 * queries, mails), never by timing; the timings live in tests/bench/auth.bench.ts.
 */
import { mkdtempSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest';
import request from 'supertest';
import jwt from 'jsonwebtoken';
import type { Knex } from 'knex';
import { createApp } from '../../../server/app';
import type { Hasher } from '../../../server/auth/hasher';
import { migrationSource } from '../../../server/db/migration-source';
import { openDb } from '../../../server/db/knex';
import { SESSION_COOKIE } from '../../../server/http/session';
import type { Background } from '../../../server/system/background';
import { DEMO_PASSWORD, DEMO_PIN } from '../../../server/seed/demo';
import { csrf, makeTestApp, type TestApp } from '../../helpers/app';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());
// Each probe starts with no sign-in state left by another.
beforeEach(async () => {
  await t.deps.db('auth_throttle').delete();
});

/**
 * Wraps the app's hasher: counts secret checks, and holds each check until `release()` so a burst
 * can be inspected while its requests are still in flight.
 */
function gatedHasher(real: Hasher) {
  let open!: () => void;
  let gate = new Promise<void>((r) => (open = r));
  const s = { checks: 0, waiting: 0 };
  const hold = async <T>(task: () => Promise<T>) => {
    s.checks += 1;
    s.waiting += 1;
    await gate;
    s.waiting -= 1;
    return task();
  };
  const hasher: Hasher = {
    hash: real.hash,
    verify: (h, secret) => hold(() => real.verify(h, secret)),
    dummyVerify: (secret) => hold(() => real.dummyVerify(secret)),
  };
  return {
    hasher,
    stats: s,
    release: () => open(),
    reset: () => {
      gate = new Promise<void>((r) => (open = r));
      s.checks = 0;
    },
  };
}

const cookieOf = (res: request.Response) =>
  ([] as string[])
    .concat(res.headers['set-cookie'] ?? [])
    .find((c) => c.startsWith(`${SESSION_COOKIE}=`))
    ?.split(';')[0];

async function withGatedHasher<T>(run: (g: ReturnType<typeof gatedHasher>) => Promise<T>): Promise<T> {
  const real = t.deps.hasher;
  const g = gatedHasher(real);
  t.deps.hasher = g.hasher;
  try {
    return await run(g);
  } finally {
    g.release();
    t.deps.hasher = real;
  }
}

/**
 * Fires `n` wrong guesses at once, waits until every one is either answered or held inside a hash
 * check, then sends the right secret while the burst is still in flight.
 */
async function burst(path: string, wrong: (i: number) => object, right: object) {
  return withGatedHasher(async (g) => {
    const answered: request.Response[] = [];
    const pending = Array.from({ length: 39 }, (_v, i) =>
      request(t.app)
        .post(path)
        .set(csrf)
        .send(wrong(i))
        .then((r) => void answered.push(r)),
    );
    await vi.waitFor(() => expect(answered.length + g.stats.waiting).toBe(39), { timeout: 20_000, interval: 20 });
    const rightAnswer = request(t.app).post(path).set(csrf).send(right);
    // Let the right guess reach the server (and its hash check, if it gets one) before releasing.
    await vi.waitFor(() => expect(answered.length + g.stats.waiting).toBeGreaterThanOrEqual(40), { timeout: 5_000, interval: 20 }).catch(() => undefined);
    const checksInBurst = g.stats.checks;
    g.release();
    await Promise.all(pending);
    return { answers: answered, right: await rightAnswer, checksInBurst };
  });
}

describe('parallel guessing (issue 11, item 1)', () => {
  it('checks at most 6 PINs of a 40-guess burst on one badge, and refuses the right PIN inside it with 429 and Retry-After', async () => {
    const { answers, right, checksInBurst } = await burst('/api/auth/badge-sign-in', (i) => ({ badge: 'P-1003', pin: String(100000 + i) }), {
      badge: 'P-1003',
      pin: DEMO_PIN,
    });
    expect(checksInBurst).toBeLessThanOrEqual(6);
    const codes = answers.map((r) => r.status);
    expect(codes.filter((c) => c === 401).length).toBe(6);
    expect(codes.filter((c) => c === 429).length).toBe(33);
    expect(right.status).toBe(429);
    expect(Number(right.headers['retry-after'])).toBeGreaterThan(0);
    expect(cookieOf(right)).toBeUndefined();
  });

  it('does the same for password sign-in', async () => {
    const email = 'engineer@demo.aislewright.test';
    const { answers, right, checksInBurst } = await burst('/api/auth/sign-in', (i) => ({ email, password: `wrong-password-${i}` }), {
      email,
      password: DEMO_PASSWORD,
    });
    expect(checksInBurst).toBeLessThanOrEqual(6);
    expect(answers.filter((r) => r.status === 200)).toEqual([]);
    expect(right.status).toBe(429);
    expect(right.headers['retry-after']).toBeDefined();
  });

  it('counts a badge typed in any case against the same back-off', async () => {
    await withGatedHasher(async (g) => {
      g.release();
      for (let i = 0; i < 6; i++) {
        const badge = i % 2 ? 'p-1002' : ' P-1002 ';
        expect((await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge, pin: '000000' })).status).toBe(401);
      }
      expect((await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'p-1002', pin: DEMO_PIN })).status).toBe(429);
      expect(g.stats.checks).toBe(6);
    });
  });

  it('keeps the back-off in the database: a burst split over two app instances still checks at most 6', async () => {
    const second = createApp(t.deps);
    await withGatedHasher(async (g) => {
      const all = Array.from({ length: 40 }, (_v, i) =>
        request(i % 2 ? second : t.app)
          .post('/api/auth/badge-sign-in')
          .set(csrf)
          .send({ badge: 'P-1001', pin: String(200000 + i) })
          .then((r) => r),
      );
      await vi.waitFor(() => expect(g.stats.waiting).toBeGreaterThan(0), { timeout: 10_000, interval: 20 });
      g.release();
      const codes = (await Promise.all(all)).map((r) => r.status);
      expect(g.stats.checks).toBe(6);
      expect(codes.filter((c) => c === 429).length).toBe(34);
    });
  });
});

describe('malformed flood (issue 11, item 2)', () => {
  it('lets real sign-ins through after 1,100 malformed sign-ins from the same address', async () => {
    const codes = new Map<number, number>();
    for (let i = 0; i < 1100; i += 50) {
      const batch = await Promise.all(Array.from({ length: 50 }, () => request(t.app).post('/api/auth/sign-in').set(csrf).send({})));
      for (const r of batch) codes.set(r.status, (codes.get(r.status) ?? 0) + 1);
    }
    // The raw flood guard still answers the garbage…
    expect(codes.get(429)).toBeGreaterThan(0);
    // …but no account was charged, and a real user behind the same address signs in.
    expect(await t.deps.db('auth_throttle').where('key', 'like', 'acct:%').count({ n: '*' }).first()).toEqual({ n: 0 });
    const ok = await request(t.app).post('/api/auth/sign-in').set(csrf).send({ email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD });
    expect(ok.status).toBe(200);
    const tablet = await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'P-1002', pin: DEMO_PIN });
    expect(tablet.status).toBe(200);
  });

  it('limits guesses per account, so a noisy address does not lock out other accounts behind it', async () => {
    for (let i = 0; i < 12; i++) await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'P-1003', pin: '111111' });
    expect((await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'P-1003', pin: DEMO_PIN })).status).toBe(429);
    expect((await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'P-1001', pin: DEMO_PIN })).status).toBe(200);
  });
});

describe('sign-out (issue 11, item 3)', () => {
  const signIn = async (body: object, path = '/api/auth/sign-in') => {
    const res = await request(t.app).post(path).set(csrf).send(body);
    expect(res.status).toBe(200);
    return cookieOf(res)!;
  };
  const me = (cookie: string) => request(t.app).get('/api/auth/me').set('Cookie', cookie);

  it('ends the session on the server: the old cookie reads nothing and is not renewed', async () => {
    const cookie = await signIn({ email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD });
    expect((await me(cookie)).status).toBe(200);
    expect((await request(t.app).post('/api/auth/sign-out').set(csrf).set('Cookie', cookie)).status).toBe(200);
    const after = await me(cookie);
    expect(after.status).toBe(401);
    expect(cookieOf(after)).toBeUndefined();
    expect((await request(t.app).get(`/api/sites/${t.siteId}`).set('Cookie', cookie)).status).toBe(401);
    // A token of that session about to expire (the renewal case) is refused as well, with no new cookie.
    const claims = jwt.decode(cookie.split('=')[1]!) as { sub: string; ver: number; auth: number; sid: string };
    const nearEnd = jwt.sign({ ver: claims.ver, auth: claims.auth, sid: claims.sid }, t.deps.jwtSecret, {
      algorithm: 'HS256',
      subject: claims.sub,
      issuer: 'aislewright',
      audience: 'aislewright-app',
      expiresIn: 60,
    });
    const renew = await me(`${SESSION_COOKIE}=${nearEnd}`);
    expect(renew.status).toBe(401);
    expect(cookieOf(renew)).toBeUndefined();
    expect(await t.deps.db('audit_log').where({ action: 'sign-out' }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });

  it('forgets sessions past the shift limit at the next sign-in', async () => {
    const userId = (await t.deps.db('users').where({ role: 'engineer' }).first()).id;
    const old = Math.floor(Date.now() / 1000) - 11 * 3600;
    await t.deps.db('sessions').insert({ id: 'stale-session', user_id: userId, auth_time: old, created_at: new Date(old * 1000).toISOString() });
    await signIn({ email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD });
    expect(await t.deps.db('sessions').where({ id: 'stale-session' }).first()).toBeUndefined();
  });

  it('holds on another app instance sharing the database', async () => {
    const second = createApp(t.deps);
    const cookie = await signIn({ email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD });
    expect((await request(second).get('/api/auth/me').set('Cookie', cookie)).status).toBe(200);
    await request(t.app).post('/api/auth/sign-out').set(csrf).set('Cookie', cookie);
    expect((await request(second).get('/api/auth/me').set('Cookie', cookie)).status).toBe(401);
  });

  it('signs a user out everywhere, audited', async () => {
    const a = await signIn({ email: 'engineer@demo.aislewright.test', password: DEMO_PASSWORD });
    const b = await signIn({ email: 'engineer@demo.aislewright.test', password: DEMO_PASSWORD });
    const other = await signIn({ email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD });
    const res = await request(t.app).post('/api/auth/sign-out-everywhere').set(csrf).set('Cookie', a);
    expect(res.status).toBe(200);
    expect(res.body.ended).toBeGreaterThanOrEqual(2);
    expect((await me(a)).status).toBe(401);
    expect((await me(b)).status).toBe(401);
    expect((await me(other)).status).toBe(200);
    expect(await t.deps.db('audit_log').where({ action: 'sign-out.everywhere' }).count({ n: '*' }).first()).toEqual({ n: 1 });
  });

  it("lets an admin end a user's sessions, audited; other roles may not", async () => {
    const tablet1 = await signIn({ badge: 'P-1002', pin: DEMO_PIN }, '/api/auth/badge-sign-in');
    const tablet2 = await signIn({ badge: 'p-1002', pin: DEMO_PIN }, '/api/auth/badge-sign-in');
    const id = (await t.as.admin.get('/api/users')).body.find((u: { badge: string }) => u.badge === 'P-1002').id;
    expect((await t.as.supervisor.post(`/api/users/${id}/end-sessions`).set(csrf)).status).toBe(403);
    const res = await t.as.admin.post(`/api/users/${id}/end-sessions`).set(csrf);
    expect(res.status).toBe(200);
    expect(res.body.ended).toBeGreaterThanOrEqual(2);
    expect((await me(tablet1)).status).toBe(401);
    expect((await me(tablet2)).status).toBe(401);
    expect((await t.as.admin.post('/api/users/999999/end-sessions').set(csrf)).status).toBe(404);
    const entry = await t.deps.db('audit_log').where({ action: 'user.sessions-ended' }).first();
    expect(entry.subject).toBe(String(id));
    // The admin's own session is untouched.
    expect((await t.as.admin.get('/api/auth/me')).status).toBe(200);
    t.as.picker2 = request.agent(t.app);
  });
});

/** Queues background tasks instead of running them, so the request path can be looked at alone. */
function heldBackground() {
  const tasks: (() => Promise<void>)[] = [];
  const bg: Background = { run: (_name, task) => void tasks.push(task), settled: async () => undefined };
  return {
    bg,
    tasks,
    runAll: async () => {
      for (const task of tasks.splice(0)) await task();
    },
  };
}

describe('password reset requests (issue 11, item 4)', () => {
  async function requestPathOf(email: string) {
    const real = t.deps.background;
    const held = heldBackground();
    t.deps.background = held.bg;
    const sql: string[] = [];
    const onQuery = (q: { sql: string }) => void sql.push(q.sql);
    const mailsBefore = Number((await t.deps.db('mail_outbox').count({ n: '*' }).first())!.n);
    t.deps.db.on('query', onQuery);
    let res: request.Response;
    try {
      res = await request(t.app).post('/api/auth/reset-request').set(csrf).send({ email });
    } finally {
      t.deps.db.removeListener('query', onQuery);
      t.deps.background = real;
    }
    const mailsAnswered = Number((await t.deps.db('mail_outbox').count({ n: '*' }).first())!.n) - mailsBefore;
    await held.runAll();
    const mailsAfter = Number((await t.deps.db('mail_outbox').count({ n: '*' }).first())!.n) - mailsBefore;
    return { res, sql, mailsAnswered, mailsAfter };
  }

  it('does the same database work for a known and an unknown address, and mails only after answering', async () => {
    const known = await requestPathOf('engineer@demo.aislewright.test');
    const unknown = await requestPathOf('nobody-here@demo.aislewright.test');
    expect(known.res.status).toBe(200);
    expect(unknown.res.body).toEqual(known.res.body);
    expect(known.sql.length).toBeGreaterThan(0);
    expect(unknown.sql).toEqual(known.sql);
    expect([known.mailsAnswered, unknown.mailsAnswered]).toEqual([0, 0]);
    expect([known.mailsAfter, unknown.mailsAfter]).toEqual([1, 0]);
  });

  it('mails at most 3 reset links per address per hour, answering known and unknown alike', async () => {
    for (const email of ['admin@demo.aislewright.test', 'nobody-else@demo.aislewright.test']) {
      for (let i = 0; i < 3; i++) expect((await request(t.app).post('/api/auth/reset-request').set(csrf).send({ email })).status).toBe(200);
      const fourth = await request(t.app).post('/api/auth/reset-request').set(csrf).send({ email });
      expect(fourth.status).toBe(429);
      expect(fourth.body.error.code).toBe('too_many_resets');
      expect(Number(fourth.headers['retry-after'])).toBeGreaterThan(3000);
    }
    await t.deps.background.settled();
    expect(await t.deps.db('mail_outbox').where({ to: 'admin@demo.aislewright.test' }).count({ n: '*' }).first()).toEqual({ n: 3 });
  });
});

describe('privacy at rest (issue 11, item 8)', () => {
  it('creates the database folder 0700 and the file, -wal and -shm 0600', async () => {
    const dir = join(mkdtempSync(join(tmpdir(), 'aw-perm-')), 'data');
    const file = join(dir, 'aislewright.sqlite');
    const db = openDb(file);
    await db.schema.createTable('x', (tb) => tb.integer('a'));
    await db('x').insert({ a: 1 });
    const mode = (p: string) => (statSync(p).mode & 0o777).toString(8);
    expect(mode(dir)).toBe('700');
    expect(mode(file)).toBe('600');
    expect(mode(`${file}-wal`)).toBe('600');
    expect(mode(`${file}-shm`)).toBe('600');
    await db.destroy();
  });

  it('sends Cache-Control: no-store on API answers, errors included', async () => {
    expect((await t.as.admin.get('/api/auth/me')).headers['cache-control']).toBe('no-store');
    expect((await t.anon.get('/api/auth/me')).headers['cache-control']).toBe('no-store');
    expect((await t.anon.get('/api/nope')).headers['cache-control']).toBe('no-store');
    const bad = await request(t.app).post('/api/auth/sign-in').set(csrf).set('content-type', 'application/json').send('{');
    expect(bad.status).toBe(400);
    expect(bad.headers['cache-control']).toBe('no-store');
  });

  const tokenIn = (text: string) => /token=([\w-]+)/.exec(text)?.[1];

  it('removes an invitation link from the outbox once it is used', async () => {
    await t.as.admin
      .post('/api/users/invites')
      .set(csrf)
      .send({ email: 'one.time@demo.aislewright.test', role: 'engineer', siteIds: [t.siteId] });
    const mail = (await t.as.admin.get('/api/mail/outbox')).body.find((m: { to: string }) => m.to === 'one.time@demo.aislewright.test');
    expect(mail.linkState).toBe('live');
    const token = tokenIn(mail.text)!;
    expect((await request(t.app).post('/api/auth/invites/accept').set(csrf).send({ token, name: 'One Time', password: 'a-long-password' })).status).toBe(201);
    const after = (await t.as.admin.get(`/api/mail/outbox/${mail.id}`)).body;
    expect(after.linkState).toBe('used');
    expect(after.text).not.toContain(token);
    expect(after.text).toContain('[link used');
    // Gone at rest too, not only on screen.
    expect(JSON.stringify(await t.deps.db('mail_outbox').where({ id: mail.id }).first())).not.toContain(token);
  });

  it('removes a reset link once used, and an expired one once its token expires', async () => {
    await request(t.app).post('/api/auth/reset-request').set(csrf).send({ email: 'supervisor@demo.aislewright.test' });
    await request(t.app).post('/api/auth/reset-request').set(csrf).send({ email: 'supervisor@demo.aislewright.test' });
    await t.deps.background.settled();
    const mails = (await t.as.admin.get('/api/mail/outbox')).body.filter(
      (m: { to: string; subject: string }) => m.to === 'supervisor@demo.aislewright.test' && /Reset/.test(m.subject),
    );
    expect(mails.length).toBe(2);
    const [newer, older] = mails;
    // The older link expires.
    const olderToken = tokenIn(older.text)!;
    const past = new Date(Date.now() - 1000).toISOString();
    await t.deps.db('mail_outbox').where({ id: older.id }).update({ link_expires_at: past });
    const expired = (await t.as.admin.get(`/api/mail/outbox/${older.id}`)).body;
    expect(expired.linkState).toBe('expired');
    expect(expired.text).not.toContain(olderToken);
    // The newer one is used.
    const token = tokenIn(newer.text)!;
    expect((await request(t.app).post('/api/auth/reset').set(csrf).send({ token, newPassword: 'a-brand-new-password' })).status).toBe(200);
    const used = (await t.as.admin.get(`/api/mail/outbox/${newer.id}`)).body;
    expect(used.linkState).toBe('used');
    expect(used.text).not.toContain(token);
    t.as.supervisor = request.agent(t.app);
  });
});

describe('badge codes (issue 10, item 7)', () => {
  it('signs a picker in whatever the case or padding of the typed badge', async () => {
    for (const badge of ['p-1001', ' P-1001 ', 'P-1001']) {
      expect((await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge, pin: DEMO_PIN })).status).toBe(200);
    }
  });

  it('stores new badges normalised and refuses one that differs only in case', async () => {
    const created = await t.as.admin
      .post('/api/users/pickers')
      .set(csrf)
      .send({ name: 'Case Picker', badge: ' p-3001 ', pin: '135790', siteIds: [t.siteId] });
    expect(created.status).toBe(201);
    expect(created.body.badge).toBe('P-3001');
    const twin = await t.as.admin
      .post('/api/users/pickers')
      .set(csrf)
      .send({ name: 'Twin', badge: 'P-3001', pin: '135790', siteIds: [t.siteId] });
    expect(twin.status).toBe(409);
    expect((await request(t.app).post('/api/auth/badge-sign-in').set(csrf).send({ badge: 'p-3001', pin: '135790' })).status).toBe(200);
  });

  it('normalises existing badges in the migration, keeping both accounts when two differ only in case', async () => {
    const db: Knex = openDb(':memory:');
    const all = await migrationSource.getMigrations([]);
    const mine = all.findIndex((m) => m.startsWith('20261205040000'));
    for (let i = 0; i < mine; i++) await db.migrate.up({ migrationSource });
    const now = new Date().toISOString();
    await db('users').insert([
      { name: 'A', badge: 'p-9', role: 'picker', created_at: now },
      { name: 'B', badge: 'P-9', role: 'picker', created_at: now },
      { name: 'C', badge: ' q-7', role: 'picker', created_at: now },
    ]);
    await db.migrate.latest({ migrationSource });
    const badges = await db('users').orderBy('id').pluck('badge');
    expect(badges[0]).toBe('P-9');
    expect(badges[1]).toMatch(/^P-9-DUPLICATE-\d+$/);
    expect(badges[2]).toBe('Q-7');
    expect(await db('audit_log').where({ action: 'badge.renamed' }).count({ n: '*' }).first()).toEqual({ n: 1 });
    await db.destroy();
  });
});
