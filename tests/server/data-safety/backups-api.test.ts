/** The admin's backups API and the server's schedule: list, back up now, download, failures mailed and shown. */
import { statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BackupItem, BackupsStatus } from '../../../shared/data-safety';
import { BackupRunner } from '../../../server/backups/backup-runner';
import type { Deps } from '../../../server/deps';
import { appOf, fileDeps, signIn, tempDir, type Agent } from '../../helpers/file-app';
import { csrf } from '../../helpers/app';
import { binaryBody } from '../../helpers/http';

let deps: Deps;
let dir: string;
let admin: Agent;
let supervisor: Agent;

beforeAll(async () => {
  dir = tempDir('backups-api');
  deps = await fileDeps(join(dir, 'aislewright.sqlite'));
  deps.backups = new BackupRunner({
    dbFile: join(dir, 'aislewright.sqlite'),
    dir: join(dir, 'backups'),
    everyHours: 24,
    keep: 2,
    db: deps.db,
    mailer: deps.mailer,
    logger: deps.logger,
    publicUrl: 'http://aislewright.test',
  });
  const app = appOf(deps);
  admin = await signIn(app, 'admin');
  supervisor = await signIn(app, 'supervisor');
}, 60_000);
afterAll(async () => {
  await deps.backups?.stop();
  await deps.db.destroy();
});

describe('/api/admin/backups', () => {
  it('backs up now (in a worker), lists the backup as verified, and serves it for download', async () => {
    const empty = BackupsStatus.parse((await admin.get('/api/admin/backups')).body);
    expect(empty).toMatchObject({ available: true, backups: [], everyHours: 24, keep: 2, lastFailure: null });
    const res = await admin.post('/api/admin/backups').set(csrf).send({});
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const item = BackupItem.parse(res.body);
    expect(item).toMatchObject({ verified: true, trigger: 'admin' });
    expect(statSync(join(dir, 'backups', item.name)).mode & 0o777).toBe(0o600);
    const listed = BackupsStatus.parse((await admin.get('/api/admin/backups')).body);
    expect(listed.backups.map((b) => b.name)).toEqual([item.name]);

    const dl = await admin.get(`/api/admin/backups/${item.name}`).buffer(true).parse(binaryBody);
    expect(dl.status).toBe(200);
    const file = join(dir, 'downloaded.sqlite');
    writeFileSync(file, dl.body as Buffer);
    const copy = new Database(file, { readonly: true });
    expect(copy.prepare('SELECT count(*) FROM users').pluck().get()).toBe(6);
    copy.close();
    expect(await deps.db('audit_log').where({ action: 'backup.created', subject: item.name })).toHaveLength(1);
  });

  it('keeps only BACKUP_KEEP backups', async () => {
    await deps.backups!.backupNow('schedule');
    await deps.backups!.backupNow('schedule');
    expect(deps.backups!.list()).toHaveLength(2);
  });

  it('refuses names that are not backups (no path tricks) and non-admins', async () => {
    expect((await admin.get('/api/admin/backups/..%2Faislewright.sqlite')).status).toBe(404);
    expect((await admin.get('/api/admin/backups/aislewright-20990101-000000.sqlite')).status).toBe(404);
    expect((await supervisor.get('/api/admin/backups')).status).toBe(403);
    expect((await supervisor.post('/api/admin/backups').set(csrf).send({})).status).toBe(403);
  });

  it('mails a failed backup to every admin and shows it until the next success', async () => {
    const broken = new BackupRunner({ ...deps.backups!.options, dbFile: join(dir, 'missing', 'nothing.sqlite'), inWorker: false });
    const saved = deps.backups;
    deps.backups = broken;
    try {
      const res = await admin.post('/api/admin/backups').set(csrf).send({});
      expect(res.status).toBe(500);
      expect(res.body.error.code).toBe('backup_failed');
      const status = BackupsStatus.parse((await admin.get('/api/admin/backups')).body);
      expect(status.lastFailure?.message).toContain('no database');
      const mail = await deps.db('mail_outbox').where({ subject: 'Aislewright: a backup failed' });
      expect(mail.map((m: { to: string }) => m.to)).toEqual(['admin@demo.aislewright.test']);
      expect(mail[0].text).toContain('/admin/backups');
    } finally {
      deps.backups = saved;
    }
    await deps.backups!.backupNow('admin');
    expect(BackupsStatus.parse((await admin.get('/api/admin/backups')).body).lastFailure).toBeNull();
  });

  it('schedules the next backup from the newest one, and stops without a pending timer', async () => {
    const runner = deps.backups!;
    const newest = runner.list()[0]!;
    runner.start();
    expect(runner.nextAt?.getTime()).toBe(new Date(newest.createdAt).getTime() + 24 * 3_600_000);
    await runner.stop();
    expect(runner.nextAt).toBeNull();
  });
});

describe('a backup folder the system refuses', () => {
  // Regression: Node 20's recursive mkdirSync spins forever on ENOENT under /proc, hanging the server.
  it.runIf(process.platform === 'linux')('fails at once with a message instead of hanging', async () => {
    const runner = new BackupRunner({ ...deps.backups!.options, dir: '/proc/aislewright-backups-test', inWorker: false });
    await expect(runner.backupNow('schedule')).rejects.toThrow(/ENOENT/);
    const mails = await deps.db('mail_outbox').where({ subject: 'Aislewright: a backup failed' });
    expect(mails.at(-1).text).toContain('/proc/aislewright-backups-test');
    // The folder cannot hold the failure note, so the runner keeps it for the screen.
    expect(runner.lastFailure()?.message).toMatch(/ENOENT/);
  });
});
