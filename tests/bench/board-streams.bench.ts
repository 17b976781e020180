/**
 * Server CPU per pick confirmation while supervisors watch the live board (`board/events` streams).
 *
 * The server runs in its own process (server/main.ts on a fresh database file) so only its CPU is
 * counted: utime + stime from /proc/<pid>/stat before and after a run of confirmations. One picker
 * confirms the lines of a trip one at a time; after each confirmation the bench waits until every
 * open stream has received the next board event (with no stream open: the board's debounce, so both
 * runs last as long). Measured with 0 streams and with 40 (40 supervisors, one stream each: the
 * per-person cap allows a few streams per user, not 40), twice each, in this order: 0, 40, 0, 40.
 *
 * BOARD_BENCH_PORT picks the server's port (default 3392); BOARD_BENCH_CONFIRMS the confirmations
 * per run (default 60, at most 70).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import http from 'node:http';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DEMO_PASSWORD, DEMO_PIN } from '../../server/seed/demo';
import { insertUser } from '../../server/users/users.repository';
import { insertReleasedWave } from '../helpers/picking';
import { openDemoDb } from './demo-db';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const PORT = Number(process.env.BOARD_BENCH_PORT ?? 3392);
const BASE = `http://127.0.0.1:${PORT}`;
const CSRF = { 'x-aislewright': '1' };
const STREAMS = 40;
const CONFIRMS = Math.min(70, Math.max(10, Number(process.env.BOARD_BENCH_CONFIRMS ?? 60)));
/** The board's change debounce is 250 ms; with no stream open the bench waits a little longer. */
const IDLE_WAIT_MS = 300;
/** Linux reports process times in clock ticks; 100 per second on every kernel this runs on (common practice, USER_HZ). */
const TICKS_PER_SECOND = 100;

async function prepare(file: string) {
  const { db, hasher, siteId, supervisorId: supervisor, planId, now } = await openDemoDb(file);
  const passwordHash = await hasher.hash(DEMO_PASSWORD);
  const pinHash = await hasher.hash(DEMO_PIN);
  const emails: string[] = [];
  for (let i = 0; i < STREAMS; i++) {
    const email = `board-watcher-${i + 1}@bench.aislewright.test`;
    await insertUser(
      db,
      { name: `Board watcher ${i + 1}`, email, badge: null, role: 'supervisor', password_hash: passwordHash, pin_hash: null, created_at: now },
      [siteId],
    );
    emails.push(email);
  }
  const picker = await insertUser(
    db,
    { name: 'Bench picker', email: null, badge: 'B-0001', role: 'picker', password_hash: null, pin_hash: pinHash, created_at: now },
    [siteId],
  );
  // A realistic board: one wave of 30 trips of 40 stops; the picker's (first) has 150 stops, 300 lines.
  const wave = await db.transaction((trx) =>
    insertReleasedWave(trx, {
      siteId,
      planId,
      createdBy: supervisor,
      name: 'Bench wave',
      trips: [{ stops: 150, twoLineEvery: 1, pickerId: picker }, ...Array.from({ length: 29 }, () => ({ stops: 40, twoLineEvery: 2 }))],
    }),
  );
  await db.destroy();
  return { siteId, emails, tripId: wave.tripIds[0]! };
}

async function startServer(file: string): Promise<ChildProcess> {
  const child = spawn(process.execPath, ['--import', 'tsx', join(root, 'server/main.ts')], {
    cwd: root,
    env: { ...process.env, PORT: String(PORT), HOST: '127.0.0.1', DATABASE_FILE: file, LOG_LEVEL: 'warn', DEMO_SEED: 'false' },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  for (let i = 0; i < 300; i++) {
    try {
      if ((await fetch(`${BASE}/api/health`)).ok) return child;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  child.kill();
  throw new Error('server did not start in 30 s');
}

/** utime + stime of a process, in milliseconds. */
function cpuMs(pid: number): number {
  const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
  // Fields after the command name (which may hold spaces) start at field 3.
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  return ((Number(fields[11]) + Number(fields[12])) * 1000) / TICKS_PER_SECOND;
}

async function signIn(path: string, body: object): Promise<string> {
  const res = await fetch(`${BASE}${path}`, { method: 'POST', headers: { ...CSRF, 'content-type': 'application/json' }, body: JSON.stringify(body) });
  if (!res.ok) throw new Error(`sign-in ${res.status} ${await res.text()}`);
  return res.headers.get('set-cookie')!.split(';')[0]!;
}

interface Stream {
  events: number;
  waiters: (() => void)[];
  close(): void;
}

/** Opens a board stream and counts `board` events without parsing them (the client's cost stays small). */
function openStream(cookie: string, siteId: number): Promise<Stream> {
  return new Promise((resolveOpen, reject) => {
    const s: Stream = { events: 0, waiters: [], close: () => req.destroy() };
    const req = http.get({ host: '127.0.0.1', port: PORT, path: `/api/sites/${siteId}/board/events`, headers: { cookie, accept: 'text/event-stream' } });
    req.on('response', (res) => {
      if (res.statusCode !== 200) return reject(new Error(`stream ${res.statusCode}`));
      let tail = '';
      res.on('data', (chunk: Buffer) => {
        const text = tail + chunk.toString('latin1');
        let at = text.indexOf('event: board');
        while (at >= 0) {
          s.events += 1;
          for (const w of s.waiters.splice(0)) w();
          at = text.indexOf('event: board', at + 1);
        }
        tail = text.slice(-12);
        if (s.events === 1) resolveOpen(s);
      });
    });
    req.on('error', (err) => (s.events === 0 ? reject(err) : undefined));
  });
}

const nextEvent = (s: Stream, after: number) => (s.events > after ? Promise.resolve() : new Promise<void>((r) => s.waiters.push(r)));

export async function run(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'aw-board-bench-'));
  const file = join(dir, 'aislewright.sqlite');
  let server: ChildProcess | null = null;
  try {
    const fx = await prepare(file);
    server = await startServer(file);
    const pid = server.pid!;
    const picker = await signIn('/api/auth/badge-sign-in', { badge: 'B-0001', pin: DEMO_PIN });
    const watchers: string[] = [];
    for (const email of fx.emails) watchers.push(await signIn('/api/auth/sign-in', { email, password: DEMO_PASSWORD }));
    const trip = (await (await fetch(`${BASE}/api/picking/trips/${fx.tripId}`, { headers: { cookie: picker } })).json()) as {
      stopList: { lines: { id: number }[] }[];
    };
    const lineIds = trip.stopList.flatMap((s) => s.lines.map((l) => l.id));
    if (lineIds.length < CONFIRMS * 4 + 5) throw new Error(`trip has ${lineIds.length} lines, need ${CONFIRMS * 4 + 5}`);
    let next = 0;
    let key = 0;
    const confirmNext = async () => {
      const res = await fetch(`${BASE}/api/picking/trips/${fx.tripId}/lines/${lineIds[next++]}/confirm`, {
        method: 'POST',
        headers: { cookie: picker, ...CSRF, 'content-type': 'application/json', 'idempotency-key': `board-bench-${key++}` },
        body: JSON.stringify({ via: 'tap', scan: null }),
      });
      if (!res.ok) throw new Error(`confirm ${res.status} ${await res.text()}`);
    };
    // Warm-up, not counted: the first requests compile the server's code paths.
    for (let i = 0; i < 5; i++) await confirmNext();

    const measure = async (streams: number) => {
      const open = await Promise.all(watchers.slice(0, streams).map((c) => openStream(c, fx.siteId)));
      await new Promise((r) => setTimeout(r, 500));
      const cpu0 = cpuMs(pid);
      const t0 = performance.now();
      for (let i = 0; i < CONFIRMS; i++) {
        const seen = open.map((s) => s.events);
        await confirmNext();
        if (open.length === 0) await new Promise((r) => setTimeout(r, IDLE_WAIT_MS));
        else await Promise.all(open.map((s, k) => nextEvent(s, seen[k]!)));
      }
      const cpu = cpuMs(pid) - cpu0;
      const wall = performance.now() - t0;
      const events = open.reduce((a, s) => a + s.events, 0);
      for (const s of open) s.close();
      await new Promise((r) => setTimeout(r, 300));
      return { cpuPerConfirm: cpu / CONFIRMS, wallPerConfirm: wall / CONFIRMS, events };
    };
    console.log(`${CONFIRMS} confirmations per run; server CPU from /proc (10 ms ticks); board of 1 wave × 30 trips`);
    console.log(
      `${'streams'.padStart(8)} ${'CPU ms / confirmation'.padStart(22)} ${'wall ms / confirmation'.padStart(23)} ${'board events received'.padStart(22)}`,
    );
    const rows: Record<number, number[]> = { 0: [], [STREAMS]: [] };
    for (const n of [0, STREAMS, 0, STREAMS]) {
      const r = await measure(n);
      rows[n]!.push(r.cpuPerConfirm);
      console.log(
        `${String(n).padStart(8)} ${r.cpuPerConfirm.toFixed(1).padStart(22)} ${r.wallPerConfirm.toFixed(0).padStart(23)} ${String(r.events).padStart(22)}`,
      );
    }
    const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
    const base = mean(rows[0]!);
    const loaded = mean(rows[STREAMS]!);
    console.log(
      `mean: ${base.toFixed(1)} ms with 0 streams, ${loaded.toFixed(1)} ms with ${STREAMS} (${(loaded / base).toFixed(1)}×; extra per stream ${((loaded - base) / STREAMS).toFixed(2)} ms)`,
    );
  } finally {
    if (server) server.kill();
    rmSync(dir, { recursive: true, force: true });
  }
}
