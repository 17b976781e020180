/**
 * Hostile uploads through the public entry: each is refused (or read safely) by checkFloorPlanFile,
 * and a normal check in the same process succeeds afterwards, so nothing was left broken.
 */
import { describe, expect, it } from 'vitest';
import { buildFloorPlanTemplate, checkFloorPlanFile } from '../../../server/floor-plans/import/index';
import { csvOf, editedTemplate, rawSheet, rawXlsx, templateSheets, zipBombXlsx } from '../../helpers/workbooks';

async function expectStillWorking(): Promise<void> {
  const r = await checkFloorPlanFile(buildFloorPlanTemplate(), 'template.xlsx');
  expect(r.ok).toBe(true);
}

describe('checkFloorPlanFile on hostile files', () => {
  it('refuses a zip bomb (a few KiB unpacking to 60 MiB) before any parsing', async () => {
    const bomb = zipBombXlsx(60);
    expect(bomb.length).toBeLessThan(200 * 1024);
    let progressed = false;
    const r = await checkFloorPlanFile(bomb, 'plan.xlsx', { onProgress: () => (progressed = true) });
    expect(r.ok).toBe(false);
    expect(r.plan).toBeNull();
    expect(r.errors).toHaveLength(1);
    expect(r.errors[0]).toMatchObject({ sheet: '(file)', row: null, message: expect.stringMatching(/unpacks/) });
    // Refused on the event loop from the directory alone: no worker was started.
    expect(progressed).toBe(false);
    await expectStillWorking();
  });

  it('reads a sheet declaring A1:XFD1048576 with 3 cells from its cells, within the time limit', async () => {
    const s = templateSheets();
    const sheets = Object.entries(s).map(([name, rows]) => rawSheet(name, rows.map((r) => r.map((v) => v ?? '')) as (string | number)[][]));
    sheets[0] = {
      name: 'aisles',
      dimension: 'A1:XFD1048576',
      cells: [
        ['A1', 'aisle'],
        ['B1', 'x_m'],
        ['A2', 'A'],
      ],
    };
    const r = await checkFloorPlanFile(rawXlsx(sheets), 'plan.xlsx', { timeoutMs: 10_000 });
    expect(r.errors.slice(0, 2)).toEqual([
      { sheet: 'aisles', row: 1, column: 'y_start_m', value: null, message: 'column y_start_m is missing from the header row' },
      { sheet: 'aisles', row: 1, column: 'y_end_m', value: null, message: 'column y_end_m is missing from the header row' },
    ]);
    await expectStillWorking();
  });

  it('treats __proto__, constructor and toString headers as unknown columns', async () => {
    const bytes = editedTemplate((s) => {
      s.bins![0]!.push('__proto__', 'constructor', 'toString');
      s.bins![1]!.push('{"admin":true}', 'x', 'y');
    });
    const r = await checkFloorPlanFile(bytes, 'plan.xlsx');
    expect(r.errors.map((e) => [e.sheet, e.row, e.column])).toEqual([
      ['bins', 1, '__proto__'],
      ['bins', 1, 'constructor'],
      ['bins', 1, 'toString'],
    ]);
    expect(r.errors[0]!.message).toMatch(/^unknown column "__proto__" in cell H1/);
    expect(({} as Record<string, unknown>).admin).toBeUndefined();
    await expectStillWorking();
  });

  it('refuses a file that is not a ZIP archive but is named .xlsx', async () => {
    const r = await checkFloorPlanFile(new TextEncoder().encode('<html>not a workbook</html>'), 'plan.xlsx');
    expect(r.errors).toEqual([
      { sheet: '(file)', row: null, column: null, value: null, message: 'the file is not an .xlsx workbook (it is not a ZIP archive)' },
    ]);
    await expectStillWorking();
  });

  it('keeps a formula-injection value in a bins CSV as text and refuses it as a code', async () => {
    const template = await checkFloorPlanFile(buildFloorPlanTemplate(), 'template.xlsx');
    const layout = { aisles: template.plan!.aisles, crossAisles: template.plan!.crossAisles, depots: template.plan!.depots };
    const r = await checkFloorPlanFile(csvOf(['bin,aisle,y_m,side,level', "@SUM(1+1)*cmd|' /C calc'!A0,A,3,L,1", 'A-9,A,4,L,1']), 'bins.csv', { layout });
    expect(r.errors).toEqual([
      { sheet: 'bins', row: 2, column: 'bin', value: "@SUM(1+1)*cmd|' /C calc'!A0", message: expect.stringMatching(/^bin starts with "@"/) },
    ]);
    await expectStillWorking();
  });

  it('refuses a file over the size limit and an empty file', async () => {
    expect((await checkFloorPlanFile(new Uint8Array(2048), 'plan.xlsx', { limits: { maxFileBytes: 1024 } })).errors[0]!.message).toBe(
      'the file is 2 KiB; at most 1 KiB are accepted',
    );
    expect((await checkFloorPlanFile(new Uint8Array(0), 'plan.xlsx')).errors[0]!.message).toBe('the file is empty');
  });

  it('turns a check that runs past its time limit into a file error', async () => {
    const r = await checkFloorPlanFile(buildFloorPlanTemplate(), 'plan.xlsx', { timeoutMs: 1 });
    expect(r.errors[0]!.message).toMatch(/was stopped/);
    await expectStillWorking();
  });
});
