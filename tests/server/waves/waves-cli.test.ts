import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as XLSX from 'xlsx';
import { afterAll, describe, expect, it } from 'vitest';
import { parseCart, run } from '../../../server/cli/commands/waves';
import { memoryIo } from '../../../server/cli/io';
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import { createRng } from '../../../server/core/rng';
import { floorPlanToWorkbook } from '../../../server/floor-plans/import/index';

const dir = mkdtempSync(join(tmpdir(), 'aw-waves-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const sheet = (name: string, rows: unknown[][]): Buffer => {
  const wb = XLSX.utils.book_new();
  XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet(rows), name);
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx' }) as Buffer;
};
const write = (name: string, bytes: Buffer): string => {
  const path = join(dir, name);
  writeFileSync(path, bytes);
  return path;
};

// A generated plan written as a workbook, 40 invented SKUs on its bins, 30 orders of 2–4 lines.
const plan = generateRectangularPlan({ aisles: 6, aisleLengthM: 24, aisleSpacingM: 3, baysPerAisle: 10, levels: 2 });
const rng = createRng(5);
const skuRows: unknown[][] = [['sku', 'description', 'bin', 'unit_weight_kg', 'unit_volume_l']];
const skuData = new Map<string, { kg: number; litres: number; bin: string }>();
for (let i = 0; i < 40; i++) {
  const bin = plan.bins[rng.int(plan.bins.length)]!.code;
  const kg = Math.round((0.2 + 3 * rng.next()) * 100) / 100;
  const litres = Math.round((0.5 + 6 * rng.next()) * 100) / 100;
  skuRows.push([`SKU-${i}`, `Item ${i}`, bin, kg, litres]);
  skuData.set(`SKU-${i}`, { kg, litres, bin });
}
skuRows.push(['SKU-GONE', 'Slotted in a bin no plan has', 'Z-99-99-1', 1, 1]);
skuData.set('SKU-GONE', { kg: 1, litres: 1, bin: 'Z-99-99-1' });
skuRows.push(['SKU-ANVIL', 'Too heavy for any cart', plan.bins[3]!.code, 500, 2]);
skuData.set('SKU-ANVIL', { kg: 500, litres: 2, bin: plan.bins[3]!.code });
const orderRows: unknown[][] = [['order', 'sku', 'qty', 'due', 'priority']];
for (let o = 0; o < 30; o++) {
  const lines = 2 + rng.int(3);
  for (let k = 0; k < lines; k++)
    orderRows.push([`W-${100 + o}`, `SKU-${rng.int(40)}`, 1 + rng.int(3), `2026-12-03T${String(8 + (o % 10)).padStart(2, '0')}:00:00Z`, '']);
}
orderRows.push(['W-LOST', 'SKU-GONE', 1, '', '']);
orderRows.push(['W-HEAVY', 'SKU-ANVIL', 1, '', '']);

const planPath = write('plan.xlsx', floorPlanToWorkbook(plan));
const skuPath = write('skus.xlsx', sheet('skus', skuRows));
const orderPath = write('orders.xlsx', sheet('orders', orderRows));
const cartFlag = 'totes=6,kg=60,litres=120';

interface Output {
  trips: {
    orders: string[];
    stops: { n: number; bins: string[]; lines: { order: string; sku: string; qty: number; bin: string; tote: number }[] }[];
    metres: number;
  }[];
  totalMetres: number;
  unplaced: { order: string; reason: string }[];
  comparison: { singleMetres: number; sShapeMetres: number | null };
}

// Each run starts import workers (seconds on the shared machine), so a flag set is run once.
const runs = new Map<string, Promise<{ code: number; out: Output | null; err: string }>>();
function plan_(batching: string, extra: string[] = []): Promise<{ code: number; out: Output | null; err: string }> {
  const key = [batching, ...extra].join(' ');
  if (!runs.has(key)) runs.set(key, runOnce(batching, extra));
  return runs.get(key)!;
}

async function runOnce(batching: string, extra: string[]): Promise<{ code: number; out: Output | null; err: string }> {
  const io = memoryIo();
  const code = await run(['plan', '--plan', planPath, '--skus', skuPath, '--orders', orderPath, '--cart', cartFlag, '--batching', batching, ...extra], io);
  return { code, out: code === 0 ? (JSON.parse(io.stdout.join('')) as Output) : null, err: io.stderr.join('\n') };
}

describe('aislewright waves plan', () => {
  it.each(['single', 'fcfs', 'seed', 'savings', 'search'])('%s: every order line in one trip within the cart, the rest named', async (batching) => {
    const { code, out } = await plan_(batching);
    expect(code).toBe(0);
    const o = out!;
    // Every order line of the file is picked once, or its order is unplaced.
    const expected = orderRows
      .slice(1)
      .map((r) => JSON.stringify([r[0], r[1], r[2]]))
      .sort();
    const unplaced = new Set(o.unplaced.map((u) => u.order));
    const picked = o.trips.flatMap((t) => t.stops.flatMap((s) => s.lines.map((l) => JSON.stringify([l.order, l.sku, l.qty]))));
    expect([...picked, ...expected.filter((k) => unplaced.has(JSON.parse(k)[0]))].sort()).toEqual(expected);
    expect(o.unplaced.map((u) => u.order).sort()).toEqual(['W-HEAVY', 'W-LOST']);
    expect(o.unplaced.find((u) => u.order === 'W-LOST')!.reason).toMatch(/Z-99-99-1.*not on the floor plan/);
    expect(o.unplaced.find((u) => u.order === 'W-HEAVY')!.reason).toMatch(/500 kg/);
    for (const t of o.trips) {
      let kg = 0;
      for (const s of t.stops) {
        for (const l of s.lines) {
          kg += l.qty * skuData.get(l.sku)!.kg;
          expect(skuData.get(l.sku)!.bin).toBe(l.bin);
          expect(t.orders).toContain(l.order);
          expect(s.bins).toContain(l.bin);
        }
      }
      expect(kg).toBeLessThanOrEqual(60 + 1e-9);
      expect(t.stops.map((s) => s.n)).toEqual(t.stops.map((_, i) => i + 1));
    }
    expect(o.totalMetres).toBeCloseTo(
      o.trips.reduce((s, t) => s + t.metres, 0),
      1,
    );
    // A generated rectangular plan is a block layout, so the S-shape comparison is there.
    expect(o.comparison.sShapeMetres).toBeGreaterThan(0);
  });

  it('walks less with savings than with one order per trip', async () => {
    const single = (await plan_('single')).out!;
    const savings = (await plan_('savings')).out!;
    expect(savings.totalMetres).toBeLessThan(single.totalMetres);
    expect(savings.comparison.singleMetres).toBeGreaterThan(savings.totalMetres);
  });

  it('lists a bad order file row by row and plans nothing', async () => {
    const bad = write(
      'bad-orders.xlsx',
      sheet('orders', [
        ['order', 'sku', 'qty'],
        ['W-1', 'SKU-1', 0],
        ['W-2', 'NOPE', 1],
      ]),
    );
    const io = memoryIo();
    const code = await run(['plan', '--plan', planPath, '--skus', skuPath, '--orders', bad, '--cart', cartFlag, '--batching', 'fcfs'], io);
    expect(code).toBe(2);
    expect(io.stdout).toEqual([]);
    const err = io.stderr.join('\n');
    expect(err).toMatch(/orders file has 2 problem/);
    expect(err).toMatch(/row 2, qty/);
    expect(err).toMatch(/row 3, sku: SKU NOPE is not in the SKU master/);
  });

  it('refuses bad flags with one line and exit 2', async () => {
    const cases: [string[], RegExp][] = [
      [['plan', '--plan', planPath], /--skus is required/],
      [['plan', '--plan', planPath, '--skus', skuPath, '--orders', orderPath, '--cart', cartFlag, '--batching', 'zigzag'], /unknown batching 'zigzag'/],
      [['plan', '--plan', join(dir, 'none.xlsx'), '--skus', skuPath, '--orders', orderPath, '--cart', cartFlag, '--batching', 'fcfs'], /no such file/],
      [['route'], /unknown subcommand/],
    ];
    for (const [args, message] of cases) {
      const io = memoryIo();
      expect(await run(args, io)).toBe(2);
      expect(io.stderr.join('\n')).toMatch(message);
    }
  });

  it('parses a cart profile and names what is wrong with a bad one', () => {
    expect(parseCart('totes=8,kg=150,litres=400')).toEqual({ totes: 8, maxKg: 150, maxLitres: 400 });
    expect(() => parseCart('totes=8,kg=150')).toThrow(/litres is missing/);
    expect(() => parseCart('totes=2.5,kg=1,litres=1')).toThrow(/whole number/);
    expect(() => parseCart('totes=8,kg=-1,litres=1')).toThrow(/positive/);
    expect(() => parseCart('totes=8,weight=1,litres=1')).toThrow(/unknown key 'weight'/);
  });
});
