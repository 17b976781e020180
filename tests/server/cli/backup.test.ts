/** `aislewright backup …`: output and exit codes (0 done, 1 damaged, 2 refused). */
import { existsSync, readdirSync, statSync, writeFileSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { memoryIo } from '../../../server/cli/io';
import { run as backup } from '../../../server/cli/commands/backup';
import { claimDatabase } from '../../../server/backups/sqlite-backup';
import type { Deps } from '../../../server/deps';
import { fileDeps, tempDir } from '../../helpers/file-app';

let dir: string;
let dbFile: string;
let deps: Deps;

beforeAll(async () => {
  dir = tempDir('cli');
  dbFile = join(dir, 'aislewright.sqlite');
  deps = await fileDeps(dbFile);
});
afterAll(() => deps.db.destroy());

async function cli(args: string[], env: NodeJS.ProcessEnv = { DATABASE_FILE: dbFile }) {
  const io = memoryIo();
  const code = await backup(args, io, env);
  return { code, out: io.stdout.join(''), err: io.stderr.join('') };
}

describe('aislewright backup create', () => {
  it('prints { file, bytes } for --out, and the file is private (0600)', async () => {
    const out = join(dir, 'manual.sqlite');
    const r = await cli(['create', '--out', out]);
    expect(r.code, r.err).toBe(0);
    expect(JSON.parse(r.out)).toEqual({ file: out, bytes: statSync(out).size });
    expect(statSync(out).mode & 0o777).toBe(0o600);
  });

  it('writes into BACKUP_DIR with a manifest when no --out is given', async () => {
    const bdir = join(dir, 'kept');
    const r = await cli(['create'], { DATABASE_FILE: dbFile, BACKUP_DIR: bdir });
    expect(r.code, r.err).toBe(0);
    const { file } = JSON.parse(r.out) as { file: string };
    expect(file.startsWith(bdir)).toBe(true);
    expect(JSON.parse(readFileSync(`${file}.json`, 'utf8'))).toMatchObject({ verified: true, trigger: 'cli' });
  });

  it('refuses on PostgreSQL with one line pointing to pg_dump (exit 2)', async () => {
    const r = await cli(['create'], { DATABASE_URL: 'postgres://x@localhost/aw' });
    expect(r.code).toBe(2);
    expect(r.err.trim().split('\n')).toHaveLength(1);
    expect(r.err).toContain('pg_dump');
  });
});

describe('aislewright backup verify', () => {
  it('prints the integrity result and row counts per table (exit 0)', async () => {
    const out = join(dir, 'good.sqlite');
    await cli(['create', '--out', out]);
    const r = await cli(['verify', out]);
    expect(r.code).toBe(0);
    const body = JSON.parse(r.out) as { ok: boolean; tables: Record<string, number> };
    expect(body.ok).toBe(true);
    expect(body.tables.users).toBe(
      await deps
        .db('users')
        .count({ n: '*' })
        .first()
        .then((x) => Number((x as { n: number }).n)),
    );
  });

  it('exits 1 for a damaged file (pages overwritten in the middle)', async () => {
    const out = join(dir, 'damaged.sqlite');
    await cli(['create', '--out', out]);
    const bytes = readFileSync(out);
    // Overwrite every page after the first two with noise: the schema survives, the b-trees do not.
    for (let i = 8192; i < bytes.length; i++) bytes[i] = (i * 31) & 0xff;
    writeFileSync(out, bytes);
    const r = await cli(['verify', out]);
    expect(r.code).toBe(1);
    expect(JSON.parse(r.out).ok).toBe(false);
    expect(r.err).toContain('damaged');
  });

  it('exits 1 for a file that is not a database', async () => {
    const out = join(dir, 'text.sqlite');
    writeFileSync(out, 'not a database at all');
    expect((await cli(['verify', out])).code).toBe(1);
  });
});

describe('aislewright backup restore', () => {
  it('refuses with exit 2 and one line while a server is using the database', async () => {
    const out = join(dir, 'r1.sqlite');
    await cli(['create', '--out', out]);
    const release = claimDatabase(dbFile);
    try {
      const r = await cli(['restore', out]);
      expect(r.code).toBe(2);
      expect(r.err.trim().split('\n')).toHaveLength(1);
      expect(r.err).toContain(`pid ${process.pid}`);
      expect(readdirSync(dir).some((f) => f.includes('.replaced-'))).toBe(false);
    } finally {
      release();
    }
  });

  it('ignores the claim of a server that is gone (dead pid)', async () => {
    const target = join(tempDir('cli-stale'), 'aislewright.sqlite');
    writeFileSync(`${target}.server`, JSON.stringify({ pid: 2 ** 22 + 12345 }));
    const out = join(dir, 'r2.sqlite');
    await cli(['create', '--out', out]);
    const r = await cli(['restore', out], { DATABASE_FILE: target });
    expect(r.code, r.err).toBe(0);
    expect(existsSync(target)).toBe(true);
  });

  it('refuses a damaged backup with exit 1 and leaves the database in place', async () => {
    const target = join(tempDir('cli-damaged'), 'aislewright.sqlite');
    const bad = join(dir, 'bad.sqlite');
    writeFileSync(bad, 'garbage');
    const r = await cli(['restore', bad], { DATABASE_FILE: target });
    expect(r.code).toBe(1);
    expect(existsSync(target)).toBe(false);
  });

  it('replaces the database and keeps the replaced file beside it, timestamped', async () => {
    const place = tempDir('cli-restore');
    const target = join(place, 'aislewright.sqlite');
    const out = join(dir, 'r3.sqlite');
    await cli(['create', '--out', out]);
    expect((await cli(['restore', out], { DATABASE_FILE: target })).code).toBe(0);
    const second = await cli(['restore', out], { DATABASE_FILE: target });
    expect(second.code, second.err).toBe(0);
    const body = JSON.parse(second.out) as { restored: string; replaced: string };
    expect(body.restored).toBe(target);
    expect(body.replaced).toMatch(/aislewright\.sqlite\.replaced-\d{8}-\d{6}$/);
    expect(existsSync(body.replaced)).toBe(true);
  });
});
