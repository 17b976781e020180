import { describe, expect, it } from 'vitest';
import * as XLSX from 'xlsx';
import type { RowIssue } from '../../../shared/imports';
import { rowIssuesToCsv, rowIssuesToXlsx } from '../../../server/imports/issues-export';

const issues: RowIssue[] = [
  {
    sheet: 'bins',
    row: 7,
    column: 'bin',
    value: '=HYPERLINK("http://example.invalid")',
    message: 'bin starts with "=", which spreadsheet programs run as a formula',
  },
  { sheet: 'aisles', row: 3, column: 'x_m', value: '-1,5', message: 'x_m must be a number; use a point as the decimal mark' },
  { sheet: '(file)', row: null, column: null, value: null, message: 'line one\nline two' },
];

describe('rowIssuesToCsv', () => {
  it('writes RFC 4180 rows under the header and neutralises formula starts with a quote (OWASP, CSV Injection)', () => {
    const csv = rowIssuesToCsv(issues);
    expect(csv.startsWith('\ufeffsheet,row,column,value,message\r\n')).toBe(true);
    const lines = csv.slice(1).split('\r\n');
    expect(lines[1]).toBe(`bins,7,bin,"'=HYPERLINK(""http://example.invalid"")","bin starts with ""="", which spreadsheet programs run as a formula"`);
    expect(lines[2]).toBe(`aisles,3,x_m,"'-1,5",x_m must be a number; use a point as the decimal mark`);
    expect(lines[3]).toBe('(file),,,,"line one\nline two"');
  });

  it('reads back through a CSV parser to the same text, quote prefix aside', () => {
    const wb = XLSX.read(rowIssuesToCsv(issues).slice(1), { type: 'string', raw: true, dense: true });
    const rows = XLSX.utils.sheet_to_json<string[]>(wb.Sheets[wb.SheetNames[0]!]!, { header: 1, raw: true, defval: '' });
    expect(rows[1]![3]).toBe(`'${issues[0]!.value}`);
    expect(rows[3]![4]).toBe('line one\nline two');
  });
});

describe('rowIssuesToXlsx', () => {
  it('writes one errors sheet of plain text cells, formula starts quoted, so no value becomes a formula', () => {
    const wb = XLSX.read(rowIssuesToXlsx(issues), { type: 'buffer', dense: true, cellFormula: true });
    expect(wb.SheetNames).toEqual(['errors']);
    const data = wb.Sheets.errors!['!data']!;
    expect(data[0]!.map((c) => c.v)).toEqual(['sheet', 'row', 'column', 'value', 'message']);
    // Text cell and a leading quote (OWASP, "CSV Injection"): inert even after a re-save as CSV.
    expect(data[1]![3]).toMatchObject({ t: 's', v: `'${issues[0]!.value}` });
    expect(data[1]![3]!.f).toBeUndefined();
    expect(data[1]![1]).toMatchObject({ t: 'n', v: 7 });
    expect(data.length).toBe(4);
  });
});
