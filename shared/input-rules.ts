/**
 * One rule set for text and numbers that come from outside: floor-plan, SKU and order files, the
 * host system's push API. Used by the server's import checks and the API's zod schemas, and (for the
 * export side) by every CSV or xlsx the server writes and the browser's CSV downloads.
 *
 * Sources: OWASP, "CSV Injection" (cells starting with = + - @ tab or CR are run as formulas by
 * spreadsheet programs; prefix a single quote when writing them); Unicode Technical Standard #39 and
 * CVE-2021-42574 ("Trojan Source": bidirectional embedding, override and isolate characters make
 * text read differently from how it is stored).
 */
import { z } from 'zod';

/** References and codes (order, SKU, bin, aisle…). */
export const MAX_CODE_CHARS = 64;
/** Free text such as a SKU description. */
export const MAX_TEXT_CHARS = 200;
/** Units on one order line: the push API's cap, now the cap of every import path. */
export const MAX_LINE_QTY = 100_000;
/** Kilograms per unit: generous bound far above anything picked by hand (product limit, not a trade rule). */
export const MAX_UNIT_WEIGHT_KG = 1_000;
/** Litres per unit: 10 m³, far above anything carried on a picking cart (product limit). */
export const MAX_UNIT_VOLUME_L = 10_000;

/** Spreadsheet programs run a cell starting with one of these as a formula (OWASP, "CSV Injection"). */
export const FORMULA_START = /^[=+\-@\t\r]/;
/** C0 controls (tab, CR and LF included), DEL and C1 controls. */
// eslint-disable-next-line no-control-regex -- matching control characters is the point
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/;
/** Bidirectional marks, embeddings, overrides and isolates, and line/paragraph separators. */
const BIDI = /[\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069\u2028\u2029]/;

/**
 * The text with control and text-direction characters written as ⟨U+XXXX⟩, for showing a refused
 * value in an error table without it reordering or hiding what is around it.
 */
export function visibleText(text: string): string {
  return text.replace(
    // eslint-disable-next-line no-control-regex -- matching control characters is the point
    /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069\u2028\u2029]/g,
    (c) => `⟨U+${c.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}⟩`,
  );
}

export interface TextRule {
  /** Longest accepted text, in characters. */
  maxChars: number;
}

/**
 * What is wrong with `text` (already trimmed of spaces) under the rule, as the end of a sentence
 * starting with the field's name ("order reference " + problem); null when it is fine.
 */
export function textProblem(text: string, rule: TextRule): string | null {
  if (text.length > rule.maxChars) return `is longer than ${rule.maxChars} characters`;
  if (CONTROL.test(text)) {
    const c = text.match(CONTROL)![0];
    return `holds a control character (${c === '\t' ? 'tab' : c === '\r' ? 'carriage return' : c === '\n' ? 'line break' : `U+${c.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`}); remove it`;
  }
  if (BIDI.test(text)) {
    const c = text.match(BIDI)![0];
    return `holds an invisible text-direction character (U+${c.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}) that makes it read differently from what is stored; remove it`;
  }
  if (FORMULA_START.test(text)) {
    return `starts with ${JSON.stringify(text[0])}, which spreadsheet programs run as a formula; start it with a letter or a digit`;
  }
  return null;
}

/** Codes and references: 1–64 characters under the rule set. */
export const codeRule: TextRule = { maxChars: MAX_CODE_CHARS };
/** Free text: up to 200 characters under the rule set. */
export const textRule: TextRule = { maxChars: MAX_TEXT_CHARS };

/**
 * Trims spaces only: a tab, CR or line break at either end is kept, and so refused by the rule set,
 * not silently dropped (a host system sending them has a bug worth seeing).
 */
export const trimSpaces = (v: string): string => v.replace(/^[ \u00a0]+|[ \u00a0]+$/g, '');

/**
 * A zod string under the rule set, for JSON bodies (checked after trimming spaces; the services
 * trim with `trimSpaces` when they read it, through the same checks as files).
 */
export function ruledString(rule: TextRule) {
  return z.string().superRefine((raw, ctx) => {
    const v = trimSpaces(raw);
    const p = v === '' ? 'is empty' : textProblem(v, rule);
    if (p) ctx.addIssue({ code: 'custom', message: p });
  });
}

/**
 * The text as it is safe to put in a spreadsheet cell or CSV field: a leading single quote when it
 * would start a formula (OWASP, "CSV Injection"). Other text is returned unchanged.
 */
export function neutraliseFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/** One CSV field (RFC 4180): formulas neutralised, quoted when it holds a comma, quote or line end. */
export function csvField(value: string | number | null | undefined): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  const safe = neutraliseFormula(value);
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/** A CSV document (RFC 4180, CRLF line ends, a UTF-8 byte-order mark so spreadsheet programs read UTF-8). */
export function csvDocument(rows: readonly (readonly (string | number | null | undefined)[])[]): string {
  return `\ufeff${rows.map((r) => r.map(csvField).join(',')).join('\r\n')}\r\n`;
}

/** Rows for a spreadsheet export with every text cell neutralised (numbers and dates stay values). */
export function neutraliseCells<T>(rows: readonly (readonly T[])[]): T[][] {
  return rows.map((r) => r.map((c) => (typeof c === 'string' ? (neutraliseFormula(c) as T) : c)));
}
