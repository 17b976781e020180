/**
 * Backups under load: a backup taken while tablets confirm picks holds every confirmation that was
 * acknowledged before the backup began (SQLite's backup API copies one consistent snapshot, WAL
 * included), and the backup restored into a fresh place starts and signs in with that data.
 */
import { copyFileSync, existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Deps } from '../../../server/deps';
import { backupDatabase, restoreDatabase, verifyBackup } from '../../../server/backups/sqlite-backup';
import { pruneNow } from '../../../server/retention/retention.service';
import { insertReleasedWave, seedPlan } from '../../helpers/picking';
import { appOf, fileDeps, signIn, tempDir, type Agent } from '../../helpers/file-app';
import { confirm, readTrip } from '../picking/setup';

let deps: Deps;
let dir: string;
let dbFile: string;
let pickers: Agent[];
let tripIds: number[];

beforeAll(async () => {
  dir = tempDir('backup');
  dbFile = join(dir, 'aislewright.sqlite');
  deps = await fileDeps(dbFile);
  const id = async (where: object) => (await deps.db('users').where(where).first<{ id: number }>('id'))!.id;
  const siteId = (await deps.db('sites').first<{ id: number }>('id'))!.id;
  const supervisor = await id({ role: 'supervisor' });
  const planId = await seedPlan(deps.db, siteId, supervisor);
  const wave = await insertReleasedWave(deps.db, {
    siteId,
    planId,
    createdBy: supervisor,
    trips: [
      { stops: 40, pickerId: await id({ badge: 'P-1001' }) },
      { stops: 40, pickerId: await id({ badge: 'P-1002' }) },
    ],
  });
  tripIds = wave.tripIds;
  const app = appOf(deps);
  pickers = [await signIn(app, 'picker'), await signIn(app, 'picker2')];
}, 60_000);
afterAll(() => deps.db.destroy());

describe('an online backup while tablets confirm', () => {
  it('holds every confirmation acknowledged before it began, and the copy passes its check', async () => {
    const acknowledged: { lineId: number; at: number }[] = [];
    let stop = false;
    // Two tablets confirm their lines one after another, as fast as the server answers.
    const tablet = async (agent: Agent, tripId: number) => {
      const trip = await readTrip(agent, tripId);
      for (const stopRow of trip.stopList) {
        for (const line of stopRow.lines) {
          if (stop) return;
          const res = await confirm(agent, tripId, line.id);
          expect(res.status, JSON.stringify(res.body)).toBe(200);
          acknowledged.push({ lineId: line.id, at: performance.now() });
        }
      }
    };
    const tablets = [tablet(pickers[0]!, tripIds[0]!), tablet(pickers[1]!, tripIds[1]!)];
    // Let confirmations pile up (most of them still only in the -wal file), then back up mid-stream.
    while (acknowledged.length < 30) await new Promise((r) => setTimeout(r, 5));
    expect(statSync(`${dbFile}-wal`).size).toBeGreaterThan(0);
    const began = performance.now();
    const before = acknowledged.filter((a) => a.at <= began).map((a) => a.lineId);
    const out = join(dir, 'during.sqlite');
    const backup = backupDatabase(dbFile, out);
    const r = await backup;
    // Let the tablets go on a little: the copy must not change with later writes.
    const target = acknowledged.length + 5;
    while (acknowledged.length < target) await new Promise((res) => setTimeout(res, 5));
    stop = true;
    await Promise.all(tablets);

    expect(r.bytes).toBeGreaterThan(0);
    expect(verifyBackup(out)).toMatchObject({ ok: true, problems: [] });
    const copy = new Database(out, { readonly: true });
    const picked = new Set(copy.prepare("SELECT id FROM pick_lines WHERE status = 'picked'").pluck().all() as number[]);
    copy.close();
    expect(before.length).toBeGreaterThanOrEqual(30);
    for (const lineId of before) expect(picked.has(lineId), `line ${lineId} acknowledged before the backup began`).toBe(true);
    // Nothing picked in the copy that the server never acknowledged (no torn or invented rows).
    const everAcknowledged = new Set(acknowledged.map((a) => a.lineId));
    for (const lineId of picked) expect(everAcknowledged.has(lineId)).toBe(true);
    // The test really raced: confirmations went on after the backup began.
    expect(acknowledged.length).toBeGreaterThan(before.length + 4);
  }, 60_000);

  it('is restored into a fresh place that starts (migrations, sign-in) with that data', async () => {
    const out = join(dir, 'for-restore.sqlite');
    await backupDatabase(dbFile, out);
    const picked = (await deps.db('pick_lines').where({ status: 'picked' }).count({ n: '*' }).first()) as { n: number };
    expect(picked.n).toBeGreaterThan(0);

    const fresh = join(tempDir('restored'), 'data', 'aislewright.sqlite');
    const result = restoreDatabase(out, fresh);
    expect(result).toEqual({ restored: fresh, replaced: null });
    const restored = await fileDeps(fresh, false);
    try {
      const app = appOf(restored);
      const supervisor = await signIn(app, 'supervisor');
      const siteId = (await restored.db('sites').first<{ id: number }>('id'))!.id;
      const board = await supervisor.get(`/api/sites/${siteId}/board`);
      expect(board.status, JSON.stringify(board.body)).toBe(200);
      const again = (await restored.db('pick_lines').where({ status: 'picked' }).count({ n: '*' }).first()) as { n: number };
      expect(again.n).toBe(picked.n);
      // The picker's badge and PIN work on the restored database too.
      const picker = await signIn(app, 'picker');
      expect((await readTrip(picker, tripIds[0]!)).id).toBe(tripIds[0]);
    } finally {
      await restored.db.destroy();
    }
  }, 60_000);

  it('keeps the replaced database beside the restored one, with its WAL folded in', async () => {
    const place = tempDir('replace');
    const target = join(place, 'aislewright.sqlite');
    const older = join(place, 'older.sqlite');
    await backupDatabase(dbFile, older);
    copyFileSync(older, target);
    const before = verifyBackup(target).tables;
    const r = restoreDatabase(older, target, new Date('2026-12-05T01:02:03Z'));
    expect(r.replaced).toBe(`${target}.replaced-20261205-010203`);
    expect(existsSync(r.replaced!)).toBe(true);
    expect(verifyBackup(r.replaced!).tables).toEqual(before);
    expect(readdirSync(place).filter((f) => f.includes('.restoring'))).toEqual([]);
  });
});

describe('retention on a database with confirmations', () => {
  it('prunes stored idempotency answers older than the setting, and only those', async () => {
    const n = Number(((await deps.db('pick_requests').count({ n: '*' }).first()) as { n: number }).n);
    expect(n).toBeGreaterThan(30);
    const soon = await pruneNow(deps.db, { now: new Date(Date.now() + 29 * 86_400_000) });
    expect(soon.idempotencyAnswers).toBe(0);
    const later = await pruneNow(deps.db, { now: new Date(Date.now() + 31 * 86_400_000) });
    expect(later.idempotencyAnswers).toBe(n);
    expect(await deps.db('audit_log').where({ action: 'retention.pruned' })).toHaveLength(2);
  });
});
