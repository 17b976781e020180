/**
 * The downloadable error table (sheet, row, column, value, message) as .xlsx or .csv. Values come
 * from untrusted files, so every cell is written as plain text and CSV cells that a spreadsheet
 * program would run as a formula are neutralised (OWASP, "CSV Injection": prefix a single quote).
 */
import * as XLSX from 'xlsx';
import type { RowIssue } from '../../shared/imports';
import { csvDocument, neutraliseCells } from '../../shared/input-rules';

const HEADER = ['sheet', 'row', 'column', 'value', 'message'] as const;

function cellsOf(issue: RowIssue): (string | number)[] {
  return [issue.sheet, issue.row ?? '', issue.column ?? '', issue.value ?? '', issue.message];
}

/**
 * One sheet named `errors`; text cells stay text (type "s"), so nothing in them is evaluated, and a
 * text starting like a formula also gets the leading quote, so it stays inert when the sheet is
 * saved again as CSV by a spreadsheet program.
 */
export function rowIssuesToXlsx(issues: readonly RowIssue[]): Buffer {
  const ws = XLSX.utils.aoa_to_sheet(neutraliseCells([[...HEADER], ...issues.map(cellsOf)]), { dense: true });
  ws['!cols'] = [{ wch: 14 }, { wch: 7 }, { wch: 14 }, { wch: 24 }, { wch: 80 }];
  const wb = XLSX.utils.book_new();
  XLSX.utils.book_append_sheet(wb, ws, 'errors');
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx', compression: true }) as Buffer;
}

/**
 * RFC 4180 CSV with CRLF line ends and a UTF-8 byte-order mark (so spreadsheet programs pick UTF-8).
 * A text cell starting with = + - @ tab or CR gets a leading single quote.
 */
export function rowIssuesToCsv(issues: readonly RowIssue[]): string {
  return csvDocument([[...HEADER], ...issues.map(cellsOf)]);
}
