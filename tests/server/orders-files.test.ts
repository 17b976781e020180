import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as XLSX from 'xlsx';
import { orderTemplate, skuTemplate } from '../../server/orders/orders.files';
import { csrf, makeTestApp, type TestApp } from '../helpers/app';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

const book = (sheet: string, rows: unknown[][]): Buffer => {
  const wb = XLSX.utils.book_new();
  XLSX.utils.book_append_sheet(wb, XLSX.utils.aoa_to_sheet(rows), sheet);
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx' }) as Buffer;
};
const upload = (path: string, bytes: Buffer, name: string) => t.as.supervisor.post(`/api/sites/${t.siteId}/${path}`).set(csrf).attach('file', bytes, name);
const count = async (table: string) => Number((await t.deps.db(table).count({ n: '*' }))[0]!.n);

describe('SKU master file', () => {
  it('reports every bad row with sheet, row, column and value, and saves nothing', async () => {
    const bytes = book('skus', [
      ['sku', 'description', 'bin', 'unit_weight_kg', 'unit_volume_l'],
      ['S-1', 'ok', 'A-01-01-1', 1, 1],
      ['S-2', 'heavy?', 'A-01-02-1', 'lots', 1],
      ['S-1', 'twice', 'A-01-03-1', 1, -2],
    ]);
    const res = await upload('skus/import', bytes, 'skus.xlsx');
    expect(res.body.ok).toBe(false);
    expect(res.body.errors).toEqual([
      { sheet: 'skus', row: 3, column: 'unit_weight_kg', value: 'lots', message: 'unit weight must be a number (kg)' },
      { sheet: 'skus', row: 4, column: 'sku', value: 'S-1', message: 'SKU S-1 appears twice (first on row 2)' },
      { sheet: 'skus', row: 4, column: 'unit_volume_l', value: '-2', message: 'unit volume cannot be negative' },
    ]);
    expect(await count('skus')).toBe(0);
  });

  it('names a missing column', async () => {
    const res = await upload(
      'skus/import',
      book('skus', [
        ['sku', 'bin'],
        ['S-1', 'A-01-01-1'],
      ]),
      'skus.xlsx',
    );
    expect(res.body.ok).toBe(false);
    expect(res.body.errors.map((e: { column: string }) => e.column)).toEqual(expect.arrayContaining(['unit_weight_kg', 'unit_volume_l']));
  });

  it('imports the template and warns that its bins are not on an active plan', async () => {
    const res = await upload('skus/import', skuTemplate(), 'template.xlsx');
    expect(res.body).toMatchObject({ ok: true, created: 3 });
    expect(res.body.warnings).toHaveLength(3);
    expect(res.body.warnings[0].message).toMatch(/not on the active floor plan/);
    const skus = await t.as.engineer.get(`/api/sites/${t.siteId}/skus`);
    expect(skus.body.map((s: { sku: string }) => s.sku)).toEqual(['MUG-0002', 'PAN-0003', 'TEA-0001']);
    expect(skus.body.every((s: { binOnActivePlan: boolean }) => !s.binOnActivePlan)).toBe(true);
  });
});

describe('order file', () => {
  it('imports the template, then a re-import creates nothing new', async () => {
    const first = await upload('orders/import', orderTemplate(), 'orders.xlsx');
    expect(first.body).toMatchObject({ ok: true, created: 2 });
    const again = await upload('orders/import', orderTemplate(), 'orders.xlsx');
    expect(again.body).toMatchObject({ ok: true, created: 0, unchanged: 2 });
    expect(await count('orders')).toBe(2);
    expect(await count('order_lines')).toBe(3);
  });

  it('accepts CSV and reports bad quantities and dates by row', async () => {
    const csv = 'order,sku,qty,due,priority\nCSV-1,TEA-0001,0,,\nCSV-2,MUG-0002,1,tomorrow,\nCSV-3,NOPE,1,,12\n';
    const res = await upload('orders/import', Buffer.from(csv), 'orders.csv');
    expect(res.body.ok).toBe(false);
    expect(res.body.errors.map((e: { row: number; column: string }) => `${e.row}:${e.column}`)).toEqual(['2:qty', '3:due', '4:sku', '4:priority']);
    expect(await count('orders')).toBe(2);
  });

  it('refuses a file that is not a spreadsheet', async () => {
    const res = await upload('orders/import', Buffer.from('%PDF-1.4 not a sheet'), 'orders.xlsx');
    expect(res.body.ok).toBe(false);
    expect(res.body.errors[0].message).toMatch(/not an .xlsx/);
  });

  it('keeps pickers and engineers from importing', async () => {
    expect((await t.as.picker.post(`/api/sites/${t.siteId}/orders/import`).set(csrf).attach('file', orderTemplate(), 'o.xlsx')).status).toBe(403);
    expect((await t.as.engineer.post(`/api/sites/${t.siteId}/orders/import`).set(csrf).attach('file', orderTemplate(), 'o.xlsx')).status).toBe(403);
  });
});
