/**
 * Columns of the study page's tables. Routing and batching rows share their figure columns; with
 * replications, each table gains the mean over the seeds with its 95 % interval.
 */
import { h } from 'vue';
import { NTag, type DataTableColumn, type DataTableColumns } from 'naive-ui';
import { DEFAULT_ROUTING, ROUTING_HINTS, type BatchingRow, type Interval, type ReplicatedFigure, type RoutingRow, type WhatIfRow } from '@shared/studies';
import { BATCHING_HINTS } from '@shared/waves';
import { byNullable, hours2, metres1, ms0, pct2, signed } from './format';

type Figures = Pick<RoutingRow, 'metres' | 'metresPerTrip' | 'metresPerLine' | 'aboveBestPct' | 'aboveBoundPct' | 'hoursPerDay' | 'ms'>;

type Show = (v: number | null) => string;
const metresPerLine = (m: number | null): string => (m === null ? '—' : `${m.toFixed(2)} m`);

/** A right-aligned figure, sortable with missing figures last. */
function figure<T>(title: string, key: string, get: (r: T) => number | null, show: (v: number | null) => string): DataTableColumn<T> {
  return { title, key, align: 'right', className: 'num', sorter: byNullable(get), render: (r) => show(get(r)) };
}

/** Mean ± half-width, e.g. "1,234.5 m ± 12.3 m", or the mean alone with one seed. */
export function withInterval(ci: Interval | null, show: (v: number | null) => string, showHalf = show): string {
  if (!ci) return '—';
  return ci.halfWidth === null ? show(ci.mean) : `${show(ci.mean)} ± ${showHalf(ci.halfWidth)}`;
}

/** With several seeds: each row's mean metres and hours a day over them, with the 95 % interval. */
function replicated<T>(seeds: number, find: (r: T) => ReplicatedFigure | undefined, signedFigures = false): DataTableColumns<T> {
  const column = (title: string, key: string, width: number, ci: (f: ReplicatedFigure) => Interval | null, show: Show, half: Show): DataTableColumn<T> => {
    const get = (r: T) => {
      const f = find(r);
      return f ? ci(f) : null;
    };
    return {
      title,
      key,
      width,
      align: 'right',
      className: 'num ci',
      sorter: byNullable((r) => get(r)?.mean ?? null),
      render: (r) => withInterval(get(r), show, half),
    };
  };
  return [
    column(`Mean of ${seeds} seeds (95 % interval)`, 'replicatedMetres', 200, (f) => f.metresCi, signedFigures ? (v) => signed(v, 'm', 1) : metres1, metres1),
    column('Picker hours / day, mean (95 %)', 'replicatedHours', 170, (f) => f.hoursPerDayCi, signedFigures ? (v) => signed(v, 'h') : hours2, hours2),
  ];
}

/** `seed`: with replications, the total and the other figures are the first seed's, and the header says so. */
function figureColumns<T extends Figures>(seed: number | null, extra: DataTableColumns<T>): DataTableColumns<T> {
  // The mean of the metres beside the total, the mean of the hours beside the hours.
  const [meanMetres, meanHours] = extra;
  return [
    figure<T>(seed === null ? 'Total' : `Total, seed ${seed}`, 'metres', (r) => r.metres, metres1),
    ...(meanMetres ? [meanMetres] : []),
    figure<T>('Per trip', 'metresPerTrip', (r) => r.metresPerTrip, metres1),
    figure<T>('Per line', 'metresPerLine', (r) => r.metresPerLine, metresPerLine),
    figure<T>('Above best', 'aboveBestPct', (r) => r.aboveBestPct, pct2),
    figure<T>('Above lower bound', 'aboveBoundPct', (r) => r.aboveBoundPct, pct2),
    figure<T>(seed === null ? 'Picker hours / day' : `Picker hours / day, seed ${seed}`, 'hoursPerDay', (r) => r.hoursPerDay, hours2),
    ...(meanHours ? [meanHours] : []),
    { title: 'Compute', key: 'ms', align: 'right', className: 'num', sorter: (a, b) => a.ms - b.ms, render: (r) => ms0(r.ms) },
  ];
}

/** The replicated figures of one plan, when the study has them. */
export interface Replicated {
  seeds: number[];
  routing: ReplicatedFigure[];
  batching: ReplicatedFigure[];
  whatIf: (ReplicatedFigure & { variant: string })[];
}

export function routingColumns(rep: Replicated | null): DataTableColumns<RoutingRow> {
  return [
    {
      title: 'Method',
      key: 'label',
      width: 300,
      fixed: 'left',
      sorter: (a, b) => a.label.localeCompare(b.label),
      render: (r) =>
        h('div', [
          h('span', [
            r.label,
            r.key === DEFAULT_ROUTING ? h(NTag, { size: 'small', type: 'info', style: 'margin-left: 6px' }, { default: () => 'default' }) : null,
          ]),
          h('div', { class: 'method-hint' }, ROUTING_HINTS[r.key]),
        ]),
    },
    ...figureColumns<RoutingRow>(rep?.seeds[0] ?? null, rep ? replicated(rep.seeds.length, (r) => rep.routing.find((f) => f.key === r.key)) : []),
    { title: 'Note', key: 'reason', width: 240, fixed: 'right', render: (r) => h('span', { class: 'note' }, r.reason ?? '') },
  ];
}

export function batchingColumns(rep: Replicated | null): DataTableColumns<BatchingRow> {
  return [
    {
      title: 'Batching',
      key: 'label',
      width: 300,
      sorter: (a, b) => a.label.localeCompare(b.label),
      render: (r) => h('div', [h('span', r.label), h('div', { class: 'method-hint' }, BATCHING_HINTS[r.method])]),
    },
    { title: 'Trips', key: 'trips', align: 'right', className: 'num', sorter: (a, b) => a.trips - b.trips },
    ...figureColumns<BatchingRow>(rep?.seeds[0] ?? null, rep ? replicated(rep.seeds.length, (r) => rep.batching.find((f) => f.key === r.method)) : []),
  ];
}

export function whatIfColumns(rep: Replicated | null): DataTableColumns<WhatIfRow> {
  const seed = rep ? `, seed ${rep.seeds[0]}` : '';
  return [
    { title: 'What-if', key: 'label', width: 150, fixed: 'left' },
    { title: 'Method', key: 'methodLabel', width: 260, fixed: 'left', sorter: (a, b) => a.methodLabel.localeCompare(b.methodLabel) },
    figure<WhatIfRow>('Plan as it is', 'baseMetres', (r) => r.baseMetres, metres1),
    figure<WhatIfRow>('What-if', 'metres', (r) => r.metres, metres1),
    figure<WhatIfRow>(
      `Difference${seed}`,
      'deltaMetres',
      (r) => r.deltaMetres,
      (v) => signed(v, 'm', 1),
    ),
    ...(rep ? replicated<WhatIfRow>(rep.seeds.length, (r) => rep.whatIf.find((f) => f.variant === r.variant && f.key === r.method), true) : []),
    figure<WhatIfRow>(
      'Difference %',
      'deltaPct',
      (r) => r.deltaPct,
      (v) => signed(v, '%'),
    ),
    figure<WhatIfRow>(
      'Picker hours / day',
      'deltaHoursPerDay',
      (r) => r.deltaHoursPerDay,
      (v) => signed(v, 'h'),
    ),
    { title: 'Note', key: 'note', width: 280, fixed: 'right', render: (r) => h('span', { class: 'note', 'data-testid': 'what-if-note' }, r.note ?? '') },
  ];
}
