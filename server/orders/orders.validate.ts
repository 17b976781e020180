import type { RowIssue } from '../../shared/imports';
import {
  codeRule,
  MAX_LINE_QTY,
  MAX_UNIT_VOLUME_L,
  MAX_UNIT_WEIGHT_KG,
  textProblem,
  textRule,
  trimSpaces,
  visibleText,
  type TextRule,
} from '../../shared/input-rules';

/** A data row as read from a sheet: its spreadsheet row number and its cells by expected column. */
export interface InputRow {
  row: number;
  values: Record<string, unknown>;
}

export interface SkuRecord {
  sku: string;
  description: string;
  bin: string;
  unitWeightKg: number;
  unitVolumeL: number;
}

export interface OrderRecord {
  ref: string;
  due: string | null;
  priority: number | null;
  lines: { sku: string; qty: number }[];
  /** Spreadsheet row of the order's first line (for messages). */
  row: number | null;
}

export const SKU_COLUMNS = ['sku', 'description', 'bin', 'unit_weight_kg', 'unit_volume_l'] as const;
export const SKU_REQUIRED = ['sku', 'bin', 'unit_weight_kg', 'unit_volume_l'] as const;
export const ORDER_COLUMNS = ['order', 'sku', 'qty', 'due', 'priority'] as const;
export const ORDER_REQUIRED = ['order', 'sku', 'qty'] as const;

// Spaces are trimmed; a tab or line break at either end stays and is refused by the rule set.
const text = (v: unknown): string => (v === null || v === undefined ? '' : trimSpaces(String(v)));
const shown = (v: unknown): string | null => (v === null || v === undefined || v === '' ? null : visibleText(String(v).slice(0, 100)));
/** A plain decimal number (a comma as the decimal mark is read as a point); no hex, no "Infinity". */
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

function num(v: unknown): number | null {
  if (typeof v === 'number') return Number.isFinite(v) ? v : null;
  const s = text(v).replace(/^([+-]?\d+),(\d+)$/, '$1.$2');
  if (!DECIMAL.test(s)) return null;
  const n = Number(s);
  return Number.isFinite(n) ? n : null;
}

/** The rule set's verdict on a text field, worded for the error table; null when it is fine. */
function ruled(label: string, value: string, rule: TextRule): string | null {
  const p = textProblem(value, rule);
  return p ? `${label} ${p}` : null;
}

/** ISO 8601 date or date-time; spreadsheet dates arrive as JS Dates when cellDates is on. */
export function isoDue(v: unknown): string | null | 'invalid' {
  if (v === null || v === undefined || v === '') return null;
  if (v instanceof Date) return Number.isNaN(v.getTime()) ? 'invalid' : v.toISOString();
  const s = text(v);
  if (!/^\d{4}-\d{2}-\d{2}([T ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})?)?$/.test(s)) return 'invalid';
  const d = new Date(s.length === 10 ? `${s}T23:59:59Z` : s.replace(' ', 'T'));
  return Number.isNaN(d.getTime()) ? 'invalid' : d.toISOString();
}

/** Checks SKU master rows; every problem is reported, nothing is half-accepted. */
export function validateSkuRows(sheet: string, rows: InputRow[]): { skus: SkuRecord[]; errors: RowIssue[] } {
  const errors: RowIssue[] = [];
  const seen = new Map<string, number>();
  const skus: SkuRecord[] = [];
  for (const { row, values } of rows) {
    const issue = (column: string, message: string): true => {
      errors.push({ sheet, row, column, value: shown(values[column]), message });
      return true;
    };
    const sku = text(values.sku);
    const bin = text(values.bin);
    const kg = num(values.unit_weight_kg);
    const litres = num(values.unit_volume_l);
    let bad = false;
    const description = text(values.description);
    const skuProblem = sku ? ruled('SKU', sku, codeRule) : null;
    const binProblem = bin ? ruled('bin', bin, codeRule) : null;
    const descriptionProblem = description ? ruled('description', description, textRule) : null;
    if (!sku) bad = issue('sku', 'SKU is empty');
    else if (skuProblem) bad = issue('sku', skuProblem);
    else if (seen.has(sku)) bad = issue('sku', `SKU ${sku} appears twice (first on row ${seen.get(sku)})`);
    if (!bin) bad = issue('bin', 'bin is empty');
    else if (binProblem) bad = issue('bin', binProblem);
    if (descriptionProblem) bad = issue('description', descriptionProblem);
    if (kg === null) bad = issue('unit_weight_kg', 'unit weight must be a number (kg)');
    else if (kg < 0) bad = issue('unit_weight_kg', 'unit weight cannot be negative');
    else if (kg > MAX_UNIT_WEIGHT_KG) bad = issue('unit_weight_kg', `unit weight must be at most ${MAX_UNIT_WEIGHT_KG.toLocaleString('en')} kg`);
    if (litres === null) bad = issue('unit_volume_l', 'unit volume must be a number (litres)');
    else if (litres < 0) bad = issue('unit_volume_l', 'unit volume cannot be negative');
    else if (litres > MAX_UNIT_VOLUME_L) bad = issue('unit_volume_l', `unit volume must be at most ${MAX_UNIT_VOLUME_L.toLocaleString('en')} litres`);
    if (sku && !skuProblem && !seen.has(sku)) seen.set(sku, row);
    if (!bad) skus.push({ sku, description, bin, unitWeightKg: kg!, unitVolumeL: litres! });
  }
  return { skus, errors };
}

/**
 * Checks order rows (one row per order line) against the known SKUs and groups them into orders.
 * An order's due and priority must agree on all its rows.
 */
export function validateOrderRows(sheet: string, rows: InputRow[], knownSku: (sku: string) => boolean): { orders: OrderRecord[]; errors: RowIssue[] } {
  const errors: RowIssue[] = [];
  const byRef = new Map<string, OrderRecord & { firstRow: number }>();
  for (const { row, values } of rows) {
    const issue = (column: string, message: string): true => {
      errors.push({ sheet, row, column, value: shown(values[column]), message });
      return true;
    };
    const ref = text(values.order);
    const sku = text(values.sku);
    const qty = num(values.qty);
    const due = isoDue(values.due);
    const prioText = text(values.priority);
    const priority = prioText === '' ? null : num(prioText);
    let bad = false;
    const refProblem = ref ? ruled('order reference', ref, codeRule) : null;
    const skuProblem = sku ? ruled('SKU', sku, codeRule) : null;
    if (!ref) bad = issue('order', 'order reference is empty');
    else if (refProblem) bad = issue('order', refProblem);
    if (!sku) bad = issue('sku', 'SKU is empty');
    else if (skuProblem) bad = issue('sku', skuProblem);
    else if (!knownSku(sku)) bad = issue('sku', `SKU ${sku} is not in the SKU master; import it first`);
    if (qty === null || !Number.isInteger(qty) || qty <= 0 || qty > MAX_LINE_QTY)
      bad = issue('qty', `quantity must be a whole number from 1 to ${MAX_LINE_QTY.toLocaleString('en')}`);
    if (due === 'invalid') bad = issue('due', 'due must be an ISO 8601 date or date-time, e.g. 2026-12-03T14:00:00Z');
    if (prioText !== '' && (priority === null || !Number.isInteger(priority) || priority < 1 || priority > 9))
      bad = issue('priority', 'priority must be a whole number from 1 (most urgent) to 9');
    if (bad) continue;
    const existing = byRef.get(ref);
    if (!existing) {
      byRef.set(ref, { ref, due: due as string | null, priority, lines: [{ sku, qty: qty! }], row, firstRow: row });
      continue;
    }
    if (values.due !== undefined && text(values.due) !== '' && due !== existing.due) issue('due', `order ${ref} has another due on row ${existing.firstRow}`);
    else if (prioText !== '' && priority !== existing.priority) issue('priority', `order ${ref} has another priority on row ${existing.firstRow}`);
    else existing.lines.push({ sku, qty: qty! });
  }
  return { orders: [...byRef.values()].map(({ firstRow: _f, ...o }) => o), errors };
}
