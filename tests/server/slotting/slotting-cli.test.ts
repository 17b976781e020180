/**
 * `aislewright slotting`: files in, the new SKU master out in the import format (read back through the
 * SKU import's own checks), figures printed; bad input is one line and exit 2.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as XLSX from 'xlsx';
import { afterAll, describe, expect, it } from 'vitest';
import { run } from '../../../server/cli/commands/slotting';
import { memoryIo } from '../../../server/cli/io';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { buildWalkGraph } from '../../../server/core/plan/walk-graph';
import { createRng } from '../../../server/core/rng';
import { generateSlottingScenario, slotBinsOf } from '../../../server/core/slotting/generate';
import { floorPlanToWorkbook } from '../../../server/floor-plans/import/index';
import { readTableFile } from '../../../server/orders/orders.files';
import { validateSkuRows } from '../../../server/orders/orders.validate';

const dir = mkdtempSync(join(tmpdir(), 'aw-slotting-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const sheet = (name: string, rows: unknown[][]): Buffer => {
  const wb = XLSX.utils.book_new();
  XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet(rows), name);
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx' }) as Buffer;
};
const write = (name: string, bytes: Buffer | string): string => {
  const path = join(dir, name);
  writeFileSync(path, bytes);
  return path;
};

// A generated plan, 80 invented SKUs slotted at random, 6 days of 20/80 orders.
const plan = generateRectangularPlan({ aisles: 5, aisleLengthM: 20, aisleSpacingM: 3, baysPerAisle: 8, levels: 2 });
const graph = buildWalkGraph(plan);
const scenario = generateSlottingScenario({ bins: slotBinsOf(plan, graph), skuCount: 80, days: 6, ordersPerDay: 15, maxLines: 3, rng: createRng(9) });
const planPath = write('plan.xlsx', floorPlanToWorkbook(plan));
const skuPath = write(
  'skus.xlsx',
  sheet('skus', [
    ['sku', 'description', 'bin', 'unit_weight_kg', 'unit_volume_l'],
    ...scenario.skus.map((s) => [s.code, `Item ${s.code}`, s.bin, s.unitKg, s.unitLitres]),
  ]),
);
const historyPath = write(
  'history.xlsx',
  sheet('orders', [
    ['order', 'sku', 'qty', 'due', 'priority'],
    ...scenario.history.flatMap((o) => o.lines.map((l) => [o.ref, l.sku, l.qty, `2026-11-${String(10 + o.day).padStart(2, '0')}T15:00:00Z`, ''])),
  ]),
);

async function slot(extra: string[]) {
  const io = memoryIo();
  const code = await run(extra, io);
  return { code, out: code === 0 ? JSON.parse(io.stdout.join('')) : null, err: io.stderr.join('\n') };
}

describe('aislewright slotting', () => {
  it('writes a SKU master the import accepts, with the moves it printed and less walking on the later days', async () => {
    const out = join(dir, 'new-skus.xlsx');
    const r = await slot(['--plan', planPath, '--skus', skuPath, '--history', historyPath, '--method', 'popularity', '--max-moves', '20', '--out', out]);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(r.out.moveCount).toBe(r.out.moves.length);
    expect(r.out.moveCount).toBeGreaterThan(0);
    expect(r.out.moveCount).toBeLessThanOrEqual(20);
    expect(r.out.learn.days + r.out.test.days).toBe(6);
    expect(r.out.metresAfter).toBeLessThan(r.out.metresBefore);
    const read = await readTableFile(new Uint8Array(readFileSync(out)), 'new-skus.xlsx', 'skus');
    if ('issues' in read) throw new Error(JSON.stringify(read.issues));
    const checked = validateSkuRows('skus', read.rows);
    expect(checked.errors).toEqual([]);
    const bins = new Map(checked.skus.map((s) => [s.sku, s.bin]));
    expect(bins.size).toBe(80);
    expect(r.out.moves.length).toBeGreaterThan(0);
    for (const m of r.out.moves) expect(bins.get(m.sku)).toBe(m.toBin);
    const moved = scenario.skus.filter((s) => bins.get(s.code) !== s.bin).length;
    expect(moved).toBe(r.out.moveCount);
  });

  it.each([
    [['--plan', 'x.xlsx'], '--skus is required'],
    [['--plan', 'p', '--skus', 's', '--history', 'h', '--out', 'o', '--method', 'alphabetical'], "unknown method 'alphabetical'"],
    [['--plan', 'p', '--skus', 's', '--history', 'h', '--out', 'o', '--max-moves', '-3'], '--max-moves must be a whole number'],
    [['--plan', join(dir, 'missing.xlsx'), '--skus', 's', '--history', 'h', '--out', 'o'], 'no such file'],
  ])('bad input %j: one line, exit 2', async (args, message) => {
    const r = await slot(args);
    expect(r.code).toBe(2);
    expect(r.err.split('\n')).toHaveLength(1);
    expect(r.err).toContain(message);
  });

  it('a history naming an unknown SKU is refused with the row, nothing written', async () => {
    const bad = write('bad-history.csv', 'order,sku,qty\nX-1,NOPE-1,1\n');
    const out = join(dir, 'never.xlsx');
    const r = await slot(['--plan', planPath, '--skus', skuPath, '--history', bad, '--out', out]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/history file has 1 problem.*row 2/);
    expect(() => readFileSync(out)).toThrow();
  });
});
