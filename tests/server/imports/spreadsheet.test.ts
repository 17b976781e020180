import { describe, expect, it } from 'vitest';
import { readCode, readNumber } from '../../../server/imports/cells';
import { DEFAULT_IMPORT_LIMITS, resolveLimits } from '../../../server/imports/limits';
import { readSpreadsheetFile } from '../../../server/imports/run';
import type { SpreadsheetRead, WorkbookSpec } from '../../../server/imports/spreadsheet';
import { FILE_SHEET, readSpreadsheet } from '../../../server/imports/spreadsheet';
import { csvOf, rawSheet, rawXlsx, xlsxOf, zipBombXlsx, zipOf } from '../../helpers/workbooks';

const spec: WorkbookSpec = {
  sheets: [
    {
      name: 'items',
      required: true,
      columns: [
        { name: 'code', required: true },
        { name: 'qty', required: true },
        { name: 'note', required: false },
      ],
    },
    { name: 'extras', required: false, columns: [{ name: 'code', required: true }] },
  ],
  csvSheet: 'items',
};
const limits = DEFAULT_IMPORT_LIMITS;
const read = (bytes: Uint8Array, name = 'f.xlsx', over = {}) => readSpreadsheet(bytes, name, spec, resolveLimits(over));
const items = (r: SpreadsheetRead) => r.sheets.find((s) => s.name === 'items')!;
const normal = () =>
  xlsxOf({
    items: [
      ['code', 'qty'],
      ['A', 1],
      ['B', 2],
    ],
  });

describe('readSpreadsheet', () => {
  it('numbers rows as the spreadsheet does, header = row 1, blank rows skipped but counted', () => {
    const r = read(
      xlsxOf({
        items: [
          ['code', 'qty', 'note'],
          ['A', 1, null],
          [null, null, null],
          ['B', '2', 'top shelf'],
        ],
      }),
    );
    expect(r.ok).toBe(true);
    expect(r.issues).toEqual([]);
    expect(items(r).rows.map((x) => [x.row, x.cells.code, x.cells.qty, x.cells.note])).toEqual([
      [2, 'A', 1, null],
      [4, 'B', '2', 'top shelf'],
    ]);
  });

  it('matches sheet and column names ignoring case and surrounding spaces, and ignores other sheets', () => {
    const r = read(
      xlsxOf({
        notes: [['anything']],
        ' Items ': [
          [' CODE ', 'Qty'],
          ['A', 3],
        ],
      }),
    );
    expect(r.issues).toEqual([]);
    expect(items(r).rows[0]!.cells).toEqual({ code: 'A', qty: 3, note: null });
  });

  it('reports a missing sheet, a missing column, a duplicate column and an unnamed column holding values', () => {
    expect(read(xlsxOf({ other: [['x']] })).issues).toEqual([{ sheet: 'items', row: null, column: null, value: null, message: 'sheet items is missing' }]);
    const r = read(
      xlsxOf({
        items: [
          ['code', 'code', null],
          ['A', 'B', 'loose'],
        ],
      }),
    );
    expect(r.issues).toEqual([
      { sheet: 'items', row: 1, column: 'code', value: 'code', message: 'column code appears twice (cells A1 and B1); keep one' },
      { sheet: 'items', row: 1, column: 'qty', value: null, message: 'column qty is missing from the header row' },
      { sheet: 'items', row: 2, column: 'C', value: 'loose', message: 'column C holds values but has no name in row 1' },
    ]);
    expect(items(r).usable).toBe(false);
  });

  it('turns __proto__, constructor and toString headers into unknown-column errors and never into keys', () => {
    const r = read(
      xlsxOf({
        items: [
          ['code', 'qty', '__proto__', 'constructor', 'toString'],
          ['A', 1, '{"polluted":1}', 'x', 'y'],
        ],
      }),
    );
    expect(r.issues.map((i) => [i.row, i.column, i.message.split(';')[0]])).toEqual([
      [1, '__proto__', 'unknown column "__proto__" in cell C1'],
      [1, 'constructor', 'unknown column "constructor" in cell D1'],
      [1, 'toString', 'unknown column "toString" in cell E1'],
    ]);
    const cells = items(r).rows[0]!.cells;
    expect(Object.keys(cells)).toEqual(['code', 'qty', 'note']);
    expect(Object.getPrototypeOf(cells)).toBeNull();
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });

  it('reads a sheet declaring A1:XFD1048576 with 3 cells from the cells it holds', () => {
    const bytes = rawXlsx([
      {
        name: 'items',
        dimension: 'A1:XFD1048576',
        cells: [
          ['A1', 'code'],
          ['B1', 'qty'],
          ['A2', 'Z'],
        ],
      },
    ]);
    const r = read(bytes);
    expect(r.ok).toBe(true);
    expect(items(r).rows).toEqual([{ row: 2, cells: { code: 'Z', qty: null, note: null } }]);
  });

  it('refuses a sheet with more rows than the limit', () => {
    const rows = [['code', 'qty'], ...Array.from({ length: 12 }, (_, i) => [`C${i}`, i])];
    const r = read(xlsxOf({ items: rows }), 'f.xlsx', { maxRowsPerSheet: 10 });
    expect(r.issues).toEqual([
      { sheet: 'items', row: null, column: null, value: null, message: 'the sheet has more than 10 data rows; split it into several files' },
    ]);
    expect(items(r).rows).toEqual([]);
  });

  it('reports a value past the last column read', () => {
    const r = read(
      rawXlsx([
        {
          name: 'items',
          cells: [
            ['A1', 'code'],
            ['B1', 'qty'],
            ['A2', 'x'],
            ['B2', 1],
            ['XFD2', 'far'],
          ],
        },
      ]),
    );
    expect(r.issues.map((i) => i.message)).toEqual(['cell XFD2 lies past column BL; only the first 64 columns are read — remove the values there']);
    expect(items(r).rows[0]!.cells.code).toBe('x');
  });

  it('refuses a non-ZIP file named .xlsx, an old .xls container and an unknown file type', () => {
    const text = new TextEncoder().encode('code,qty\nA,1\n');
    expect(read(text, 'plan.xlsx').issues[0]).toEqual({
      sheet: FILE_SHEET,
      row: null,
      column: null,
      value: null,
      message: 'the file is not an .xlsx workbook (it is not a ZIP archive)',
    });
    expect(read(Uint8Array.of(0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1), 'plan.xls').issues[0]!.message).toMatch(/old-format .xls/);
    expect(read(text, 'plan.pdf').issues[0]!.message).toMatch(/unsupported file type/);
  });

  it('reads a CSV as text so a formula-injection value is never a formula, and the code check refuses it', () => {
    const r = read(csvOf(['code,qty,note', '"=HYPERLINK(""http://example.invalid"",""x"")",1,ok', '@SUM(A1),2e1,', 'B,"3,5",']), 'items.csv');
    expect(r.kind).toBe('csv');
    const rows = items(r).rows;
    expect(rows[0]!.cells.code).toBe('=HYPERLINK("http://example.invalid","x")');
    expect(readCode(rows[0]!.cells.code!, 'code')).toEqual({
      ok: false,
      message: expect.stringMatching(/starts with "=", which spreadsheet programs run as a formula/),
    });
    expect(readCode(rows[1]!.cells.code!, 'code').ok).toBe(false);
    expect(readNumber(rows[1]!.cells.qty!, 'qty')).toEqual({ ok: true, value: 20 });
    expect(readNumber(rows[2]!.cells.qty!, 'qty')).toEqual({ ok: false, message: 'qty must be a number; use a point as the decimal mark' });
  });

  it('refuses a truncated workbook and a ZIP archive that holds no workbook', () => {
    const whole = normal();
    expect(read(whole.subarray(0, whole.length >> 1)).issues[0]!.message).toBe('the file is not a complete ZIP archive (no end of central directory)');
    const r = read(zipOf([{ name: 'readme.txt', data: 'hello' }]));
    expect(r.ok).toBe(false);
    expect(r.issues[0]!.message).toMatch(/^the file could not be read as a spreadsheet/);
  });

  it('refuses a CSV that is not UTF-8', () => {
    expect(read(Uint8Array.of(0x63, 0x6f, 0x64, 0x65, 0x0a, 0xff, 0xfe, 0x41), 'x.csv').issues[0]!.message).toMatch(/not UTF-8/);
  });
});

describe('readSpreadsheetFile (fresh worker)', () => {
  it('reads a normal workbook in a worker', async () => {
    const r = await readSpreadsheetFile(normal(), 'f.xlsx', spec, limits);
    expect(r.ok).toBe(true);
    expect(items(r).rows.map((x) => x.cells.code)).toEqual(['A', 'B']);
  });

  it('refuses a zip bomb before parsing, then reads the next file normally', async () => {
    const bomb = zipBombXlsx(60, 'items');
    const r = await readSpreadsheetFile(bomb, 'bomb.xlsx', spec, limits);
    expect(r.ok).toBe(false);
    expect(r.issues[0]!.message).toMatch(/unpacks/);
    expect(items(await readSpreadsheetFile(normal(), 'f.xlsx', spec, limits)).rows).toHaveLength(2);
  });

  it('refuses, inside the worker, an archive whose directory understates what it unpacks to', async () => {
    const parts = [rawSheet('items', [['code', 'qty']])];
    const liar = zipOf(
      (await import('../../helpers/workbooks'))
        .rawXlsxParts(parts)
        .map((p) =>
          p.name.endsWith('sheet1.xml')
            ? { ...p, data: String(p.data).replace('</sheetData>', `${' '.repeat(4 * 1024 * 1024)}</sheetData>`), declaredSize: 2048 }
            : p,
        ),
    );
    const r = await readSpreadsheetFile(liar, 'liar.xlsx', spec, limits);
    expect(r.issues).toEqual([
      {
        sheet: FILE_SHEET,
        row: null,
        column: null,
        value: null,
        message: 'archive entry xl/worksheets/sheet1.xml is damaged or unpacks to more than it declares',
      },
    ]);
  });

  it('stops a worker past its time limit with a file issue, and the next read still works', async () => {
    const r = await readSpreadsheetFile(normal(), 'f.xlsx', spec, resolveLimits({ timeoutMs: 1 }));
    expect(r.issues[0]!.message).toMatch(/took longer than 0 s and was stopped/);
    expect((await readSpreadsheetFile(normal(), 'f.xlsx', spec, limits)).ok).toBe(true);
  });

  it('stops a worker that outgrows its heap cap with a file issue', async () => {
    const capped = resolveLimits({ workerHeapMb: 16 });
    // A small file fits in the cap, so what stops the big one is its own size.
    expect((await readSpreadsheetFile(normal(), 'f.xlsx', spec, capped)).ok).toBe(true);
    const rows = [['code', 'qty', 'note'], ...Array.from({ length: 60_000 }, (_, i) => [`CODE-${i}`, i, `note ${i} `.repeat(8)])];
    const r = await readSpreadsheetFile(xlsxOf({ items: rows }), 'big.xlsx', spec, capped);
    expect(r.ok).toBe(false);
    expect(r.issues[0]!.message).toMatch(/needed more than 16 MiB of memory/);
  });
});
