/**
 * Turning one cell into a typed value, with the wording of the problem when it cannot be. Shared by
 * every import (floor plans now, SKUs and orders later) so users read the same messages everywhere.
 */
import type { RowIssue } from '../../shared/imports';
import { textProblem, trimSpaces, visibleText } from '../../shared/input-rules';
import type { CellValue } from './spreadsheet';
import { clip } from './spreadsheet';

export type Read<T> = { ok: true; value: T } | { ok: false; message: string };

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** The cell as a user would see it, for the `value` column of an issue. */
export function displayValue(v: CellValue): string | null {
  if (v === null) return null;
  if (v instanceof Date) return Number.isNaN(v.getTime()) ? 'invalid date' : v.toISOString();
  return clip(visibleText(String(v)));
}

/** A finite number; text holding a plain decimal number is accepted (CSV cells are text). */
export function readNumber(v: CellValue, column: string): Read<number> {
  if (v === null) return { ok: false, message: `${column} is empty` };
  if (typeof v === 'number') return Number.isFinite(v) ? { ok: true, value: v } : { ok: false, message: `${column} must be a number` };
  if (typeof v === 'string') {
    const t = v.replace(/\s+/g, '');
    if (NUMBER.test(t)) return { ok: true, value: Number(t) };
    if (/^[+-]?\d+,\d+$/.test(t)) return { ok: false, message: `${column} must be a number; use a point as the decimal mark` };
  }
  return { ok: false, message: `${column} must be a number` };
}

/** A number of metres that is a length: strictly positive. */
export function readPositive(v: CellValue, column: string): Read<number> {
  const n = readNumber(v, column);
  if (!n.ok) return n;
  if (!(n.value > 0)) return { ok: false, message: `${column} must be a positive length in metres` };
  return n;
}

/** A whole number ≥ `min`. */
export function readInteger(v: CellValue, column: string, min: number): Read<number> {
  const n = readNumber(v, column);
  if (!n.ok) return n;
  if (!Number.isInteger(n.value) || n.value < min) return { ok: false, message: `${column} must be a whole number of at least ${min}` };
  return n;
}

/**
 * A code such as a bin or aisle code: text or a number written as text, under the rule set every
 * import shares (shared/input-rules.ts): at most `maxChars` long, no control or text-direction
 * characters, and not starting like a formula, so it is safe to write into any export.
 */
export function readCode(v: CellValue, column: string, maxChars = 64): Read<string> {
  if (v === null) return { ok: false, message: `${column} is empty` };
  if (typeof v !== 'string' && typeof v !== 'number') return { ok: false, message: `${column} must be text` };
  // A number cell (-5) is a value, not a formula; its text is checked for length only.
  const t = typeof v === 'string' ? trimSpaces(v) : String(v);
  if (t === '') return { ok: false, message: `${column} is empty` };
  const problem = typeof v === 'string' ? textProblem(t, { maxChars }) : t.length > maxChars ? `is longer than ${maxChars} characters` : null;
  return problem ? { ok: false, message: `${column} ${problem}` } : { ok: true, value: t };
}

/** Optional text: null when blank. */
export function readOptionalText(v: CellValue, column: string, maxChars = 64): Read<string | null> {
  if (v === null) return { ok: true, value: null };
  return readCode(v, column, maxChars);
}

/**
 * Collects issues up to a limit; past it one summary issue says how many more there were, so a file
 * with 50,000 bad rows still answers with a table a person can read.
 */
export class IssueCollector {
  readonly errors: RowIssue[] = [];
  readonly warnings: RowIssue[] = [];
  private droppedErrors = 0;
  private droppedWarnings = 0;

  constructor(private readonly max: number) {}

  error(issue: RowIssue): void {
    if (this.errors.length < this.max) this.errors.push(issue);
    else this.droppedErrors++;
  }

  warning(issue: RowIssue): void {
    if (this.warnings.length < this.max) this.warnings.push(issue);
    else this.droppedWarnings++;
  }

  get errorCount(): number {
    return this.errors.length + this.droppedErrors;
  }

  /** The lists, sorted by `order` when given, each closed by a "… more" issue where some were left out. */
  finish(sheet: string, order?: (a: RowIssue, b: RowIssue) => number): { errors: RowIssue[]; warnings: RowIssue[] } {
    const more = (n: number, what: string): RowIssue => ({ sheet, row: null, column: null, value: null, message: `${n} more ${what} not listed` });
    const sorted = (list: RowIssue[]) => (order ? [...list].sort(order) : [...list]);
    const errors = sorted(this.errors);
    const warnings = sorted(this.warnings);
    if (this.droppedErrors) errors.push(more(this.droppedErrors, 'errors'));
    if (this.droppedWarnings) warnings.push(more(this.droppedWarnings, 'warnings'));
    return { errors, warnings };
  }
}
