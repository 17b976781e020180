/**
 * Several instances on one PostgreSQL: two `server/main.ts` processes started together on one fresh
 * database. Runs only when TEST_DATABASE_URL names a PostgreSQL server (`.ci/run` does).
 */
import http from 'node:http';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csrf, testDatabaseUrl } from '../helpers/app';
import { freshDatabase, startInstance, type Instance } from '../helpers/instances-pg';
import { DEMO_PASSWORD, DEMO_PICKERS, DEMO_PIN, DEMO_USERS } from '../../server/seed/demo';
import { SESSION_COOKIE } from '../../server/http/session';
import { Board } from '../../shared/picking';
import type { Db } from '../../server/db/knex';
import { HOLD_FIRST_ATTEMPT_TEST_ENV } from '../../server/workers/jobs';

/** Two instances started together on a fresh database (the test's own schema), and the site they share. */
async function startPair(env: Record<string, string> = {}): Promise<{ a: Instance; b: Instance; db: Db; drop: () => Promise<void>; siteId: number }> {
  const fresh = await freshDatabase(testDatabaseUrl!);
  const [a, b] = await Promise.all([startInstance(fresh.url, env), startInstance(fresh.url, env)]);
  const siteId = (await fresh.db('sites').first<{ id: number }>('id'))!.id;
  return { a, b, db: fresh.db, drop: fresh.drop, siteId };
}

async function stopPair(a: Instance | undefined, b: Instance | undefined, drop: (() => Promise<void>) | undefined): Promise<void> {
  await Promise.all([a?.kill(), b?.kill()]);
  await drop?.();
}

describe.skipIf(!testDatabaseUrl)('two instances on one PostgreSQL database', () => {
  let a: Instance;
  let b: Instance;
  let db: Db;
  let drop: () => Promise<void>;
  let siteId: number;

  beforeAll(async () => {
    // Started together: both run the migrations and the demo seed against the same empty database.
    ({ a, b, db, drop, siteId } = await startPair());
  }, 180_000);
  afterAll(() => stopPair(a, b, drop));

  it('seeds the demo once and runs each migration once, though both started on an empty database', async () => {
    expect(Number((await db('sites').count({ n: '*' }))[0]!.n)).toBe(1);
    expect(Number((await db('users').count({ n: '*' }))[0]!.n)).toBe(DEMO_USERS.length + DEMO_PICKERS.length);
    const names = await db('knex_migrations').pluck('name');
    expect(new Set(names).size).toBe(names.length);
    expect(Number((await db('floor_plans').where({ state: 'active' }).count({ n: '*' }))[0]!.n)).toBe(1);
  });

  it('takes a session signed in on one instance as valid on the other', async () => {
    const onA = request.agent(a.url);
    const res = await onA.post('/api/auth/sign-in').set(csrf).send({ email: DEMO_USERS[1].email, password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith(SESSION_COOKIE))!.split(';')[0]!;
    const me = await request(b.url).get('/api/auth/me').set('cookie', cookie);
    expect(me.status).toBe(200);
    expect(me.body.email ?? me.body.user?.email).toBe(DEMO_USERS[1].email);
  });

  it('updates the live board on one instance after a confirmation made on the other', async () => {
    const supervisorA = request.agent(a.url);
    expect((await supervisorA.post('/api/auth/sign-in').set(csrf).send({ email: DEMO_USERS[1].email, password: DEMO_PASSWORD })).status).toBe(200);
    // A wave planned and released on instance A.
    const orderIds = await db('orders').where({ site_id: siteId, status: 'open' }).orderBy('id').limit(8).pluck('id');
    const cartProfileId = (await db('cart_profiles').where({ site_id: siteId }).orderBy('id').first<{ id: number }>('id'))!.id;
    const started = await supervisorA
      .post(`/api/sites/${siteId}/wave-previews`)
      .set(csrf)
      .send({ orderIds, cartProfileId, batching: 'savings', method: 'best', improve: 'local' });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    let job = started.body;
    for (let i = 0; i < 600 && job.state === 'running'; i++) {
      await new Promise((r) => setTimeout(r, 100));
      job = (await supervisorA.get(`/api/sites/${siteId}/wave-previews/${job.id}`)).body;
    }
    expect(job.state, JSON.stringify(job.error)).toBe('done');
    const released = await supervisorA
      .post(`/api/sites/${siteId}/waves`)
      .set(csrf)
      .send({ previewId: job.id, releaseKey: `two-instances-${job.id}` });
    expect(released.status, JSON.stringify(released.body)).toBe(201);

    // The picker works on instance A.
    const picker = request.agent(a.url);
    expect((await picker.post('/api/auth/badge-sign-in').set(csrf).send({ badge: DEMO_PICKERS[0].badge, pin: DEMO_PIN })).status).toBe(200);
    const next = await picker.post(`/api/sites/${siteId}/picking/next`).set(csrf).send({});
    expect(next.status, JSON.stringify(next.body)).toBe(200);
    const trip = next.body.trip ?? next.body;
    const line = trip.stopList[0].lines[0];

    // The supervisor watches the board on instance B.
    const signIn = await request(b.url).post('/api/auth/sign-in').set(csrf).send({ email: DEMO_USERS[1].email, password: DEMO_PASSWORD });
    const cookie = (signIn.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith(SESSION_COOKIE))!.split(';')[0]!;
    const events: Board[] = [];
    let confirmedAt = 0;
    let secondAt = 0;
    const req = http.get({ host: '127.0.0.1', port: b.port, path: `/api/sites/${siteId}/board/events`, headers: { cookie, accept: 'text/event-stream' } });
    const got = new Promise<void>((resolve, reject) => {
      req.on('response', (res) => {
        let buf = '';
        res.on('data', (chunk: Buffer) => {
          buf += chunk.toString('utf8');
          let i;
          while ((i = buf.indexOf('\n\n')) >= 0) {
            const block = buf.slice(0, i);
            buf = buf.slice(i + 2);
            const data = block.split('\n').find((l) => l.startsWith('data: '));
            if (!block.includes('event: board') || !data) continue;
            events.push(Board.parse(JSON.parse(data.slice(6))));
            if (events.length === 1) {
              picker
                .post(`/api/picking/trips/${trip.id}/lines/${line.id}/confirm`)
                .set(csrf)
                .set('Idempotency-Key', `two-instances-${line.id}`)
                .send({ via: 'tap' })
                .then((r) => {
                  confirmedAt = Date.now();
                  if (r.status !== 200) reject(new Error(`confirm on A: ${r.status} ${JSON.stringify(r.body)}`));
                }, reject);
            }
            if (events.length === 2) {
              secondAt = Date.now();
              resolve();
            }
          }
        });
      });
      req.on('error', reject);
      setTimeout(() => reject(new Error(`no second board event on B in 10 s (got ${events.length})`)), 10_000);
    });
    try {
      await got;
    } finally {
      req.destroy();
    }
    const tripOf = (bd: Board) => bd.waves.flatMap((w) => w.trips).find((t) => t.id === trip.id)!;
    expect(tripOf(events[0]!).linesDone).toBe(0);
    expect(tripOf(events[1]!).linesDone).toBe(1);
    console.log(`board on B updated ${secondAt - confirmedAt} ms after the confirmation on A answered`);
  }, 120_000);
});

describe.skipIf(!testDatabaseUrl)('a wave preview whose instance dies on one PostgreSQL database', () => {
  let a: Instance;
  let b: Instance;
  let db: Db;
  let drop: () => Promise<void>;
  let siteId: number;

  beforeAll(async () => {
    // Test-only hold: a job's first attempt waits 10 minutes before planning, on whichever instance takes
    // it, so the test can stop that instance mid-job; the attempt after it plans at once.
    ({ a, b, db, drop, siteId } = await startPair({ [HOLD_FIRST_ATTEMPT_TEST_ENV]: String(10 * 60_000) }));
  }, 180_000);
  afterAll(() => stopPair(a, b, drop));

  it('finishes on the other instance a preview whose instance was killed mid-job', async () => {
    const supervisorA = request.agent(a.url);
    expect((await supervisorA.post('/api/auth/sign-in').set(csrf).send({ email: DEMO_USERS[1].email, password: DEMO_PASSWORD })).status).toBe(200);
    const orderIds = await db('orders').where({ site_id: siteId, status: 'open' }).orderBy('id').limit(8).pluck('id');
    const cartProfileId = (await db('cart_profiles').where({ site_id: siteId }).orderBy('id').first<{ id: number }>('id'))!.id;
    const started = await supervisorA
      .post(`/api/sites/${siteId}/wave-previews`)
      .set(csrf)
      .send({ orderIds, cartProfileId, batching: 'savings', method: 'best', improve: 'local' });
    expect(started.status, JSON.stringify(started.body)).toBe(202);
    const jobId: string = started.body.id;

    // Whichever instance took the job is named on its row (host:pid:…); wait until one holds it.
    let holder: string | null = null;
    for (let i = 0; i < 300 && !holder; i++) {
      const row = await db('background_jobs').where({ id: jobId }).first<{ state: string; instance: string | null }>();
      if (row?.state === 'running' && row.instance) holder = row.instance;
      else await new Promise((r) => setTimeout(r, 100));
    }
    expect(holder, 'no instance took the preview within 30 s').not.toBeNull();
    const pidOf = (inst: Instance) => inst.child.pid;
    const victim = [a, b].find((inst) => holder!.split(':')[1] === String(pidOf(inst)))!;
    const survivor = victim === a ? b : a;
    expect(victim, `holder ${holder} is neither instance`).toBeDefined();

    // Killed without any chance to finish or hand the job back.
    await victim.kill('SIGKILL');
    const killedAt = Date.now();

    // The supervisor polls the survivor (a session is valid on every instance).
    const supervisor = request.agent(survivor.url);
    expect((await supervisor.post('/api/auth/sign-in').set(csrf).send({ email: DEMO_USERS[1].email, password: DEMO_PASSWORD })).status).toBe(200);
    let job = (await supervisor.get(`/api/sites/${siteId}/wave-previews/${jobId}`)).body;
    expect(job.id).toBe(jobId);
    for (let i = 0; i < 900 && job.state === 'running'; i++) {
      await new Promise((r) => setTimeout(r, 100));
      job = (await supervisor.get(`/api/sites/${siteId}/wave-previews/${jobId}`)).body;
    }
    expect(job.state, JSON.stringify(job.error)).toBe('done');
    expect(job.preview.totals.orders).toBe(orderIds.length);
    const row = await db('background_jobs').where({ id: jobId }).first<{ instance: string; attempt: number }>();
    expect(row!.instance).not.toBe(holder);
    expect(row!.attempt).toBeGreaterThanOrEqual(1);
    console.log(`preview finished on the survivor ${Date.now() - killedAt} ms after its first instance was killed`);

    // And the preview taken over is released like any other.
    const released = await supervisor
      .post(`/api/sites/${siteId}/waves`)
      .set(csrf)
      .send({ previewId: jobId, releaseKey: `take-over-${jobId}` });
    expect(released.status, JSON.stringify(released.body)).toBe(201);
    expect(released.body.orders).toBe(orderIds.length);
  }, 180_000);
});
