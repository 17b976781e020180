/**
 * Every download this product writes from its own data (audit log, orders, pick lines, users, site
 * data) goes through these functions, so there is one place that decides how a cell is written.
 * Text that a spreadsheet program would run as a formula (starting with = + - @ tab or CR) gets a
 * leading single quote (OWASP, "CSV Injection"); numbers stay numbers.
 */
import { sendAttachment, XLSX_TYPE } from '../http/attachment';
import * as XLSX from 'xlsx';
import type { ExportFormat } from '../../shared/data-safety';

export type Cell = string | number | boolean | null | undefined;

export interface Table {
  /** Sheet name (at most 31 characters) and the base of the file name. */
  name: string;
  header: readonly string[];
  rows: readonly (readonly Cell[])[];
}

/** Excel's limit for one cell. */
const MAX_CELL_CHARS = 32_767;

/** A formula-like text cell made inert; anything else unchanged. */
export function neutraliseCell(v: Cell): string | number | boolean {
  if (v === null || v === undefined) return '';
  if (typeof v !== 'string') return v;
  const safe = /^[=+\-@\t\r]/.test(v) ? `'${v}` : v;
  return safe.length > MAX_CELL_CHARS ? `${safe.slice(0, MAX_CELL_CHARS - 14)} …(truncated)` : safe;
}

function sheetOf(t: Table): XLSX.WorkSheet {
  const aoa = [t.header.map(neutraliseCell), ...t.rows.map((r) => r.map(neutraliseCell))];
  const ws = XLSX.utils.aoa_to_sheet(aoa, { dense: true });
  ws['!cols'] = t.header.map((h) => ({ wch: Math.min(Math.max(h.length + 2, 12), 40) }));
  return ws;
}

/** One workbook, a sheet per table (names made unique and ≤ 31 characters). */
export function tablesToXlsx(tables: readonly Table[]): Buffer {
  const wb = XLSX.utils.book_new();
  const used = new Set<string>();
  for (const t of tables) {
    let name = t.name.replace(/[\\/?*[\]:]/g, '_').slice(0, 31) || 'sheet';
    for (let k = 2; used.has(name); k++) name = `${t.name.slice(0, 27)} ${k}`;
    used.add(name);
    XLSX.utils.book_append_sheet(wb, sheetOf(t), name);
  }
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx', compression: true }) as Buffer;
}

/** RFC 4180 CSV, CRLF line ends, UTF-8 byte-order mark (spreadsheet programs then read UTF-8). */
export function tableToCsv(t: Table): string {
  const line = (cells: readonly Cell[]) => cells.map((c) => csvCell(neutraliseCell(c))).join(',');
  return `\ufeff${[line(t.header), ...t.rows.map(line)].join('\r\n')}\r\n`;
}

function csvCell(v: string | number | boolean): string {
  if (typeof v !== 'string') return String(v);
  return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

export interface ExportFile {
  filename: string;
  contentType: string;
  body: Buffer | string;
}

export { XLSX_TYPE };

/** The file for one table in the format asked for. */
export function exportTable(t: Table, format: ExportFormat, stem: string): ExportFile {
  return format === 'csv'
    ? { filename: `${stem}.csv`, contentType: 'text/csv; charset=utf-8', body: tableToCsv(t) }
    : { filename: `${stem}.xlsx`, contentType: XLSX_TYPE, body: tablesToXlsx([t]) };
}

/** Sends an export as a download. */
export function sendExport(res: Parameters<typeof sendAttachment>[0], f: ExportFile): undefined {
  return sendAttachment(res, f.body, f.contentType, f.filename);
}
