/**
 * Several instances on one PostgreSQL: two `server/main.ts` processes started together on one fresh
 * database. Runs only when TEST_DATABASE_URL names a PostgreSQL server (`.ci/run` does).
 */
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csrf, testDatabaseUrl } from '../helpers/app';
import { readEventStream, sessionCookie } from '../helpers/http';
import { freshDatabase, startInstance, type Instance } from '../helpers/instances-pg';
import { DEMO_PASSWORD, DEMO_PICKERS, DEMO_PIN, DEMO_USERS } from '../../server/seed/demo';
import { Board } from '../../shared/picking';
import type { Db } from '../../server/db/knex';
import { HOLD_FIRST_ATTEMPT_TEST_ENV } from '../../server/workers/jobs';

interface Pair {
  a: Instance;
  b: Instance;
  db: Db;
  drop: () => Promise<void>;
  siteId: number;
}

/**
 * Two instances started together on a fresh database (the test's own schema), and the site they share:
 * started before the block's tests with `env`, stopped after them. The answer is filled in once started.
 */
function pairForBlock(env: Record<string, string> = {}): Pair {
  const pair = {} as Pair;
  beforeAll(async () => {
    const fresh = await freshDatabase(testDatabaseUrl!);
    const [a, b] = await Promise.all([startInstance(fresh.url, env), startInstance(fresh.url, env)]);
    const siteId = (await fresh.db('sites').first<{ id: number }>('id'))!.id;
    Object.assign(pair, { a, b, db: fresh.db, drop: fresh.drop, siteId });
  }, 180_000);
  afterAll(async () => {
    await Promise.all([pair.a?.kill(), pair.b?.kill()]);
    await pair.drop?.();
  });
  return pair;
}

/** A supervisor's agent signed in on `url`. */
async function signedInSupervisor(url: string): Promise<ReturnType<typeof request.agent>> {
  const agent = request.agent(url);
  expect((await agent.post('/api/auth/sign-in').set(csrf).send({ email: DEMO_USERS[1].email, password: DEMO_PASSWORD })).status).toBe(200);
  return agent;
}

/** Starts a wave preview of the site's first eight open orders on the first cart profile; answers the job and the orders. */
async function startPreview(agent: ReturnType<typeof request.agent>, db: Db, siteId: number) {
  const orderIds: number[] = await db('orders').where({ site_id: siteId, status: 'open' }).orderBy('id').limit(8).pluck('id');
  const cartProfileId = (await db('cart_profiles').where({ site_id: siteId }).orderBy('id').first<{ id: number }>('id'))!.id;
  const started = await agent
    .post(`/api/sites/${siteId}/wave-previews`)
    .set(csrf)
    .send({ orderIds, cartProfileId, batching: 'savings', method: 'best', improve: 'local' });
  expect(started.status, JSON.stringify(started.body)).toBe(202);
  return { job: started.body, orderIds };
}

describe.skipIf(!testDatabaseUrl)('two instances on one PostgreSQL database', () => {
  // Started together: both run the migrations and the demo seed against the same empty database.
  const pair = pairForBlock();

  it('seeds the demo once and runs each migration once, though both started on an empty database', async () => {
    const { db } = pair;
    expect(Number((await db('sites').count({ n: '*' }))[0]!.n)).toBe(1);
    expect(Number((await db('users').count({ n: '*' }))[0]!.n)).toBe(DEMO_USERS.length + DEMO_PICKERS.length);
    const names = await db('knex_migrations').pluck('name');
    expect(new Set(names).size).toBe(names.length);
    expect(Number((await db('floor_plans').where({ state: 'active' }).count({ n: '*' }))[0]!.n)).toBe(1);
  });

  it('takes a session signed in on one instance as valid on the other', async () => {
    const { a, b } = pair;
    const onA = request.agent(a.url);
    const res = await onA.post('/api/auth/sign-in').set(csrf).send({ email: DEMO_USERS[1].email, password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    const me = await request(b.url).get('/api/auth/me').set('cookie', sessionCookie(res));
    expect(me.status).toBe(200);
    expect(me.body.email ?? me.body.user?.email).toBe(DEMO_USERS[1].email);
  });

  it('updates the live board on one instance after a confirmation made on the other', async () => {
    const { a, b, db, siteId } = pair;
    const supervisorA = await signedInSupervisor(a.url);
    // A wave planned and released on instance A.
    let { job } = await startPreview(supervisorA, db, siteId);
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
    const cookie = sessionCookie(await request(b.url).post('/api/auth/sign-in').set(csrf).send({ email: DEMO_USERS[1].email, password: DEMO_PASSWORD }));
    let confirmedAt = 0;
    let secondAt = 0;
    const { events } = await readEventStream({
      port: b.port,
      path: `/api/sites/${siteId}/board/events`,
      cookie,
      event: 'board',
      parse: (d) => Board.parse(d),
      timeoutMs: 10_000,
      onEvent: (got, fail) => {
        if (got.length === 1) {
          picker
            .post(`/api/picking/trips/${trip.id}/lines/${line.id}/confirm`)
            .set(csrf)
            .set('Idempotency-Key', `two-instances-${line.id}`)
            .send({ via: 'tap' })
            .then((r) => {
              confirmedAt = Date.now();
              if (r.status !== 200) fail(new Error(`confirm on A: ${r.status} ${JSON.stringify(r.body)}`));
            }, fail);
        }
        if (got.length === 2) secondAt = Date.now();
        return got.length === 2;
      },
    });
    const tripOf = (bd: Board) => bd.waves.flatMap((w) => w.trips).find((t) => t.id === trip.id)!;
    expect(tripOf(events[0]!).linesDone).toBe(0);
    expect(tripOf(events[1]!).linesDone).toBe(1);
    console.log(`board on B updated ${secondAt - confirmedAt} ms after the confirmation on A answered`);
  }, 120_000);
});

describe.skipIf(!testDatabaseUrl)('a wave preview whose instance dies on one PostgreSQL database', () => {
  // Test-only hold: a job's first attempt waits 10 minutes before planning, on whichever instance takes
  // it, so the test can stop that instance mid-job; the attempt after it plans at once.
  const pair = pairForBlock({ [HOLD_FIRST_ATTEMPT_TEST_ENV]: String(10 * 60_000) });

  it('finishes on the other instance a preview whose instance was killed mid-job', async () => {
    const { a, b, db, siteId } = pair;
    const supervisorA = await signedInSupervisor(a.url);
    const { job: started, orderIds } = await startPreview(supervisorA, db, siteId);
    const jobId = started.id;

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
    const supervisor = await signedInSupervisor(survivor.url);
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
