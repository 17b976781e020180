import { execFile } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { beforeAll, describe, expect, it } from 'vitest';
import { memoryIo } from '../../../server/cli/io';
import { run } from '../../../server/cli/commands/plan';
import { buildFloorPlanTemplate } from '../../../server/floor-plans/import/index';
import { col, editedTemplate } from '../../helpers/workbooks';

const dir = mkdtempSync(join(tmpdir(), 'aislewright-plan-cli-'));
const template = join(dir, 'template.xlsx');
const broken = join(dir, 'broken.xlsx');

beforeAll(() => {
  writeFileSync(template, buildFloorPlanTemplate());
  writeFileSync(
    broken,
    editedTemplate((s) => {
      s.bins![1]![col(s, 'bins', 'aisle')] = 'Q';
    }),
  );
});

async function cli(...args: string[]) {
  const io = memoryIo();
  const code = await run(args, io);
  return { code, out: io.stdout.join('\n'), err: io.stderr.join('\n') };
}

describe('aislewright plan check', () => {
  it('prints ok, no errors and the stats for the template, exit 0', async () => {
    const r = await cli('check', template);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out)).toEqual({
      ok: true,
      errors: [],
      warnings: [],
      stats: { aisles: 3, crossAisles: 2, bins: 30, accessPoints: 11, depots: 1, totalAisleLengthM: 60 },
    });
  });

  it('prints each error with sheet, row, column, value and message, exit 1', async () => {
    const r = await cli('check', broken);
    expect(r.code).toBe(1);
    const body = JSON.parse(r.out) as { ok: boolean; errors: unknown[] };
    expect(body.ok).toBe(false);
    expect(body.errors).toEqual([{ sheet: 'bins', row: 2, column: 'aisle', value: 'Q', message: 'aisle Q does not exist in the aisles sheet' }]);
  });

  it('checks a bins CSV against the layout of a workbook', async () => {
    const csv = join(dir, 'bins.csv');
    writeFileSync(csv, 'bin,aisle,y_m,side,level\nX-1,B,2,L,1\n');
    const r = await cli('check', csv, '--layout', template);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out).stats).toMatchObject({ bins: 1, aisles: 3 });
  });

  it('exits 2 with one line for a missing file or a bad subcommand', async () => {
    const missing = await cli('check', join(dir, 'nope.xlsx'));
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/^aislewright plan: cannot read .*nope\.xlsx \(ENOENT\)$/);
    const bad = await cli('frobnicate', template);
    expect(bad.code).toBe(2);
    expect(bad.err.split('\n')).toHaveLength(1);
  });
});

describe('aislewright plan distance', () => {
  // The template is one block with cross aisles at y = 0 and y = L = 20 m: textbook distances
  // (Bartholdi & Hackman, Warehouse & Distribution Science) are |y1 − y2| within an aisle and
  // |x1 − x2| + min(y1 + y2, 2L − y1 − y2) across aisles.
  it.each([
    ['A-01-01-1', 'A-04-01-1', Math.abs(1.25 - 8.75)],
    ['A-01-01-1', 'B-04-01-2', 3 + Math.min(1.25 + 8.75, 40 - 1.25 - 8.75)],
    ['C-03-01-1', 'A-04-01-1', 6 + Math.min(15.5 + 8.75, 40 - 15.5 - 8.75)],
  ])('walks %s → %s in the textbook distance', async (from, to, metres) => {
    const r = await cli('distance', template, '--from', from, '--to', to);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out).metres).toBeCloseTo(metres, 9);
  });

  it('measures from a depot by its code: a straight link to the nearest centre-line point, then along it', async () => {
    // Hand computation: PACK-1 at (2, −2) links 2 m to aisle A at y = 0, then 1.25 m to bay 1.
    const r = await cli('distance', template, '--from', 'PACK-1', '--to', 'A-01-01-1');
    expect(JSON.parse(r.out)).toEqual({ metres: 3.25 });
  });

  it('exits 2 with one line for an unknown bin or a missing --to', async () => {
    const unknown = await cli('distance', template, '--from', 'A-01-01-1', '--to', 'ZZ-99');
    expect(unknown).toMatchObject({ code: 2, out: '' });
    expect(unknown.err).toBe(`aislewright plan: unknown bin or depot 'ZZ-99' in ${template}`);
    const usage = await cli('distance', template, '--from', 'A-01-01-1');
    expect(usage.code).toBe(2);
    expect(usage.err).toBe('aislewright plan: both --from and --to are required');
  });

  it('exits 1 and points at plan check when the file has errors', async () => {
    const r = await cli('distance', broken, '--from', 'A-01-01-1', '--to', 'A-04-01-1');
    expect(r.code).toBe(1);
    expect(r.err).toBe(`aislewright plan: ${broken} has 1 errors; run aislewright plan check ${broken}`);
  });
});

describe('aislewright plan template', () => {
  it('writes a template that the check passes', async () => {
    const out = join(dir, 'written.xlsx');
    expect((await cli('template', out)).code).toBe(0);
    expect((await cli('check', out)).code).toBe(0);
  });
});

describe('the aislewright binary', () => {
  it('runs plan check through node server/cli/bin.mjs with the exit code of the check', async () => {
    const exec = promisify(execFile);
    const ok = await exec(process.execPath, ['server/cli/bin.mjs', 'plan', 'check', template], { cwd: process.cwd() });
    expect(JSON.parse(ok.stdout).ok).toBe(true);
    const failed = await exec(process.execPath, ['server/cli/bin.mjs', 'plan', 'check', broken]).then(
      () => null,
      (e: { code: number; stdout: string }) => e,
    );
    expect(failed?.code).toBe(1);
    expect(JSON.parse(failed!.stdout).errors[0].row).toBe(2);
  });
});
