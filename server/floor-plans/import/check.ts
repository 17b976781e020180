/**
 * Rows of a read floor-plan workbook → checked PlanGeometry, or every problem as a RowIssue located
 * by sheet, spreadsheet row and column. Cell-level checks are ours; geometry problems (aisles touching
 * no cross aisle, unreachable bins and depots, aisles without bins) come from the engine's
 * `diagnosePlan` and are mapped back to the rows they came from. Runs inside the import worker.
 */
import type { RowIssue } from '../../../shared/imports';
import type { FloorPlanCheck, FloorPlanStats, PlanGeometry as SharedGeometry } from '../../../shared/floor-plans';
import { diagnosePlan } from '../../core/plan/diagnostics';
import type { PlanProblem } from '../../core/plan/diagnostics';
import type { PlanAisle, PlanBin, PlanCrossAisle, PlanDepot, PlanGeometry } from '../../core/plan/types';
import { DEPOT_LINK_MAX_M, POSITION_TOLERANCE_M } from '../../core/plan/types';
import { buildWalkGraph } from '../../core/plan/walk-graph';
import type { Read } from '../../imports/cells';
import { displayValue, IssueCollector, readCode, readInteger, readNumber, readOptionalText, readPositive } from '../../imports/cells';
import type { CellValue, SheetData, SheetRow, SpreadsheetRead } from '../../imports/spreadsheet';
import { FILE_SHEET } from '../../imports/spreadsheet';
import { SHEET_ORDER } from './spec';

// The shared schema and the engine's types must describe the same geometry, both ways.
type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : never) : never;
const geometryTypesAgree: Same<PlanGeometry, SharedGeometry> = true;
void geometryTypesAgree;

/** Aisles, cross aisles and depots of an existing plan, for a CSV that carries only bins. */
export type PlanLayout = Pick<PlanGeometry, 'aisles' | 'crossAisles' | 'depots'>;

export interface CheckOptions {
  layout?: PlanLayout | undefined;
  maxIssues: number;
  onProgress?: (fraction: number) => void;
}

/** Where each kept entity came from: its spreadsheet row (null when it came from a layout). */
interface Located<T> {
  item: T;
  row: number | null;
}

const EMPTY_STATS: FloorPlanStats = { aisles: 0, crossAisles: 0, bins: 0, accessPoints: 0, depots: 0, totalAisleLengthM: 0 };

/**
 * Checks one read workbook. O(rows + graph): cell checks are linear, the walk graph is built once
 * over the rows that passed. `plan` is null whenever there is an error; warnings never block.
 */
export function checkFloorPlanRead(read: SpreadsheetRead, options: CheckOptions): FloorPlanCheck {
  const issues = new IssueCollector(options.maxIssues);
  const progress = options.onProgress ?? (() => {});
  for (const issue of read.issues) issues.error(issue);
  if (!read.ok) return finish(issues, EMPTY_STATS, null);

  const sheet = (name: string): SheetData => read.sheets.find((s) => s.name === name)!;
  const fromCsv = read.kind === 'csv';
  if (fromCsv && !options.layout) {
    issues.error({
      sheet: FILE_SHEET,
      row: null,
      column: null,
      value: null,
      message: 'a CSV file carries only the bins; check it against an existing floor plan, or upload the whole workbook (see the template)',
    });
    return finish(issues, EMPTY_STATS, null);
  }

  const errorsBefore = () => issues.errorCount;
  let layoutClean = true;
  let aisles: Located<PlanAisle>[];
  let crossAisles: Located<PlanCrossAisle>[];
  let depots: Located<PlanDepot>[];
  const bayLength = new Map<string, number | null>();
  // Codes that appear in the aisles sheet, kept or not, so a bin of a broken aisle is not also "unknown".
  const aisleCodesSeen = new Set<string>();

  if (fromCsv && options.layout) {
    aisles = options.layout.aisles.map((item) => ({ item, row: null }));
    crossAisles = options.layout.crossAisles.map((item) => ({ item, row: null }));
    depots = options.layout.depots.map((item) => ({ item, row: null }));
    for (const a of options.layout.aisles) {
      aisleCodesSeen.add(a.code);
      bayLength.set(a.code, null);
    }
  } else {
    const before = errorsBefore();
    aisles = checkAisles(sheet('aisles'), issues, bayLength, aisleCodesSeen);
    crossAisles = checkCrossAisles(sheet('cross_aisles'), issues);
    depots = checkDepots(sheet('depots'), issues);
    layoutClean = errorsBefore() === before && sheet('aisles').usable && sheet('cross_aisles').usable && sheet('depots').usable;
  }
  progress(0.1);

  const aisleByCode = new Map(aisles.map((a) => [a.item.code, a.item] as const));
  const binSheet = sheet('bins');
  // Without a readable aisles sheet every bin would be "in an unknown aisle"; the sheet's own error says enough.
  const aislesKnown = fromCsv || sheet('aisles').usable;
  const bins = checkBins(binSheet, issues, aisleByCode, aislesKnown ? aisleCodesSeen : null, bayLength, (f) => progress(0.1 + 0.6 * f));

  const binCodes = new Set(bins.map((b) => b.item.code));
  for (const d of depots) {
    if (binCodes.has(d.item.code)) {
      issues.error({
        sheet: 'depots',
        row: d.row,
        column: 'depot',
        value: d.item.code,
        message: `depot code ${d.item.code} is also a bin code; give the depot its own code`,
      });
      layoutClean = false;
    }
  }
  const depotSheet = sheet('depots');
  const noDepotReported = !fromCsv && depotSheet.usable && depotSheet.rows.length === 0;
  if (noDepotReported) {
    issues.error({
      sheet: 'depots',
      row: null,
      column: 'depot',
      value: null,
      message: 'the plan has no depot; add a row to depots for the point where every trip starts and ends',
    });
  }

  const plan: PlanGeometry = {
    aisles: aisles.map((a) => a.item),
    crossAisles: crossAisles.map((c) => c.item),
    bins: bins.map((b) => b.item),
    depots: depots.map((d) => d.item),
  };
  const graph = buildWalkGraph(plan);
  progress(0.85);

  // Geometry on a partial layout would blame aisles and bins for rows that failed elsewhere.
  if (layoutClean) {
    const problems = diagnosePlan(plan, graph);
    for (const p of problems) {
      if (p.code === 'no_depot' && noDepotReported) continue;
      if (p.code === 'aisle_no_bins' && !binSheet.usable) continue;
      const issue = mapProblem(p, plan, { aisles, bins, depots });
      if (p.severity === 'error') issues.error(issue);
      else issues.warning(issue);
    }
  }
  progress(1);

  const access = new Set<number>();
  for (let b = 0; b < graph.binNode.length; b++) if (graph.binNode[b]! >= 0) access.add(graph.binNode[b]!);
  const totalAisleLengthM = plan.aisles.reduce((s, a) => s + Math.abs(a.yEnd - a.yStart), 0);
  const stats: FloorPlanStats = {
    aisles: plan.aisles.length,
    crossAisles: plan.crossAisles.length,
    bins: plan.bins.length,
    accessPoints: access.size,
    depots: plan.depots.length,
    totalAisleLengthM: Math.round(totalAisleLengthM * 1e6) / 1e6,
  };
  return finish(issues, stats, plan);
}

function finish(issues: IssueCollector, stats: FloorPlanStats, plan: PlanGeometry | null): FloorPlanCheck {
  const rank = (s: string) => (s === FILE_SHEET ? -1 : SHEET_ORDER.indexOf(s));
  const order = (a: RowIssue, b: RowIssue) => rank(a.sheet) - rank(b.sheet) || (a.row ?? 0) - (b.row ?? 0);
  const { errors, warnings } = issues.finish(FILE_SHEET, order);
  const ok = errors.length === 0;
  return { ok, errors, warnings, stats, plan: ok ? plan : null };
}

/** Reports a failed read as an issue on its cell; returns the value or undefined. */
function take<T>(issues: IssueCollector, sheet: string, row: SheetRow, column: string, read: Read<T>): T | undefined {
  if (read.ok) return read.value;
  issues.error({ sheet, row: row.row, column, value: displayValue(row.cells[column] ?? null), message: read.message });
  return undefined;
}

/** First row of each code; later rows with the same code are errors naming the first. */
function claimCode(issues: IssueCollector, seen: Map<string, number>, sheet: string, column: string, what: string, code: string, row: number): boolean {
  const first = seen.get(code);
  if (first !== undefined) {
    issues.error({ sheet, row, column, value: code, message: `${what} ${code} is already used in row ${first}; codes must be unique` });
    return false;
  }
  seen.set(code, row);
  return true;
}

function checkAisles(sheet: SheetData, issues: IssueCollector, bayLength: Map<string, number | null>, seenCodes: Set<string>): Located<PlanAisle>[] {
  const out: Located<PlanAisle>[] = [];
  if (!sheet.usable) return out;
  const seen = new Map<string, number>();
  for (const r of sheet.rows) {
    const c = r.cells;
    const code = take(issues, 'aisles', r, 'aisle', readCode(c.aisle ?? null, 'aisle'));
    const unique = code !== undefined && claimCode(issues, seen, 'aisles', 'aisle', 'aisle', code, r.row);
    if (code !== undefined) seenCodes.add(code);
    const x = take(issues, 'aisles', r, 'x_m', readNumber(c.x_m ?? null, 'x_m'));
    const y0 = take(issues, 'aisles', r, 'y_start_m', readNumber(c.y_start_m ?? null, 'y_start_m'));
    const y1 = take(issues, 'aisles', r, 'y_end_m', readNumber(c.y_end_m ?? null, 'y_end_m'));
    const bayRaw = c.bay_length_m ?? null;
    const bay = bayRaw === null ? null : take(issues, 'aisles', r, 'bay_length_m', readPositive(bayRaw, 'bay_length_m'));
    let ordered = true;
    if (y0 !== undefined && y1 !== undefined && !(y1 > y0)) {
      issues.error({
        sheet: 'aisles',
        row: r.row,
        column: 'y_end_m',
        value: displayValue(c.y_end_m ?? null),
        message: `y_end_m (${y1} m) must be greater than y_start_m (${y0} m)`,
      });
      ordered = false;
    }
    if (!unique || x === undefined || y0 === undefined || y1 === undefined || bay === undefined || !ordered) continue;
    bayLength.set(code, bay);
    out.push({ item: { code, x, yStart: y0, yEnd: y1 }, row: r.row });
  }
  return out;
}

function checkCrossAisles(sheet: SheetData, issues: IssueCollector): Located<PlanCrossAisle>[] {
  const out: Located<PlanCrossAisle>[] = [];
  if (!sheet.usable) return out;
  const seen = new Map<string, number>();
  const S = 'cross_aisles';
  for (const r of sheet.rows) {
    const c = r.cells;
    const code = take(issues, S, r, 'cross_aisle', readCode(c.cross_aisle ?? null, 'cross_aisle'));
    const unique = code !== undefined && claimCode(issues, seen, S, 'cross_aisle', 'cross aisle', code, r.row);
    const y = take(issues, S, r, 'y_m', readNumber(c.y_m ?? null, 'y_m'));
    const x0 = take(issues, S, r, 'x_start_m', readNumber(c.x_start_m ?? null, 'x_start_m'));
    const x1 = take(issues, S, r, 'x_end_m', readNumber(c.x_end_m ?? null, 'x_end_m'));
    let ordered = true;
    if (x0 !== undefined && x1 !== undefined && !(x1 > x0)) {
      issues.error({
        sheet: S,
        row: r.row,
        column: 'x_end_m',
        value: displayValue(c.x_end_m ?? null),
        message: `x_end_m (${x1} m) must be greater than x_start_m (${x0} m)`,
      });
      ordered = false;
    }
    if (!unique || y === undefined || x0 === undefined || x1 === undefined || !ordered) continue;
    out.push({ item: { code, y, xStart: x0, xEnd: x1 }, row: r.row });
  }
  return out;
}

function checkDepots(sheet: SheetData, issues: IssueCollector): Located<PlanDepot>[] {
  const out: Located<PlanDepot>[] = [];
  if (!sheet.usable) return out;
  const seen = new Map<string, number>();
  for (const r of sheet.rows) {
    const c = r.cells;
    const code = take(issues, 'depots', r, 'depot', readCode(c.depot ?? null, 'depot'));
    const unique = code !== undefined && claimCode(issues, seen, 'depots', 'depot', 'depot', code, r.row);
    const x = take(issues, 'depots', r, 'x_m', readNumber(c.x_m ?? null, 'x_m'));
    const y = take(issues, 'depots', r, 'y_m', readNumber(c.y_m ?? null, 'y_m'));
    if (!unique || x === undefined || y === undefined) continue;
    out.push({ item: { code, x, y }, row: r.row });
  }
  return out;
}

function checkBins(
  sheet: SheetData,
  issues: IssueCollector,
  aisleByCode: Map<string, PlanAisle>,
  aisleCodesSeen: Set<string> | null,
  bayLength: Map<string, number | null>,
  progress: (fraction: number) => void,
): Located<PlanBin>[] {
  const out: Located<PlanBin>[] = [];
  if (!sheet.usable) return out;
  const S = 'bins';
  if (!sheet.columns.includes('y_m') && !sheet.columns.includes('bay')) {
    issues.error({ sheet: S, row: 1, column: 'y_m', value: null, message: 'bins needs a y_m column or a bay column (or both, one filled per row)' });
    return out;
  }
  const tol = POSITION_TOLERANCE_M;
  const seen = new Map<string, number>();
  const n = sheet.rows.length;
  for (let i = 0; i < n; i++) {
    if (i % 5000 === 4999) progress(i / n);
    const r = sheet.rows[i]!;
    const c = r.cells;
    const code = take(issues, S, r, 'bin', readCode(c.bin ?? null, 'bin'));
    const unique = code !== undefined && claimCode(issues, seen, S, 'bin', 'bin', code, r.row);
    const aisleCode = take(issues, S, r, 'aisle', readCode(c.aisle ?? null, 'aisle'));
    const side = take(issues, S, r, 'side', readSide(c.side ?? null));
    const level = take(issues, S, r, 'level', readInteger(c.level ?? null, 'level', 0));
    const zone = take(issues, S, r, 'zone', readOptionalText(c.zone ?? null, 'zone'));
    const yRaw: CellValue = c.y_m ?? null;
    const bayRaw: CellValue = c.bay ?? null;

    let aisle: PlanAisle | undefined;
    if (aisleCode !== undefined) {
      aisle = aisleByCode.get(aisleCode);
      if (!aisle && aisleCodesSeen && !aisleCodesSeen.has(aisleCode)) {
        issues.error({ sheet: S, row: r.row, column: 'aisle', value: aisleCode, message: `aisle ${aisleCode} does not exist in the aisles sheet` });
      }
    }

    let y: number | undefined;
    let bay: number | null = null;
    if (yRaw !== null && bayRaw !== null) {
      issues.error({ sheet: S, row: r.row, column: 'bay', value: displayValue(bayRaw), message: 'give either y_m or bay for a bin, not both' });
    } else if (yRaw === null && bayRaw === null) {
      issues.error({
        sheet: S,
        row: r.row,
        column: sheet.columns.includes('y_m') ? 'y_m' : 'bay',
        value: null,
        message: 'give the bin a position: y_m (metres along the aisle) or bay (bay number)',
      });
    } else if (yRaw !== null) {
      y = take(issues, S, r, 'y_m', readNumber(yRaw, 'y_m'));
      if (y !== undefined && aisle && (y < aisle.yStart - tol || y > aisle.yEnd + tol)) {
        issues.error({
          sheet: S,
          row: r.row,
          column: 'y_m',
          value: displayValue(yRaw),
          message: `y_m ${y} m lies outside aisle ${aisle.code}, which runs from ${aisle.yStart} m to ${aisle.yEnd} m`,
        });
        y = undefined;
      }
    } else {
      const b = take(issues, S, r, 'bay', readInteger(bayRaw, 'bay', 1));
      if (b !== undefined && aisle) {
        const len = bayLength.get(aisle.code) ?? null;
        if (len === null) {
          issues.error({
            sheet: S,
            row: r.row,
            column: 'bay',
            value: displayValue(bayRaw),
            message: `aisle ${aisle.code} has no bay_length_m, so bay ${b} cannot be placed; fill bay_length_m in aisles or give y_m`,
          });
        } else {
          // The centre of bay b, counted from the aisle's y_start_m end.
          const centre = aisle.yStart + (b - 0.5) * len;
          if (centre > aisle.yEnd + tol) {
            issues.error({
              sheet: S,
              row: r.row,
              column: 'bay',
              value: displayValue(bayRaw),
              message: `bay ${b} centres at ${round(centre)} m, past the end of aisle ${aisle.code} (${aisle.yEnd} m)`,
            });
          } else {
            y = centre;
            bay = b;
          }
        }
      }
    }

    if (!unique || !aisle || y === undefined || side === undefined || level === undefined || zone === undefined) continue;
    out.push({ item: { code, aisle: aisle.code, y, bay, side, level, zone }, row: r.row });
  }
  progress(1);
  return out;
}

function readSide(v: CellValue): Read<'L' | 'R'> {
  const t = typeof v === 'string' ? v.trim().toUpperCase() : null;
  if (t === 'L' || t === 'R') return { ok: true, value: t };
  return { ok: false, message: v === null ? 'side is empty; use L or R' : 'side must be L (left) or R (right)' };
}

function mapProblem(
  p: PlanProblem,
  plan: PlanGeometry,
  rows: { aisles: Located<PlanAisle>[]; bins: Located<PlanBin>[]; depots: Located<PlanDepot>[] },
): RowIssue {
  switch (p.entity) {
    case 'aisle': {
      const a = plan.aisles[p.index]!;
      const message =
        p.code === 'aisle_no_cross_aisle'
          ? `aisle ${a.code} touches no cross aisle, so no one can walk into it; extend it to a cross aisle or add one`
          : p.code === 'aisle_no_bins'
            ? `aisle ${a.code} has no bins`
            : p.code === 'aisles_too_close'
              ? `${p.message}; check the x of both aisles`
              : p.message;
      return { sheet: 'aisles', row: rows.aisles[p.index]!.row, column: 'aisle', value: a.code, message };
    }
    case 'bin': {
      const b = plan.bins[p.index]!;
      const message = p.code === 'bin_unreachable' ? `bin ${b.code} cannot be reached from the depot on foot` : p.message;
      return { sheet: 'bins', row: rows.bins[p.index]!.row, column: p.code === 'bin_unreachable' ? 'bin' : 'aisle', value: b.code, message };
    }
    case 'depot': {
      const d = plan.depots[p.index]!;
      const message =
        p.code === 'depot_unlinked'
          ? `depot ${d.code} lies more than ${DEPOT_LINK_MAX_M} m from every aisle and cross aisle; move it next to one`
          : `depot ${d.code} cannot be reached on foot from the first depot`;
      return { sheet: 'depots', row: rows.depots[p.index]!.row, column: 'depot', value: d.code, message };
    }
    default:
      return {
        sheet: p.code === 'no_depot' ? 'depots' : FILE_SHEET,
        row: null,
        column: null,
        value: null,
        message: p.code === 'no_depot' ? 'the plan has no depot; add a row to depots' : p.message,
      };
  }
}

function round(v: number): number {
  return Math.round(v * 1000) / 1000;
}
