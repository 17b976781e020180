/**
 * Sign-in and session figures (issue 11): hash checks per 40-guess burst, password-reset answer
 * times for known and unknown addresses, and what the server-side session check adds per request.
 * In-memory SQLite, the test hasher (argon2id with small memory: what is counted here is checks,
 * not their cost). Run: `npm run bench auth`.
 */
import { performance } from 'node:perf_hooks';
import request from 'supertest';
import type { Hasher } from '../../server/auth/hasher';
import { DEMO_PIN } from '../../server/seed/demo';
import { csrf, makeTestApp, type TestApp } from '../helpers/app';

const quantile = (xs: number[], q: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1))]!;
};
const ms = (x: number) => `${x.toFixed(2)} ms`;

function countingHasher(real: Hasher) {
  const n = { checks: 0 };
  const hasher: Hasher = {
    hash: real.hash,
    verify: (h, s) => ((n.checks += 1), real.verify(h, s)),
    dummyVerify: (s) => ((n.checks += 1), real.dummyVerify(s)),
  };
  return { hasher, n };
}

async function burst(t: TestApp): Promise<void> {
  const real = t.deps.hasher;
  const c = countingHasher(real);
  t.deps.hasher = c.hasher;
  const answers = await Promise.all(
    Array.from({ length: 40 }, (_v, i) =>
      request(t.app)
        .post('/api/auth/badge-sign-in')
        .set(csrf)
        .send({ badge: 'P-1003', pin: i === 39 ? DEMO_PIN : String(100000 + i) })
        .then((r) => r),
    ),
  );
  t.deps.hasher = real;
  const codes = new Map<number, number>();
  for (const r of answers) codes.set(r.status, (codes.get(r.status) ?? 0) + 1);
  console.log('40 parallel badge sign-ins on one badge (39 wrong PINs, the right one sent last)');
  console.log(`  PIN hashes checked: ${c.n.checks}`);
  console.log(`  answers: ${[...codes].map(([k, v]) => `${v} × ${k}`).join(', ')}; right PIN answered ${answers[39]!.status}`);
}

async function resetTimings(t: TestApp): Promise<void> {
  const time = async (email: string) => {
    const t0 = performance.now();
    const res = await request(t.app).post('/api/auth/reset-request').set(csrf).send({ email });
    const dt = performance.now() - t0;
    if (res.status !== 200) throw new Error(`reset-request answered ${res.status}`);
    return dt;
  };
  // Warm-up, then interleaved so both kinds see the same machine load. Each address is asked once
  // (3 per hour are allowed): 50 known accounts are created for the run.
  const now = new Date().toISOString();
  const known: string[] = [];
  for (let i = 0; i < 50; i++) {
    const email = `bench.known.${i}@demo.aislewright.test`;
    await t.deps.db('users').insert({ name: `Bench ${i}`, email, role: 'engineer', password_hash: 'x', created_at: now });
    known.push(email);
  }
  for (let i = 0; i < 10; i++) await time(`warm.${i}@demo.aislewright.test`);
  const k: number[] = [];
  const u: number[] = [];
  for (let i = 0; i < 50; i++) {
    k.push(await time(known[i]!));
    u.push(await time(`bench.unknown.${i}@demo.aislewright.test`));
  }
  const settle = (t.deps as { background?: { settled(): Promise<void> } }).background;
  await settle?.settled();
  console.log('\nPOST /api/auth/reset-request, answer time over loopback (50 each, interleaved)');
  console.log('  address  | median   | p90      | max');
  for (const [name, xs] of [
    ['known', k],
    ['unknown', u],
  ] as const) {
    console.log(`  ${name.padEnd(8)} | ${ms(quantile(xs, 0.5)).padEnd(8)} | ${ms(quantile(xs, 0.9)).padEnd(8)} | ${ms(Math.max(...xs))}`);
  }
  console.log(`  median ratio known / unknown: ${(quantile(k, 0.5) / quantile(u, 0.5)).toFixed(2)}`);
}

/** The database work of the per-request session check: the user alone (before) vs session joined to user (after). */
async function sessionCheck(t: TestApp): Promise<void> {
  const db = t.deps.db;
  if (!(await db.schema.hasTable('sessions'))) return console.log('\n(no sessions table: session check not measured)');
  const userId = (await db('users').where({ role: 'picker' }).first<{ id: number }>('id'))!.id;
  const ids: string[] = [];
  const rows = Array.from({ length: 20_000 }, (_v, i) => ({
    id: `bench-${i}`,
    user_id: userId,
    auth_time: Math.floor(Date.now() / 1000),
    created_at: new Date().toISOString(),
  }));
  for (let i = 0; i < rows.length; i += 500) await db('sessions').insert(rows.slice(i, i + 500));
  for (let i = 0; i < 2000; i++) ids.push(`bench-${(i * 7919) % 20_000}`);
  const before = async () => {
    await db('users').where({ id: userId }).first();
    await db('user_sites').where({ user_id: userId }).select('site_id');
  };
  const after = async (sid: string) => {
    await db('sessions')
      .join('users', 'users.id', 'sessions.user_id')
      .where('sessions.id', sid)
      .first('sessions.user_id', 'sessions.revoked_at', 'users.name', 'users.role', 'users.active', 'users.token_version');
    await db('user_sites').where({ user_id: userId }).select('site_id');
  };
  const round = async (f: (i: number) => Promise<void>) => {
    const t0 = performance.now();
    for (let i = 0; i < ids.length; i++) await f(i);
    return ((performance.now() - t0) * 1000) / ids.length;
  };
  for (let r = 0; r < 2; r++) {
    await round(() => before());
    await round((i) => after(ids[i]!));
  }
  const b: number[] = [];
  const a: number[] = [];
  for (let r = 0; r < 5; r++) {
    b.push(await round(() => before()));
    a.push(await round((i) => after(ids[i]!)));
  }
  console.log('\nPer-request session check, database part (20,000 sessions stored; 2,000 checks × 5 rounds, median)');
  console.log(`  user + sites (before):           ${quantile(b, 0.5).toFixed(1)} µs`);
  console.log(`  session ⋈ user + sites (after):  ${quantile(a, 0.5).toFixed(1)} µs`);
  console.log(`  added per request: ${(quantile(a, 0.5) - quantile(b, 0.5)).toFixed(1)} µs (ratio ${(quantile(a, 0.5) / quantile(b, 0.5)).toFixed(2)})`);
}

export async function run(): Promise<void> {
  const t = await makeTestApp();
  try {
    await burst(t);
    await resetTimings(t);
    await sessionCheck(t);
  } finally {
    await t.close();
  }
}
