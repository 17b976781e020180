/**
 * Reads an untrusted .xlsx or .csv into rows of allowlisted columns. Runs inside a fresh worker (see
 * run.ts): the caller has already refused oversized files and bad ZIP directories, so this side checks
 * the real unpacked sizes, parses with `dense: true`, trims each sheet's declared range to the cells it
 * really holds, and reads rows as arrays (`header: 1`) so header text never becomes an object key.
 */
import * as XLSX from 'xlsx';
import type { RowIssue } from '../../shared/imports';
import type { ImportLimits } from './limits';
import { inspectZip, looksLikeZip, verifyZipEntries } from './zip-guard';

export type CellValue = string | number | boolean | Date | null;

export interface ColumnSpec {
  /** Lower-case header text, e.g. `y_start_m`. */
  name: string;
  required: boolean;
}

export interface SheetSpec {
  /** Lower-case sheet name, e.g. `aisles`. */
  name: string;
  required: boolean;
  columns: readonly ColumnSpec[];
}

export interface WorkbookSpec {
  sheets: readonly SheetSpec[];
  /** The sheet a CSV file stands for (a CSV has one table); null when CSV files are refused. */
  csvSheet: string | null;
}

export interface SheetRow {
  /** Spreadsheet row number (header = 1). */
  row: number;
  /** Allowlisted columns only; a column absent from the sheet or blank in this row is null. */
  cells: Record<string, CellValue>;
}

export interface SheetData {
  name: string;
  found: boolean;
  /** Found, every required column present and no column named twice: its rows can be checked. */
  usable: boolean;
  /** Allowlisted columns present in the header, in spec order. */
  columns: string[];
  /** Non-blank data rows, in sheet order. */
  rows: SheetRow[];
}

export interface SpreadsheetRead {
  /** False when the file could not be read at all (issues say why). */
  ok: boolean;
  kind: 'xlsx' | 'csv' | null;
  /** One entry per spec sheet, in spec order. */
  sheets: SheetData[];
  issues: RowIssue[];
}

/** Sheet name used for problems of the whole file. */
export const FILE_SHEET = '(file)';

export type ParseProgress = (fraction: number) => void;

const CFB_MAGIC = [0xd0, 0xcf, 0x11, 0xe0];

/** Which reader a file needs, by its content first and its name second. */
export function detectKind(bytes: Uint8Array, filename: string): 'xlsx' | 'csv' | { refused: string } {
  if (looksLikeZip(bytes)) return 'xlsx';
  if (CFB_MAGIC.every((b, i) => bytes[i] === b)) {
    return { refused: 'the file is an old-format .xls or a password-protected workbook; save it as .xlsx without a password' };
  }
  const lower = filename.toLowerCase();
  if (lower.endsWith('.csv') || lower.endsWith('.txt')) return 'csv';
  if (lower.endsWith('.xlsx') || lower.endsWith('.xlsm')) return { refused: 'the file is not an .xlsx workbook (it is not a ZIP archive)' };
  return { refused: 'unsupported file type; upload an .xlsx workbook or a .csv file' };
}

/**
 * Reads `bytes` against `spec`. Never throws for bad input: every problem is a RowIssue. Cost is
 * O(cells actually present), whatever range the sheet declares.
 */
export function readSpreadsheet(
  bytes: Uint8Array,
  filename: string,
  spec: WorkbookSpec,
  limits: ImportLimits,
  onProgress: ParseProgress = () => {},
): SpreadsheetRead {
  const issues: RowIssue[] = [];
  const fileIssue = (message: string): SpreadsheetRead => ({
    ok: false,
    kind: null,
    sheets: spec.sheets.map((s) => emptySheet(s.name)),
    issues: [{ sheet: FILE_SHEET, row: null, column: null, value: null, message }],
  });
  if (bytes.length > limits.maxFileBytes) {
    return fileIssue(`the file is ${bytes.length} bytes; at most ${limits.maxFileBytes} are accepted`);
  }
  const kind = detectKind(bytes, filename);
  if (typeof kind === 'object') return fileIssue(kind.refused);
  onProgress(0);

  // Past the ratio and size guards the parser still gets at most sheetRows rows per sheet.
  const common: XLSX.ParsingOptions = {
    dense: true,
    sheetRows: limits.maxRowsPerSheet + 2,
    cellFormula: false,
    cellHTML: false,
    cellText: false,
    cellStyles: false,
    cellDates: true,
    bookVBA: false,
  };
  let workbook: XLSX.WorkBook;
  const found = new Map<string, string>();
  try {
    if (kind === 'xlsx') {
      const zip = inspectZip(bytes, limits);
      if (!zip.ok) return fileIssue(zip.message);
      const lie = verifyZipEntries(bytes, zip.entries);
      if (lie) return fileIssue(lie);
      const names = XLSX.read(bytes, { type: 'buffer', bookSheets: true }).SheetNames;
      for (const actual of names) {
        const key = actual.trim().toLowerCase();
        const wanted = spec.sheets.find((s) => s.name === key);
        if (!wanted) continue;
        if (found.has(key)) {
          issues.push({ sheet: actual, row: null, column: null, value: actual, message: `two sheets are named ${key}; keep one` });
          continue;
        }
        found.set(key, actual);
      }
      workbook = found.size === 0 ? XLSX.utils.book_new() : XLSX.read(bytes, { ...common, type: 'buffer', sheets: [...found.values()] });
    } else {
      if (!spec.csvSheet) return fileIssue('CSV files are not accepted here; upload an .xlsx workbook');
      let text: string;
      try {
        text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(bytes);
      } catch {
        return fileIssue('the CSV file is not UTF-8 text; save it as "CSV UTF-8"');
      }
      if (text.includes('\u0000')) return fileIssue('the CSV file holds binary data');
      // raw: every CSV cell stays text, so "=…" is never taken for a formula and numbers are ours to parse.
      workbook = XLSX.read(text, { ...common, type: 'string', raw: true });
      const first = workbook.SheetNames[0];
      if (first !== undefined) found.set(spec.csvSheet, first);
    }
  } catch (e) {
    return fileIssue(`the file could not be read as a spreadsheet (${e instanceof Error ? e.message.slice(0, 200) : 'unknown error'})`);
  }
  onProgress(0.8);

  const sheets: SheetData[] = [];
  spec.sheets.forEach((sheetSpec, k) => {
    const actual = found.get(sheetSpec.name);
    const ws = actual === undefined ? undefined : workbook.Sheets[actual];
    if (!ws) {
      if (sheetSpec.required && (kind === 'xlsx' || sheetSpec.name === spec.csvSheet)) {
        issues.push({ sheet: sheetSpec.name, row: null, column: null, value: null, message: `sheet ${sheetSpec.name} is missing` });
      }
      sheets.push(emptySheet(sheetSpec.name));
    } else {
      sheets.push(readSheet(ws, kind === 'csv' ? sheetSpec.name : actual!, sheetSpec, limits, issues));
    }
    onProgress(0.8 + (0.2 * (k + 1)) / spec.sheets.length);
  });
  return { ok: true, kind, sheets, issues };
}

export function emptySheet(name: string): SheetData {
  return { name, found: false, usable: false, columns: [], rows: [] };
}

function readSheet(ws: XLSX.WorkSheet, sheetName: string, spec: SheetSpec, limits: ImportLimits, issues: RowIssue[]): SheetData {
  const data = (ws['!data'] ?? []) as (XLSX.CellObject | undefined)[][];
  // The declared range (`!ref`) may claim a million rows; the extent of real cells is what we read.
  let lastRow = -1;
  let lastCol = -1;
  let overflow: string | null = null;
  for (let r = 0; r < data.length; r++) {
    const row = data[r];
    if (!row) continue;
    for (let c = row.length - 1; c >= 0; c--) {
      if (isBlank(row[c]?.v)) continue;
      lastRow = r;
      if (c >= limits.maxColumns) {
        overflow ??= XLSX.utils.encode_cell({ r, c });
        lastCol = Math.max(lastCol, limits.maxColumns - 1);
      } else {
        lastCol = Math.max(lastCol, c);
      }
      break;
    }
  }
  const result: SheetData = { name: spec.name, found: true, usable: false, columns: [], rows: [] };
  const sheetIssue = (message: string, row: number | null = null, column: string | null = null, value: string | null = null) =>
    issues.push({ sheet: sheetName, row, column, value, message });
  if (overflow) {
    sheetIssue(
      `cell ${overflow} lies past column ${XLSX.utils.encode_col(limits.maxColumns - 1)}; only the first ${limits.maxColumns} columns are read — remove the values there`,
    );
  }
  if (lastRow > limits.maxRowsPerSheet) {
    sheetIssue(`the sheet has more than ${limits.maxRowsPerSheet} data rows; split it into several files`);
    return result;
  }
  if (lastRow < 0) {
    if (spec.required) sheetIssue(`sheet ${spec.name} is empty; row 1 must hold the column names`, 1);
    return result;
  }

  const rows = XLSX.utils.sheet_to_json<unknown[]>(ws, {
    header: 1,
    raw: true,
    blankrows: true,
    defval: null,
    range: { s: { r: 0, c: 0 }, e: { r: lastRow, c: lastCol } },
  });

  const header = rows[0] ?? [];
  const known = new Map(spec.columns.map((c) => [c.name, c] as const));
  const columnAt: (string | null)[] = [];
  const seen = new Map<string, number>();
  let duplicate = false;
  for (let c = 0; c <= lastCol; c++) {
    const raw = header[c];
    const text = isBlank(raw) ? '' : String(raw).trim();
    const key = text.toLowerCase();
    columnAt.push(null);
    if (text === '') continue;
    const cell = XLSX.utils.encode_cell({ r: 0, c });
    if (!known.has(key)) {
      sheetIssue(
        `unknown column "${clip(text)}" in cell ${cell}; the columns of ${spec.name} are ${spec.columns.map((s) => s.name).join(', ')}`,
        1,
        clip(text),
        clip(text),
      );
      continue;
    }
    if (seen.has(key)) {
      sheetIssue(`column ${key} appears twice (cells ${XLSX.utils.encode_cell({ r: 0, c: seen.get(key)! })} and ${cell}); keep one`, 1, key, clip(text));
      duplicate = true;
      continue;
    }
    seen.set(key, c);
    columnAt[c] = key;
  }
  let missing = false;
  for (const col of spec.columns) {
    if (col.required && !seen.has(col.name)) {
      sheetIssue(`column ${col.name} is missing from the header row`, 1, col.name);
      missing = true;
    }
  }
  result.columns = spec.columns.filter((c) => seen.has(c.name)).map((c) => c.name);
  result.usable = !missing && !duplicate;

  const unnamedReported = new Set<number>();
  for (let i = 1; i < rows.length; i++) {
    const values = rows[i];
    if (!values || values.every(isBlank)) continue;
    const cells: Record<string, CellValue> = Object.create(null) as Record<string, CellValue>;
    for (const col of spec.columns) cells[col.name] = null;
    let rowOk = true;
    for (let c = 0; c < values.length && c <= lastCol; c++) {
      const v = values[c];
      if (isBlank(v)) continue;
      const name = columnAt[c];
      if (name === null || name === undefined) {
        const headerText = header[c];
        if (isBlank(headerText) && !unnamedReported.has(c)) {
          unnamedReported.add(c);
          sheetIssue(`column ${XLSX.utils.encode_col(c)} holds values but has no name in row 1`, i + 1, XLSX.utils.encode_col(c), clip(String(v)));
        }
        continue;
      }
      const value = normalise(v);
      if (typeof value === 'string' && value.length > limits.maxCellChars) {
        sheetIssue(`longer than ${limits.maxCellChars} characters`, i + 1, name, clip(value));
        rowOk = false;
        continue;
      }
      cells[name] = value;
    }
    if (rowOk) result.rows.push({ row: i + 1, cells });
  }
  return result;
}

function isBlank(v: unknown): boolean {
  return v === null || v === undefined || (typeof v === 'string' && v.trim() === '');
}

function normalise(v: unknown): CellValue {
  if (typeof v === 'string') return v.trim();
  if (typeof v === 'number') return Number.isFinite(v) ? v : String(v);
  if (typeof v === 'boolean' || v instanceof Date) return v;
  return v === null || v === undefined ? null : String(v);
}

/** Issue values are shown in a table; keep them short. */
export function clip(text: string, max = 100): string {
  return text.length > max ? `${text.slice(0, max - 1)}…` : text;
}
