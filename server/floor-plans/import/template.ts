/**
 * Workbooks we hand out: the blank-with-example template (an instructions sheet plus the four sheets
 * with a small invented warehouse that passes the check) and any plan written back as a workbook.
 */
import * as XLSX from 'xlsx';
import type { PlanGeometry } from '../../core/plan/types';
import { DEPOT_LINK_MAX_M } from '../../core/plan/types';
import { DEFAULT_IMPORT_LIMITS } from '../../imports/limits';
import { FLOOR_PLAN_SPEC } from './spec';

type Cell = string | number | null;

const INSTRUCTIONS: string[][] = [
  ['Aislewright floor-plan workbook'],
  [''],
  ['Fill the four sheets aisles, cross_aisles, bins and depots, keep the first row of each as it is, and upload the file.'],
  ['Every distance is in metres, on one flat grid: x runs across the aisles, y runs along them. Coordinates may be negative; lengths must be positive.'],
  ['The whole file is checked before anything is saved. Any error means nothing is saved; you get a table of every problem with its sheet, row and column.'],
  [''],
  ['aisles — one row per pick aisle'],
  ['  aisle: the aisle code, for example C. Each code once.'],
  ['  x_m: where the centre line of the aisle lies across the floor.'],
  ['  y_start_m, y_end_m: where the aisle begins and ends along its centre line; y_end_m must be greater than y_start_m.'],
  ['  bay_length_m (optional): the length of one bay, needed when bins in this aisle are placed by bay number.'],
  [''],
  ['cross_aisles — one row per cross aisle (the walkways that join the aisles)'],
  ['  cross_aisle: its code. y_m: where its centre line lies. x_start_m, x_end_m: where it begins and ends; x_end_m greater than x_start_m.'],
  [
    '  Every aisle must meet at least one cross aisle: a cross aisle meets an aisle when its y_m lies within the aisle and the aisle x_m within the cross aisle.',
  ],
  [''],
  ['bins — one row per storage location'],
  ['  bin: the bin code, for example A-03-02-1. Each code once, and different from every depot code.'],
  ['  aisle: the code of the aisle the picker stands in to reach the bin.'],
  [
    '  y_m or bay: fill exactly one. y_m is the position along the aisle; bay is the bay number counted from the y_start_m end (bay 1 is centred half a bay length from it).',
  ],
  ['  side: L or R, the side of the aisle the bin is on. level: the shelf level, a whole number (0 or 1 for the floor, as your site counts).'],
  ['  zone (optional): any short label, for example cold or bulk.'],
  [''],
  ['depots — where every trip starts and ends, for example the pack bench'],
  [`  depot: its code. x_m, y_m: its position, within ${DEPOT_LINK_MAX_M} m of an aisle or cross aisle. At least one depot.`],
  [''],
  ['Codes must not start with = + - or @, so they stay plain text in every program that opens them.'],
  [
    `Other sheets (such as this one) are ignored. At most ${DEFAULT_IMPORT_LIMITS.maxRowsPerSheet.toLocaleString('en')} rows a sheet; a file of at most ${DEFAULT_IMPORT_LIMITS.maxFileBytes / 1024 / 1024} MiB.`,
  ],
  [''],
  ['The example rows describe an invented warehouse of three aisles. Replace them with your own.'],
];

function exampleRows(): Record<string, Cell[][]> {
  const bins: Cell[][] = [];
  for (const aisle of ['A', 'B']) {
    for (let bay = 1; bay <= 4; bay++) {
      for (const side of ['L', 'R'] as const) {
        for (let level = 1; level <= (aisle === 'A' ? 2 : 1); level++) {
          bins.push([
            `${aisle}-${String(bay).padStart(2, '0')}-${String(level).padStart(2, '0')}-${side === 'L' ? 1 : 2}`,
            aisle,
            null,
            bay,
            side,
            level,
            'fast',
          ]);
        }
      }
    }
  }
  [4.5, 10, 15.5].forEach((y, k) => {
    for (const side of ['L', 'R'] as const) bins.push([`C-${String(k + 1).padStart(2, '0')}-01-${side === 'L' ? 1 : 2}`, 'C', y, null, side, 1, 'bulk']);
  });
  return {
    aisles: [
      ['A', 2, 0, 20, 2.5],
      ['B', 5, 0, 20, 2.5],
      ['C', 8, 0, 20, null],
    ],
    cross_aisles: [
      ['front', 0, 2, 8],
      ['back', 20, 2, 8],
    ],
    bins,
    depots: [['PACK-1', 2, -2]],
  };
}

function workbookOf(rows: Record<string, Cell[][]>, instructions: boolean): Buffer {
  const wb = XLSX.utils.book_new();
  if (instructions) {
    const ws = XLSX.utils.aoa_to_sheet(INSTRUCTIONS, { dense: true });
    ws['!cols'] = [{ wch: 120 }];
    XLSX.utils.book_append_sheet(wb, ws, 'instructions');
  }
  for (const sheet of FLOOR_PLAN_SPEC.sheets) {
    const header = sheet.columns.map((c) => c.name);
    const ws = XLSX.utils.aoa_to_sheet([header, ...(rows[sheet.name] ?? [])], { dense: true });
    ws['!cols'] = header.map((h) => ({ wch: Math.max(10, h.length + 2) }));
    XLSX.utils.book_append_sheet(wb, ws, sheet.name);
  }
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx', compression: true }) as Buffer;
}

/** The downloadable template: instructions, then the four sheets with a worked example. O(1). */
export function buildFloorPlanTemplate(): Buffer {
  return workbookOf(exampleRows(), true);
}

/**
 * Any plan (for example a generated one) as a floor-plan workbook that checks back to the same
 * geometry. Bins are written by y_m, so a bin given by bay comes back with `bay: null`. O(bins).
 */
export function floorPlanToWorkbook(plan: PlanGeometry): Buffer {
  return workbookOf(
    {
      aisles: plan.aisles.map((a) => [a.code, a.x, a.yStart, a.yEnd, null]),
      cross_aisles: plan.crossAisles.map((c) => [c.code, c.y, c.xStart, c.xEnd]),
      bins: plan.bins.map((b) => [b.code, b.aisle, b.y, null, b.side, b.level, b.zone]),
      depots: plan.depots.map((d) => [d.code, d.x, d.y]),
    },
    false,
  );
}
