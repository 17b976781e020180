/**
 * The wave report: per trip the planned and walked metres (walked = depot → stops in the order
 * actually finished → depot, on the plan's distance index), lines, shorts and times; one sheet of
 * shorts. Built as xlsx for the mail attachment and the board's download.
 */
import * as XLSX from 'xlsx';
import type { Knex } from 'knex';
import { neutraliseCells } from '../../shared/input-rules';
import { SHORT_REASON_LABELS } from '../../shared/picking';
import { formatInZone } from '../../shared/time-zone';
import { siteTimeZone } from '../sites/sites.repository';
import { finiteOrNull, getWaveRow, linesOf, stopsOf, tripsWithPicker, waveShortRows } from './picking.repository';
import { walkedMetres } from './walked';

export interface WaveReportRow {
  trip: number;
  picker: string | null;
  status: string;
  stops: number;
  stopsDone: number;
  lines: number;
  picked: number;
  shorts: number;
  cancelled: number;
  plannedMetres: number | null;
  /** Null when not measurable (a closure cut off a stop after it was picked). */
  walkedMetres: number | null;
  estMinutes: number | null;
  minutes: number | null;
  startedAt: string | null;
  finishedAt: string | null;
}

export interface WaveReport {
  filename: string;
  xlsx: Buffer;
  text: string;
  rows: WaveReportRow[];
  summary: { trips: number; lines: number; picked: number; shorts: number; cancelled: number; plannedMetres: number; walkedMetres: number };
  /** The site's IANA time zone: every time in the workbook and the text is in it, and named. */
  timeZone: string;
}

const round1 = (v: number) => Math.round(v * 10) / 10;
/** A figure for a cell: rounded when finite, else an empty cell (never Infinity, NaN or an error value). */
const cell = (v: number | null | undefined): number | '' => (typeof v === 'number' && Number.isFinite(v) ? round1(v) : '');
const words = (v: number | null, unit: string, none: string) => (v === null ? none : `${round1(v)} ${unit}`);

export async function buildWaveReport(db: Knex, waveId: number): Promise<WaveReport> {
  const wave = (await getWaveRow(db, waveId))!;
  const zone = await siteTimeZone(db, wave.site_id);
  const at = (iso: string | null) => formatInZone(iso, zone);
  const trips = await tripsWithPicker(db, [waveId]);
  const rows: WaveReportRow[] = [];
  for (const t of trips) {
    const lines = await linesOf(db, t.id);
    const stops = await stopsOf(db, t.id);
    const minutes = t.started_at && t.finished_at ? finiteOrNull((Date.parse(t.finished_at) - Date.parse(t.started_at)) / 60_000) : null;
    rows.push({
      trip: t.n,
      picker: t.picker_name,
      status: t.status,
      stops: stops.length,
      stopsDone: stops.filter((s) => s.status === 'done').length,
      lines: lines.length,
      picked: lines.filter((l) => l.status === 'picked').length,
      shorts: lines.filter((l) => l.status === 'short').length,
      cancelled: lines.filter((l) => l.status === 'cancelled').length,
      plannedMetres: finiteOrNull(t.planned_metres),
      walkedMetres: finiteOrNull(t.walked_metres) ?? (t.status === 'done' || t.status === 'cancelled' ? null : await walkedMetres(db, t)),
      estMinutes: finiteOrNull(t.est_seconds / 60),
      minutes,
      startedAt: t.started_at,
      finishedAt: t.finished_at,
    });
  }
  const sum = (f: (r: WaveReportRow) => number | null) => rows.reduce((a, r) => a + (finiteOrNull(f(r)) ?? 0), 0);
  const summary = {
    trips: rows.length,
    lines: sum((r) => r.lines),
    picked: sum((r) => r.picked),
    shorts: sum((r) => r.shorts),
    cancelled: sum((r) => r.cancelled),
    plannedMetres: sum((r) => r.plannedMetres),
    walkedMetres: sum((r) => r.walkedMetres),
  };

  const shorts = await waveShortRows(db, waveId);

  const wb = XLSX.utils.book_new();
  const tripSheet = XLSX.utils.aoa_to_sheet(
    neutraliseCells([
      [
        'trip',
        'picker',
        'status',
        'stops',
        'stops done',
        'lines',
        'picked',
        'short',
        'cancelled',
        'planned m',
        'walked m',
        'estimated min',
        'actual min',
        `started (${zone})`,
        `finished (${zone})`,
      ],
      ...rows.map((r) => [
        r.trip,
        r.picker ?? '',
        r.status,
        r.stops,
        r.stopsDone,
        r.lines,
        r.picked,
        r.shorts,
        r.cancelled,
        cell(r.plannedMetres),
        cell(r.walkedMetres),
        cell(r.estMinutes),
        cell(r.minutes),
        at(r.startedAt),
        at(r.finishedAt),
      ]),
      [
        'total',
        '',
        '',
        sum((r) => r.stops),
        sum((r) => r.stopsDone),
        summary.lines,
        summary.picked,
        summary.shorts,
        summary.cancelled,
        cell(summary.plannedMetres),
        cell(summary.walkedMetres),
        cell(sum((r) => r.estMinutes)),
        '',
        '',
        '',
      ],
    ]),
  );
  XLSX.utils.book_append_sheet(wb, tripSheet, 'trips');
  const shortSheet = XLSX.utils.aoa_to_sheet(
    neutraliseCells([
      ['trip', 'order', 'sku', 'bin', 'ordered', 'found', 'reason', 'reported by', `reported (${zone})`],
      ...shorts.map((s) => [
        s.n,
        s.order_ref,
        s.sku,
        s.bin,
        s.qty_ordered,
        s.qty_found,
        SHORT_REASON_LABELS[s.reason] ?? s.reason,
        s.name ?? '',
        at(s.reported_at),
      ]),
    ]),
  );
  XLSX.utils.book_append_sheet(wb, shortSheet, 'shorts');
  const xlsx = XLSX.write(wb, { type: 'buffer', bookType: 'xlsx', compression: true }) as Buffer;

  const firstStart =
    rows
      .map((r) => r.startedAt)
      .filter((x): x is string => !!x)
      .sort()[0] ?? null;
  const lastFinish =
    rows
      .map((r) => r.finishedAt)
      .filter((x): x is string => !!x)
      .sort()
      .at(-1) ?? null;
  const safeName = wave.name.replace(/[^A-Za-z0-9-]+/g, '-').replace(/^-|-$/g, '') || `wave-${wave.id}`;
  const text = [
    `Wave ${wave.name} is ${wave.status === 'completed' ? 'complete' : wave.status}.`,
    '',
    `Trips: ${summary.trips}. Lines: ${summary.lines} (${summary.picked} picked, ${summary.shorts} short, ${summary.cancelled} cancelled).`,
    `Walking: ${round1(summary.walkedMetres)} m walked against ${round1(summary.plannedMetres)} m planned.${rows.some((r) => r.walkedMetres === null) ? ' Trips whose walk could not be measured (a closed stretch) are left out of the walked total.' : ''}`,
    ...(firstStart ? [`Picking: first trip started ${at(firstStart)}, last trip finished ${lastFinish ? at(lastFinish) : '(not yet)'} (${zone}).`] : []),
    '',
    'Per trip:',
    ...rows.map(
      (r) =>
        `  Trip ${r.trip}${r.picker ? ` (${r.picker})` : ''}: ${r.status}, ${r.lines} lines, ${r.shorts} short, planned ${words(r.plannedMetres, 'm', 'not known')}, walked ${words(r.walkedMetres, 'm', 'not measurable')}, ${words(r.minutes, 'min', 'not timed')}`,
    ),
    '',
    'The attached workbook has one row per trip and one per short.',
    `Times are in the site's time zone, ${zone}.`,
  ].join('\n');
  return { filename: `wave-report-${safeName}.xlsx`, xlsx, text, rows, summary, timeZone: zone };
}
