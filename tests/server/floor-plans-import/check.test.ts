/**
 * One test per class of bad floor-plan input: the issue names the right sheet, spreadsheet row,
 * column and message. Most run the worker's code in-process (same functions, no thread start-up);
 * checkFloorPlanFile itself is exercised in hostile-files.test.ts and round-trip.test.ts.
 */
import { describe, expect, it } from 'vitest';
import type { FloorPlanCheck } from '../../../shared/floor-plans';
import type { PlanLayout } from '../../../server/floor-plans/import/check';
import { checkFloorPlanRead } from '../../../server/floor-plans/import/check';
import { FLOOR_PLAN_SPEC } from '../../../server/floor-plans/import/spec';
import { DEFAULT_IMPORT_LIMITS } from '../../../server/imports/limits';
import { readSpreadsheet } from '../../../server/imports/spreadsheet';
import type { Sheets } from '../../helpers/workbooks';
import { col, csvOf, editedTemplate, templateSheets, xlsxOf } from '../../helpers/workbooks';

function check(bytes: Uint8Array, filename = 'plan.xlsx', layout?: PlanLayout, maxIssues = 5000): FloorPlanCheck {
  return checkFloorPlanRead(readSpreadsheet(bytes, filename, FLOOR_PLAN_SPEC, DEFAULT_IMPORT_LIMITS), { layout, maxIssues });
}
const edited = (edit: (s: Sheets) => void) => check(editedTemplate(edit));
/** Spreadsheet row of the row whose first cell is `code` (header = row 1). */
const rowOf = (s: Sheets, sheet: string, code: string): number => s[sheet]!.findIndex((r) => r[0] === code) + 1;
const set = (s: Sheets, sheet: string, code: string, column: string, value: string | number | null) => {
  s[sheet]![rowOf(s, sheet, code) - 1]![col(s, sheet, column)] = value;
};
const rows = templateSheets();

describe('the template', () => {
  it('passes with no errors or warnings and counts what it holds', () => {
    const r = check(editedTemplate(() => {}));
    expect(r.errors).toEqual([]);
    expect(r.warnings).toEqual([]);
    expect(r.ok).toBe(true);
    // Counted by hand from the example: A and B have 4 bays each, C has 3 positions; 3 aisles × 20 m.
    expect(r.stats).toEqual({ aisles: 3, crossAisles: 2, bins: 30, accessPoints: 11, depots: 1, totalAisleLengthM: 60 });
    expect(r.plan!.bins.find((b) => b.code === 'A-02-01-1')).toEqual({ code: 'A-02-01-1', aisle: 'A', y: 3.75, bay: 2, side: 'L', level: 1, zone: 'fast' });
  });
});

describe('sheets and columns', () => {
  it('reports a missing sheet', () => {
    const s = templateSheets();
    delete s.depots;
    const r = check(xlsxOf(s));
    expect(r.ok).toBe(false);
    expect(r.plan).toBeNull();
    expect(r.errors).toEqual([{ sheet: 'depots', row: null, column: null, value: null, message: 'sheet depots is missing' }]);
  });

  it('reports a missing column on the header row', () => {
    const r = edited((s) => {
      const i = col(s, 'aisles', 'x_m');
      for (const row of s.aisles!) row.splice(i, 1);
    });
    expect(r.errors).toEqual([{ sheet: 'aisles', row: 1, column: 'x_m', value: null, message: 'column x_m is missing from the header row' }]);
  });

  it('reports an unknown column with its cell', () => {
    const r = edited((s) => s.cross_aisles![0]!.push('width_m'));
    expect(r.errors).toHaveLength(1);
    expect(r.errors[0]).toMatchObject({ sheet: 'cross_aisles', row: 1, column: 'width_m', value: 'width_m' });
    expect(r.errors[0]!.message).toBe('unknown column "width_m" in cell E1; the columns of cross_aisles are cross_aisle, y_m, x_start_m, x_end_m');
  });

  it('reports a bins sheet with neither a y_m nor a bay column', () => {
    const r = edited((s) => {
      for (const name of ['bay', 'y_m']) {
        const i = col(s, 'bins', name);
        for (const row of s.bins!) row.splice(i, 1);
      }
    });
    expect(r.errors).toEqual([
      { sheet: 'bins', row: 1, column: 'y_m', value: null, message: 'bins needs a y_m column or a bay column (or both, one filled per row)' },
    ]);
  });
});

describe('cell values', () => {
  it('reports a non-numeric position', () => {
    const r = edited((s) => set(s, 'aisles', 'B', 'x_m', 'five'));
    expect(r.errors).toEqual([{ sheet: 'aisles', row: rowOf(rows, 'aisles', 'B'), column: 'x_m', value: 'five', message: 'x_m must be a number' }]);
  });

  it('reports a negative bay length', () => {
    const r = edited((s) => set(s, 'aisles', 'A', 'bay_length_m', -2.5));
    expect(r.errors).toEqual([{ sheet: 'aisles', row: 2, column: 'bay_length_m', value: '-2.5', message: 'bay_length_m must be a positive length in metres' }]);
  });

  it('reports an empty required cell', () => {
    const r = edited((s) => set(s, 'depots', 'PACK-1', 'y_m', null));
    expect(r.errors).toEqual([{ sheet: 'depots', row: 2, column: 'y_m', value: null, message: 'y_m is empty' }]);
  });

  it('reports an aisle whose y_end_m is not past its y_start_m', () => {
    const r = edited((s) => set(s, 'aisles', 'C', 'y_end_m', 0));
    expect(r.errors).toEqual([{ sheet: 'aisles', row: 4, column: 'y_end_m', value: '0', message: 'y_end_m (0 m) must be greater than y_start_m (0 m)' }]);
  });

  it('reports a cross aisle whose x_end_m is not past its x_start_m', () => {
    const r = edited((s) => set(s, 'cross_aisles', 'back', 'x_end_m', 1));
    expect(r.errors).toEqual([{ sheet: 'cross_aisles', row: 3, column: 'x_end_m', value: '1', message: 'x_end_m (1 m) must be greater than x_start_m (2 m)' }]);
  });

  it('reports a bad side and a bad level', () => {
    const r = edited((s) => {
      set(s, 'bins', 'A-01-01-1', 'side', 'X');
      set(s, 'bins', 'A-01-02-1', 'level', 1.5);
    });
    expect(r.errors).toEqual([
      { sheet: 'bins', row: rowOf(rows, 'bins', 'A-01-01-1'), column: 'side', value: 'X', message: 'side must be L (left) or R (right)' },
      { sheet: 'bins', row: rowOf(rows, 'bins', 'A-01-02-1'), column: 'level', value: '1.5', message: 'level must be a whole number of at least 0' },
    ]);
  });

  it('reports a code that a spreadsheet program would run as a formula', () => {
    const r = edited((s) => set(s, 'bins', 'B-01-01-1', 'bin', '=1+1'));
    expect(r.errors).toEqual([
      {
        sheet: 'bins',
        row: rowOf(rows, 'bins', 'B-01-01-1'),
        column: 'bin',
        value: '=1+1',
        message: expect.stringMatching(/^bin starts with "=", which spreadsheet programs run as a formula/),
      },
    ]);
  });
});

describe('duplicate codes', () => {
  it.each([
    ['aisles', 'aisle', ['A', 11, 0, 20, 2.5], 'aisle A is already used in row 2; codes must be unique'],
    ['cross_aisles', 'cross_aisle', ['front', 10, 2, 8], 'cross aisle front is already used in row 2; codes must be unique'],
    [
      'bins',
      'bin',
      ['C-01-01-1', 'C', 12, null, 'L', 2, null],
      `bin C-01-01-1 is already used in row ${rowOf(rows, 'bins', 'C-01-01-1')}; codes must be unique`,
    ],
    ['depots', 'depot', ['PACK-1', 8, -2], 'depot PACK-1 is already used in row 2; codes must be unique'],
  ] as const)('reports a second %s row with the same %s code', (sheet, column, row, message) => {
    const r = edited((s) => s[sheet]!.push([...row]));
    expect(r.errors).toEqual([{ sheet, row: rows[sheet]!.length + 1, column, value: String(row[0]), message }]);
  });

  it('reports a depot code that is also a bin code', () => {
    const r = edited((s) => set(s, 'depots', 'PACK-1', 'depot', 'A-01-01-1'));
    expect(r.errors).toEqual([
      { sheet: 'depots', row: 2, column: 'depot', value: 'A-01-01-1', message: 'depot code A-01-01-1 is also a bin code; give the depot its own code' },
    ]);
  });
});

describe('bin positions', () => {
  it('reports a bin whose aisle does not exist', () => {
    const r = edited((s) => set(s, 'bins', 'A-01-01-1', 'aisle', 'Q'));
    expect(r.errors).toEqual([{ sheet: 'bins', row: 2, column: 'aisle', value: 'Q', message: 'aisle Q does not exist in the aisles sheet' }]);
  });

  it('reports a y_m outside its aisle', () => {
    const r = edited((s) => set(s, 'bins', 'C-02-01-2', 'y_m', 25));
    expect(r.errors).toEqual([
      {
        sheet: 'bins',
        row: rowOf(rows, 'bins', 'C-02-01-2'),
        column: 'y_m',
        value: '25',
        message: 'y_m 25 m lies outside aisle C, which runs from 0 m to 20 m',
      },
    ]);
  });

  it('reports a bay whose centre lies past the end of its aisle', () => {
    // Bay centre y = y_start + (bay − 0.5) × bay length = 0 + 8.5 × 2.5 = 21.25 m > 20 m.
    const r = edited((s) => set(s, 'bins', 'B-04-01-2', 'bay', 9));
    expect(r.errors).toEqual([
      { sheet: 'bins', row: rowOf(rows, 'bins', 'B-04-01-2'), column: 'bay', value: '9', message: 'bay 9 centres at 21.25 m, past the end of aisle B (20 m)' },
    ]);
  });

  it('reports a bin with both y_m and bay, and a bin with neither', () => {
    const r = edited((s) => {
      set(s, 'bins', 'A-01-01-1', 'y_m', 1);
      set(s, 'bins', 'A-01-02-1', 'bay', null);
    });
    expect(r.errors).toEqual([
      { sheet: 'bins', row: 2, column: 'bay', value: '1', message: 'give either y_m or bay for a bin, not both' },
      { sheet: 'bins', row: 3, column: 'y_m', value: null, message: 'give the bin a position: y_m (metres along the aisle) or bay (bay number)' },
    ]);
  });

  it('reports a bay in an aisle without bay_length_m', () => {
    const r = edited((s) => {
      set(s, 'bins', 'C-01-01-1', 'y_m', null);
      set(s, 'bins', 'C-01-01-1', 'bay', 2);
    });
    expect(r.errors).toEqual([
      {
        sheet: 'bins',
        row: rowOf(rows, 'bins', 'C-01-01-1'),
        column: 'bay',
        value: '2',
        message: 'aisle C has no bay_length_m, so bay 2 cannot be placed; fill bay_length_m in aisles or give y_m',
      },
    ]);
  });
});

describe('geometry (engine diagnostics mapped to rows)', () => {
  it('reports an aisle that touches no cross aisle, and its bins as unreachable', () => {
    // Aisle C stops 2 m short of both cross aisles (y 0 and y 20).
    const r = edited((s) => {
      set(s, 'aisles', 'C', 'y_start_m', 2);
      set(s, 'aisles', 'C', 'y_end_m', 18);
    });
    const cBins = rows.bins!.slice(1).filter((b) => b[1] === 'C');
    expect(r.errors).toEqual([
      {
        sheet: 'aisles',
        row: 4,
        column: 'aisle',
        value: 'C',
        message: 'aisle C touches no cross aisle, so no one can walk into it; extend it to a cross aisle or add one',
      },
      ...cBins.map((b) => ({
        sheet: 'bins',
        row: rowOf(rows, 'bins', String(b[0])),
        column: 'bin',
        value: b[0],
        message: `bin ${b[0]} cannot be reached from the depot on foot`,
      })),
    ]);
  });

  it('reports a depot on a separate walkway as unreachable, and an aisle with no bins as a warning', () => {
    const r = edited((s) => {
      s.aisles!.push(['Z', 50, 0, 10, null]);
      s.cross_aisles!.push(['island', 0, 49, 51]);
      s.depots!.push(['PACK-2', 50, -2]);
    });
    expect(r.errors).toEqual([
      { sheet: 'depots', row: 3, column: 'depot', value: 'PACK-2', message: 'depot PACK-2 cannot be reached on foot from the first depot' },
    ]);
    expect(r.warnings).toEqual([{ sheet: 'aisles', row: 5, column: 'aisle', value: 'Z', message: 'aisle Z has no bins' }]);
  });

  it('reports a depot too far from every walkway', () => {
    const r = edited((s) => s.depots!.push(['DOCK', 100, 100]));
    expect(r.errors).toEqual([
      {
        sheet: 'depots',
        row: 3,
        column: 'depot',
        value: 'DOCK',
        message: 'depot DOCK lies more than 5 m from every aisle and cross aisle; move it next to one',
      },
    ]);
  });

  it('reports a plan with no depot', () => {
    const r = edited((s) => s.depots!.splice(1));
    expect(r.errors).toEqual([
      {
        sheet: 'depots',
        row: null,
        column: 'depot',
        value: null,
        message: 'the plan has no depot; add a row to depots for the point where every trip starts and ends',
      },
    ]);
  });

  it('lets a warning through: an aisle with no bins still gives a plan', () => {
    const r = edited((s) => {
      s.aisles!.push(['D', 11, 0, 20, null]);
      set(s, 'cross_aisles', 'front', 'x_end_m', 11);
      set(s, 'cross_aisles', 'back', 'x_end_m', 11);
    });
    expect(r.errors).toEqual([]);
    expect(r.warnings).toEqual([{ sheet: 'aisles', row: 5, column: 'aisle', value: 'D', message: 'aisle D has no bins' }]);
    expect(r.ok).toBe(true);
    expect(r.plan!.aisles).toHaveLength(4);
  });

  it('warns, on the aisle row, when two aisles stand closer than the racks between them allow', () => {
    // Template aisles A (x 2 m) and B (x 5 m) hold bins on both sides; B moved to x 4 m leaves
    // 2 m − two 1 m racks = 0 m to walk between them (see shared/plan-geometry.ts crowdedAislePairs).
    const r = edited((s) => set(s, 'aisles', 'B', 'x_m', 4));
    expect(r.errors).toEqual([]);
    expect(r.warnings).toEqual([
      {
        sheet: 'aisles',
        row: 3,
        column: 'aisle',
        value: 'B',
        message: 'aisles A and B are 2 m apart: with racks about 1 m deep between them that leaves 0 m to walk, under 1 m; check the x of both aisles',
      },
    ]);
    expect(r.ok).toBe(true);
  });
});

describe('bins CSV', () => {
  const layoutOf = (): PlanLayout => {
    const plan = check(editedTemplate(() => {})).plan!;
    return { aisles: plan.aisles, crossAisles: plan.crossAisles, depots: plan.depots };
  };

  it('checks the bins of a CSV against an existing layout', () => {
    const r = check(csvOf(['bin,aisle,y_m,bay,side,level,zone', 'A-1,A,3,,L,1,', 'B-1,B,17.5,,r,2,cold']), 'bins.csv', layoutOf());
    expect(r.errors).toEqual([]);
    expect(r.plan!.bins).toEqual([
      { code: 'A-1', aisle: 'A', y: 3, bay: null, side: 'L', level: 1, zone: null },
      { code: 'B-1', aisle: 'B', y: 17.5, bay: null, side: 'R', level: 2, zone: 'cold' },
    ]);
  });

  it('refuses a formula-injection code in a CSV and keeps the text as it was', () => {
    const evil = '=HYPERLINK("http://example.invalid","open")';
    const r = check(csvOf(['bin,aisle,y_m,side,level', `"${evil.replace(/"/g, '""')}",A,3,L,1`]), 'bins.csv', layoutOf());
    expect(r.errors).toEqual([{ sheet: 'bins', row: 2, column: 'bin', value: evil, message: expect.stringMatching(/^bin starts with "="/) }]);
  });

  it('asks for a layout when a CSV comes alone', () => {
    const r = check(csvOf(['bin,aisle,y_m,side,level', 'A-1,A,3,L,1']), 'bins.csv');
    expect(r.errors[0]!.message).toMatch(/^a CSV file carries only the bins/);
  });
});

it('lists at most maxIssues errors and says how many more there were', () => {
  const r = check(
    editedTemplate((s) => {
      for (const row of s.bins!.slice(1)) row[col(s, 'bins', 'side')] = '?';
    }),
    'plan.xlsx',
    undefined,
    10,
  );
  expect(r.errors).toHaveLength(11);
  expect(r.errors[10]).toEqual({ sheet: '(file)', row: null, column: null, value: null, message: '20 more errors not listed' });
});
