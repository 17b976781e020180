import * as XLSX from 'xlsx';
import type { RowIssue } from '../../shared/imports';
import type { ImportResult } from '../../shared/orders';
import { DEFAULT_IMPORT_LIMITS } from '../imports/limits';
import { readSpreadsheetFile } from '../imports/run';
import type { WorkbookSpec } from '../imports/spreadsheet';
import { ORDER_COLUMNS, ORDER_REQUIRED, SKU_COLUMNS, SKU_REQUIRED, type InputRow } from './orders.validate';

const spec = (sheet: string, columns: readonly string[], required: readonly string[]): WorkbookSpec => ({
  sheets: [{ name: sheet, required: true, columns: columns.map((name) => ({ name, required: required.includes(name) })) }],
  csvSheet: sheet,
});

export const SKU_SPEC = spec('skus', SKU_COLUMNS, SKU_REQUIRED);
export const ORDER_SPEC = spec('orders', ORDER_COLUMNS, ORDER_REQUIRED);

/**
 * Reads an uploaded SKU master or order file (xlsx with a `skus` / `orders` sheet, or CSV) in a
 * worker through the shared safe reader. Returns the rows, or the issues that stopped reading.
 */
export async function readTableFile(bytes: Uint8Array, filename: string, which: 'skus' | 'orders'): Promise<{ rows: InputRow[] } | { issues: RowIssue[] }> {
  const read = await readSpreadsheetFile(bytes, filename, which === 'skus' ? SKU_SPEC : ORDER_SPEC, DEFAULT_IMPORT_LIMITS);
  const sheet = read.sheets[0];
  if (!read.ok || read.issues.length || !sheet?.usable)
    return {
      issues: read.issues.length ? read.issues : [{ sheet: which, row: null, column: null, value: null, message: `the ${which} sheet cannot be read` }],
    };
  return { rows: sheet.rows.map((r) => ({ row: r.row, values: r.cells })) };
}

export const failed = (errors: RowIssue[]): ImportResult => ({ ok: false, errors, warnings: [], created: 0, unchanged: 0, updated: 0 });

/** Downloadable templates with a worked example of our own (invented SKUs). */
export function skuTemplate(): Buffer {
  const wb = XLSX.utils.book_new();
  XLSX.utils.book_append_sheet(
    wb,
    XLSX.utils.aoa_to_sheet([
      ['How to fill this workbook'],
      ['One row per SKU on the "skus" sheet. Columns: sku (your code), description, bin (the bin code on your floor plan),'],
      ['unit_weight_kg (kilograms per unit), unit_volume_l (litres per unit). Re-importing a SKU updates it.'],
    ]),
    'instructions',
  );
  XLSX.utils.book_append_sheet(
    wb,
    XLSX.utils.aoa_to_sheet([
      [...SKU_COLUMNS],
      ['TEA-0001', 'Loose-leaf tea, 250 g tin', 'A-01-01-1', 0.3, 0.6],
      ['MUG-0002', 'Stoneware mug, teal', 'A-02-03-2', 0.45, 0.9],
      ['PAN-0003', 'Enamel pan, 24 cm', 'B-05-01-1', 1.6, 4.5],
    ]),
    'skus',
  );
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx' }) as Buffer;
}

export function orderTemplate(): Buffer {
  const wb = XLSX.utils.book_new();
  XLSX.utils.book_append_sheet(
    wb,
    XLSX.utils.aoa_to_sheet([
      ['How to fill this workbook'],
      ['One row per order line on the "orders" sheet. Columns: order (your order reference), sku, qty (whole units),'],
      ['due (optional, ISO 8601 such as 2026-12-03T14:00:00Z), priority (optional, 1–9, 1 is the most urgent).'],
      ['An order reference that was imported before is not duplicated.'],
    ]),
    'instructions',
  );
  XLSX.utils.book_append_sheet(
    wb,
    XLSX.utils.aoa_to_sheet([
      [...ORDER_COLUMNS],
      ['WEB-10001', 'TEA-0001', 2, '2026-12-03T14:00:00Z', 1],
      ['WEB-10001', 'MUG-0002', 1, '2026-12-03T14:00:00Z', 1],
      ['WEB-10002', 'PAN-0003', 1, '2026-12-03T16:00:00Z', ''],
    ]),
    'orders',
  );
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx' }) as Buffer;
}
