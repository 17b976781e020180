/** The floor-plan workbook's sheets and columns (README.md, "Import formats"); lower case, metres. */
import type { WorkbookSpec } from '../../imports/spreadsheet';

export const FLOOR_PLAN_SPEC = {
  sheets: [
    {
      name: 'aisles',
      required: true,
      columns: [
        { name: 'aisle', required: true },
        { name: 'x_m', required: true },
        { name: 'y_start_m', required: true },
        { name: 'y_end_m', required: true },
        { name: 'bay_length_m', required: false },
      ],
    },
    {
      name: 'cross_aisles',
      required: true,
      columns: [
        { name: 'cross_aisle', required: true },
        { name: 'y_m', required: true },
        { name: 'x_start_m', required: true },
        { name: 'x_end_m', required: true },
      ],
    },
    {
      name: 'bins',
      required: true,
      columns: [
        { name: 'bin', required: true },
        { name: 'aisle', required: true },
        { name: 'y_m', required: false },
        { name: 'bay', required: false },
        { name: 'side', required: true },
        { name: 'level', required: true },
        { name: 'zone', required: false },
      ],
    },
    {
      name: 'depots',
      required: true,
      columns: [
        { name: 'depot', required: true },
        { name: 'x_m', required: true },
        { name: 'y_m', required: true },
      ],
    },
  ],
  // A CSV upload carries the bins; the rest of the layout comes from a plan the site already has.
  csvSheet: 'bins',
} as const satisfies WorkbookSpec;

export const SHEET_ORDER: readonly string[] = FLOOR_PLAN_SPEC.sheets.map((s) => s.name);
