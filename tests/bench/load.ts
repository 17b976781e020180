/**
 * `npm run load`: tablets against the real server on loopback (autocannon), bounded in count and time.
 *
 * 100 simulated tablets, one connection and one signed-in picker each, confirm lines of their own
 * trip and poll it (5 confirmations : 2 polls at autocannon's per-connection pacing of 1 request/s,
 * i.e. 1.4× the spec's "a confirmation every 2 s and a poll every 5 s"), for 60 s. Then the same
 * again while a 300-order wave is planned, one preview after another, through the supervisor API.
 * Prints p50/p95/p99 per request kind and errors. Targets: p99 ≤ 150 ms with 0 errors; p99 ≤ 1 s
 * while planning.
 *
 * LOAD_SECONDS (default 60, at most 120) and LOAD_TABLETS (default 100, at most 500) bound the run;
 * each phase is preceded by 5 s of the same load that is not counted (warm-up). LOAD_PLANNING=false
 * leaves out the second phase.
 * The server runs in its own process (server/main.ts on a fresh database file, synchronous=FULL).
 * Several instances: LOAD_DATABASE_URL=postgres://… runs on a fresh database created on that
 * PostgreSQL server (dropped afterwards) and LOAD_INSTANCES=N starts N servers on ports LOAD_PORT,
 * LOAD_PORT+1, …; tablet i talks to instance i mod N (the spread a round-robin proxy would give).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import autocannon, { type Client, type Request, type Result } from 'autocannon';
import { openDb } from '../../server/db/knex';
import { DEMO_PASSWORD, DEMO_PIN } from '../../server/seed/demo';
import { insertUser } from '../../server/users/users.repository';
import { createRng } from '../../server/core/rng';
import { insertReleasedWave } from '../helpers/picking';
import { openDemoDb } from './demo-db';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const SECONDS = Math.min(120, Math.max(5, Number(process.env.LOAD_SECONDS ?? 60)));
const TABLETS = Math.min(500, Math.max(1, Number(process.env.LOAD_TABLETS ?? 100)));
const PLAN_ORDERS = 300;
const WARM_UP_SECONDS = 5;
const PORT = Number(process.env.LOAD_PORT ?? 3390);
const INSTANCES = Math.min(8, Math.max(1, Number(process.env.LOAD_INSTANCES ?? 1)));
const PG_SERVER = process.env.LOAD_DATABASE_URL || undefined;
const PLANNING = process.env.LOAD_PLANNING !== 'false';
const BASES = Array.from({ length: INSTANCES }, (_v, k) => `http://127.0.0.1:${PORT + k}`);
const BASE = BASES[0]!;
const LOAD_JWT_SECRET = randomBytes(48).toString('base64url');
const CSRF = { 'x-aislewright': '1' };

interface Tablet {
  base: string;
  cookie: string;
  tripId: number;
  lineIds: number[];
  next: number;
}

function percentile(sorted: number[], q: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))]!;
}

async function prepare(file: string) {
  const { db, hasher, siteId, supervisorId: supervisor, planId, now } = await openDemoDb(file);
  const pinHash = await hasher.hash(DEMO_PIN);
  const pickerIds: number[] = [];
  for (let i = 0; i < TABLETS; i++) {
    pickerIds.push(
      await insertUser(
        db,
        {
          name: `Load picker ${i + 1}`,
          email: null,
          badge: `L-${String(i + 1).padStart(4, '0')}`,
          role: 'picker',
          password_hash: null,
          pin_hash: pinHash,
          created_at: now,
        },
        [siteId],
      ),
    );
  }
  // Enough open orders for the 300-order wave (the demo seeds fewer).
  const skus: { sku: string; unit_weight_kg: number; unit_volume_l: number }[] = await db('skus')
    .where({ site_id: siteId })
    .select('sku', 'unit_weight_kg', 'unit_volume_l');
  const open = Number((await db('orders').where({ site_id: siteId, status: 'open' }).count<{ n: number }[]>({ n: '*' }))[0]!.n);
  const rng = createRng(300);
  await db.transaction(async (trx) => {
    for (let i = 0; i < PLAN_ORDERS - open; i++) {
      const n = 1 + rng.int(4);
      const lines = Array.from({ length: n }, () => ({ s: skus[rng.int(skus.length)]!, qty: 1 + rng.int(3) }));
      const [{ id }] = await trx('orders').insert(
        {
          site_id: siteId,
          ref: `LOAD-${i + 1}`,
          status: 'open',
          due: null,
          priority: null,
          source: 'load test',
          lines: n,
          units: lines.reduce((a, l) => a + l.qty, 0),
          weight_kg: lines.reduce((a, l) => a + l.qty * l.s.unit_weight_kg, 0),
          volume_l: lines.reduce((a, l) => a + l.qty * l.s.unit_volume_l, 0),
          created_at: now,
        },
        'id',
      );
      await trx('order_lines').insert(lines.map((l, k) => ({ order_id: id, line_no: k + 1, sku: l.s.sku, qty: l.qty })));
    }
  });
  // Two waves: one per phase, a 50-stop trip (75 lines) per tablet; phase two's trips are assigned later.
  const spec = (pickerId: number | null) => ({ stops: 50, twoLineEvery: 2, pickerId });
  const waveA = await db.transaction((trx) =>
    insertReleasedWave(trx, { siteId, planId, createdBy: supervisor, name: 'Load wave A', trips: pickerIds.map((p) => spec(p)) }),
  );
  const waveB = await db.transaction((trx) =>
    insertReleasedWave(trx, { siteId, planId, createdBy: supervisor, name: 'Load wave B', trips: pickerIds.map(() => spec(null)), binOffset: 11 }),
  );
  await db.destroy();
  return { siteId, pickerIds, waveA, waveB };
}

async function startServer(target: string, k: number): Promise<ChildProcess> {
  const db = target.startsWith('postgres') ? { DATABASE_URL: target, JWT_SECRET: LOAD_JWT_SECRET } : { DATABASE_FILE: target };
  const child = spawn(process.execPath, ['--import', 'tsx', join(root, 'server/main.ts')], {
    cwd: root,
    env: { ...process.env, PORT: String(PORT + k), HOST: '127.0.0.1', ...db, LOG_LEVEL: 'warn', DEMO_SEED: 'false' },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  for (let i = 0; i < 300; i++) {
    try {
      if ((await fetch(`${BASES[k]}/api/health`)).ok) return child;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  child.kill();
  throw new Error('server did not start in 30 s');
}

async function signIn(path: string, body: object, base = BASE): Promise<string> {
  const res = await fetch(`${base}${path}`, { method: 'POST', headers: { ...CSRF, 'content-type': 'application/json' }, body: JSON.stringify(body) });
  if (!res.ok) throw new Error(`sign-in ${res.status} ${await res.text()}`);
  return res.headers.get('set-cookie')!.split(';')[0]!;
}

async function tabletFor(cookie: string, tripId: number, base: string): Promise<Tablet> {
  const trip = (await (await fetch(`${base}/api/picking/trips/${tripId}`, { headers: { cookie } })).json()) as { stopList: { lines: { id: number }[] }[] };
  return { base, cookie, tripId, lineIds: trip.stopList.flatMap((s) => s.lines.map((l) => l.id)), next: 0 };
}

interface PhaseStats {
  result: { errors: number; timeouts: number; non2xx: number; duration: number; p99: number };
  confirm: number[];
  poll: number[];
  statuses: Map<number, number>;
}

let keySerial = 0;

/**
 * One autocannon instance per tablet (one connection, 1 request/s), started at evenly spread
 * offsets over the first second: real tablets are not in step, and one instance with many
 * connections would fire every connection's request in the same millisecond each second.
 */
async function runPhase(tablets: Tablet[], seconds = SECONDS): Promise<PhaseStats> {
  const confirm: number[] = [];
  const poll: number[] = [];
  const statuses = new Map<number, number>();
  const requestsFor = (t: Tablet): Request[] => {
    const confirmReq: Request = {
      method: 'POST',
      setupRequest: (req) => {
        // Past the last line, resend the last one with its key: the stored answer, still a 200.
        const i = Math.min(t.next, t.lineIds.length - 1);
        const key = i === t.lineIds.length - 1 ? `load-last-${t.tripId}` : `load-${t.tripId}-${i}-${keySerial++}`;
        t.next += 1;
        return {
          ...req,
          path: `/api/picking/trips/${t.tripId}/lines/${t.lineIds[i]}/confirm`,
          headers: { cookie: t.cookie, ...CSRF, 'content-type': 'application/json', 'idempotency-key': key, 'x-aislewright-device': `load-tablet-${t.tripId}` },
          body: JSON.stringify({ via: 'tap', scan: null }),
        };
      },
    };
    // The tablet's 5-second poll (PickTripView): status and revision; the full trip only when it changed.
    const pollReq: Request = { method: 'GET', path: `/api/picking/trips/${t.tripId}/status`, headers: { cookie: t.cookie } };
    return [confirmReq, pollReq, confirmReq, confirmReq, pollReq, confirmReq, confirmReq];
  };
  const one = (t: Tablet, delayMs: number) =>
    new Promise<Result>((resolveOne, reject) => {
      setTimeout(() => {
        const instance = autocannon(
          { url: t.base, connections: 1, connectionRate: 1, duration: seconds, timeout: 10, requests: requestsFor(t) },
          (err, result) => (err ? reject(err) : resolveOne(result)),
        );
        instance.on('response', (client: Client, statusCode: number, _bytes: number, ms: number) => {
          statuses.set(statusCode, (statuses.get(statusCode) ?? 0) + 1);
          const req = (client as unknown as { requestIterator?: { currentRequest?: { method?: string } } }).requestIterator?.currentRequest;
          (req?.method === 'GET' ? poll : confirm).push(ms);
        });
      }, delayMs);
    });
  const results = await Promise.all(tablets.map((t, i) => one(t, (i * 1000) / tablets.length)));
  const sum = (f: (r: Result) => number) => results.reduce((a, r) => a + f(r), 0);
  const result = {
    errors: sum((r) => r.errors),
    timeouts: sum((r) => r.timeouts),
    non2xx: sum((r) => r.non2xx),
    duration: Math.max(...results.map((r) => r.duration)),
    p99: Math.max(...results.map((r) => r.latency.p99)),
  };
  return { result, confirm, poll, statuses };
}

/** Plans 300-order previews back to back through the supervisor API until `stop` resolves. */
async function planLoop(cookie: string, siteId: number, stop: { done: boolean }): Promise<number[]> {
  const headers = { cookie, ...CSRF, 'content-type': 'application/json' };
  const page = (await (await fetch(`${BASE}/api/sites/${siteId}/orders?status=open&pageSize=500`, { headers })).json()) as { rows: { id: number }[] };
  const orderIds = page.rows.slice(0, PLAN_ORDERS).map((o) => o.id);
  const site = (await (await fetch(`${BASE}/api/sites/${siteId}`, { headers })).json()) as { cartProfiles: { id: number }[] };
  const times: number[] = [];
  while (!stop.done) {
    const t0 = performance.now();
    let job = (await (
      await fetch(`${BASE}/api/sites/${siteId}/wave-previews`, {
        method: 'POST',
        headers,
        body: JSON.stringify({ orderIds, cartProfileId: site.cartProfiles[0]!.id, batching: 'savings', method: 'best', improve: 'local' }),
      })
    ).json()) as { id: string; state: string };
    while (job.state === 'running') {
      await new Promise((r) => setTimeout(r, 500));
      job = (await (await fetch(`${BASE}/api/sites/${siteId}/wave-previews/${job.id}`, { headers })).json()) as typeof job;
    }
    if (job.state !== 'done') throw new Error(`preview ${job.state}`);
    times.push(performance.now() - t0);
  }
  return times;
}

function report(title: string, s: PhaseStats, target: number): boolean {
  const row = (name: string, xs: number[]) => {
    const sorted = [...xs].sort((a, b) => a - b);
    return `${name.padEnd(14)} ${String(sorted.length).padStart(7)} ${percentile(sorted, 0.5).toFixed(1).padStart(8)} ${percentile(sorted, 0.95).toFixed(1).padStart(8)} ${percentile(sorted, 0.99).toFixed(1).padStart(8)} ${(sorted.at(-1) ?? NaN).toFixed(1).padStart(8)}`;
  };
  const all = [...s.confirm, ...s.poll];
  const p99 = percentile(
    [...all].sort((a, b) => a - b),
    0.99,
  );
  const errors = s.result.errors + s.result.timeouts + s.result.non2xx;
  console.log(`\n### ${title}`);
  console.log(
    `${'requests'.padEnd(14)} ${'count'.padStart(7)} ${'p50 ms'.padStart(8)} ${'p95 ms'.padStart(8)} ${'p99 ms'.padStart(8)} ${'max ms'.padStart(8)}`,
  );
  console.log(row('confirm', s.confirm));
  console.log(row('poll', s.poll));
  console.log(row('all', all));
  console.log(
    `rate ${(all.length / s.result.duration).toFixed(1)} req/s over ${s.result.duration.toFixed(1)} s; statuses ${JSON.stringify(Object.fromEntries(s.statuses))}`,
  );
  console.log(
    `errors ${errors} (connection ${s.result.errors}, timeouts ${s.result.timeouts}, non-2xx ${s.result.non2xx}); worst per-tablet p99 by autocannon (corrected for coordinated omission) ${s.result.p99} ms`,
  );
  const ok = p99 <= target && errors === 0;
  console.log(`target p99 ≤ ${target} ms with 0 errors: ${ok ? 'met' : 'NOT met'} (p99 ${p99.toFixed(1)} ms)`);
  return ok;
}

/** A fresh database on LOAD_DATABASE_URL's server, or a fresh SQLite file. */
async function freshTarget(dir: string): Promise<{ target: string; drop(): Promise<void> }> {
  if (!PG_SERVER) return { target: join(dir, 'aislewright.sqlite'), drop: async () => undefined };
  const name = `aw_load_${randomBytes(4).toString('hex')}`;
  const admin = openDb(PG_SERVER, { poolMax: 1 });
  await admin.raw(`create database ${name}`);
  const u = new URL(PG_SERVER);
  u.pathname = `/${name}`;
  return {
    target: u.toString(),
    async drop() {
      await admin.raw(`drop database if exists ${name} with (force)`);
      await admin.destroy();
    },
  };
}

async function main(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'aw-load-'));
  const { target: file, drop } = await freshTarget(dir);
  const servers: ChildProcess[] = [];
  try {
    console.log(`Preparing ${TABLETS} tablets, ${SECONDS} s per phase, ${INSTANCES} instance(s), database ${PG_SERVER ? 'PostgreSQL' : file}`);
    const fx = await prepare(file);
    for (let k = 0; k < INSTANCES; k++) servers.push(await startServer(file, k));
    const supervisor = await signIn('/api/auth/sign-in', { email: 'supervisor@demo.aislewright.test', password: DEMO_PASSWORD });
    const cookies: string[] = [];
    const baseOf = (i: number) => BASES[i % INSTANCES]!;
    for (let i = 0; i < TABLETS; i++)
      cookies.push(await signIn('/api/auth/badge-sign-in', { badge: `L-${String(i + 1).padStart(4, '0')}`, pin: DEMO_PIN }, baseOf(i)));

    const tabletsA = await Promise.all(cookies.map((c, i) => tabletFor(c, fx.waveA.tripIds[i]!, baseOf(i))));
    // Warm-up, not counted: a freshly started process compiles its code paths on the first requests,
    // and every tablet's first confirmation also starts its trip. Measured from steady state on.
    await runPhase(tabletsA, WARM_UP_SECONDS);
    const a = await runPhase(tabletsA);
    const okA = report(`${TABLETS} tablets, confirm + poll (${INSTANCES} instance(s), ${PG_SERVER ? 'PostgreSQL' : 'SQLite'})`, a, 150);
    if (!PLANNING) {
      process.exitCode = okA ? 0 : 1;
      return;
    }

    // Phase two: the first wave's trips are put aside and the second wave's trips handed out on the board.
    const db = openDb(file);
    await db('trips').where({ wave_id: fx.waveA.waveId }).update({ status: 'done', finished_at: new Date().toISOString() });
    await db.destroy();
    for (const [i, tripId] of fx.waveB.tripIds.entries()) {
      const res = await fetch(`${BASE}/api/sites/${fx.siteId}/board/trips/${tripId}/assign`, {
        method: 'POST',
        headers: { cookie: supervisor, ...CSRF, 'content-type': 'application/json' },
        body: JSON.stringify({ pickerId: fx.pickerIds[i] }),
      });
      if (!res.ok) throw new Error(`assign ${res.status} ${await res.text()}`);
    }
    const tabletsB = await Promise.all(cookies.map((c, i) => tabletFor(c, fx.waveB.tripIds[i]!, baseOf(i))));
    await runPhase(tabletsB, WARM_UP_SECONDS);
    const stop = { done: false };
    const planning = planLoop(supervisor, fx.siteId, stop);
    const b = await runPhase(tabletsB);
    stop.done = true;
    const plans = await planning;
    const okB = report(`${TABLETS} tablets while a ${PLAN_ORDERS}-order wave is planned`, b, 1000);
    console.log(`${PLAN_ORDERS}-order previews planned during the phase: ${plans.length}, ${plans.map((ms) => `${(ms / 1000).toFixed(1)} s`).join(', ')}`);

    // Nothing doubled: one confirmation record per line confirmed, whatever the retries.
    const check = openDb(file);
    const audits = Number((await check('audit_log').where({ action: 'pick.confirm' }).count<{ n: number }[]>({ n: '*' }))[0]!.n);
    const picked = Number((await check('pick_lines').where({ status: 'picked' }).count<{ n: number }[]>({ n: '*' }))[0]!.n);
    await check.destroy();
    console.log(`\nlines picked ${picked}, confirmation audit entries ${audits}: ${picked === audits ? 'each once' : 'MISMATCH'}`);
    process.exitCode = okA && okB && picked === audits ? 0 : 1;
  } finally {
    for (const server of servers) {
      server.kill('SIGTERM');
      await new Promise((r) => server.once('exit', r));
    }
    await drop();
    rmSync(dir, { recursive: true, force: true });
  }
}

await main();
