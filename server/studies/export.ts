/**
 * A study as a workbook: the inputs on the first sheet, then one sheet per table of the page, the
 * figures rounded as the page shows them (metres and hours to 0.1 / 0.01, percentages to 0.01).
 */
import * as XLSX from 'xlsx';
import { neutraliseCells } from '../../shared/input-rules';
import { formatInZone } from '../../shared/time-zone';
import { BATCHING_LABELS } from '../../shared/waves';
import type { ReplicatedFigure, Replications, RoutingRow, StudyDetail, StudyResults } from '../../shared/studies';
import { ROUTING_LABELS } from '../../shared/studies';

const r1 = (v: number | null): number | string => (v === null ? '' : Math.round(v * 10) / 10);
const r2 = (v: number | null): number | string => (v === null ? '' : Math.round(v * 100) / 100);
const r0 = (v: number): number => Math.round(v);

/** Text cells (study names, labels, notes typed by people) never start a formula (OWASP, "CSV Injection"). */
const sheetOf = (rows: (string | number)[][]) => XLSX.utils.aoa_to_sheet(neutraliseCells(rows));

/** Sheet names are at most 31 characters and unique. */
const sheetName = (base: string, variant: number): string => (variant === 0 ? base : `${base} what-if ${variant}`).slice(0, 31);

/** The figures a routing and a batching row share, in this order. */
const FIGURE_HEADER = ['total m', 'm per trip', 'm per line', '% above best', '% above lower bound', 'picker hours', 'picker hours per day', 'compute ms'];
const ROUTING_HEADER = ['method', 'label', ...FIGURE_HEADER, 'note'];
const BATCHING_HEADER = ['batching', 'label', 'trips', 'orders', 'lines', ...FIGURE_HEADER];

type Figures = Pick<RoutingRow, 'metres' | 'metresPerTrip' | 'metresPerLine' | 'aboveBestPct' | 'aboveBoundPct' | 'hours' | 'hoursPerDay' | 'ms'>;
const figureCells = (r: Figures): (number | string)[] => [
  r1(r.metres),
  r1(r.metresPerTrip),
  r2(r.metresPerLine),
  r2(r.aboveBestPct),
  r2(r.aboveBoundPct),
  r2(r.hours),
  r2(r.hoursPerDay),
  r0(r.ms),
];

/** Every seed's figures of each method, then the mean and its 95 % interval, one block of rows per method. */
function replicationRows(rep: Replications): (string | number)[][] {
  const rows: (string | number)[][] = [['plan', 'table', 'method', 'label', 'row', 'total m', 'picker hours per day']];
  const block = (plan: string, table: string, f: ReplicatedFigure) => {
    f.metres.forEach((m, i) => rows.push([plan, table, f.key, f.label, `seed ${rep.seeds[i]}`, r1(m), r2(f.hoursPerDay[i] ?? null)]));
    const [m, h] = [f.metresCi, f.hoursPerDayCi];
    rows.push([plan, table, f.key, f.label, `mean of ${f.metres.length}`, r1(m?.mean ?? null), r2(h?.mean ?? null)]);
    rows.push([plan, table, f.key, f.label, 'standard deviation', r1(m?.sd ?? null), r2(h?.sd ?? null)]);
    rows.push([plan, table, f.key, f.label, `t (0.975, ${f.metres.length - 1} degrees of freedom)`, r2(m?.t ?? h?.t ?? null), '']);
    rows.push([plan, table, f.key, f.label, '95 % interval low', r1(m?.low ?? null), r2(h?.low ?? null)]);
    rows.push([plan, table, f.key, f.label, '95 % interval high', r1(m?.high ?? null), r2(h?.high ?? null)]);
  };
  for (const v of rep.variants) {
    for (const f of v.routing) block(v.label, 'routing', f);
    for (const f of v.batching) block(v.label, 'batching', f);
  }
  for (const f of rep.whatIf) block(rep.variants.find((v) => v.key === f.variant)?.label ?? f.variant, 'what-if difference', f);
  return rows;
}

/** `timeZone`: the site's IANA zone; the created time is written in it, and the zone named. */
export function studyWorkbook(study: StudyDetail & { results: StudyResults }, timeZone = 'UTC'): Buffer {
  const wb = XLSX.utils.book_new();
  const res = study.results;
  const inputs: (string | number)[][] = [
    ['study', study.name],
    ['id', study.id],
    ['seed', study.seed],
    ['replications', res.replications ? `${res.replications.seeds.length} (seeds ${res.replications.seeds.join(', ')}); other sheets: seed ${study.seed}` : 1],
    [`created (${timeZone})`, formatInZone(study.createdAt, timeZone)],
    ['created by', study.createdBy ?? ''],
    ['work', study.inputs.work.kind],
    ['routing methods', study.inputs.routing.join(', ')],
    ['batching methods', study.inputs.batching.join(', ')],
    ['walking speed m/s', res.speeds.walkingSpeedMps],
    ['seconds per line', res.speeds.secondsPerLine],
    ['seconds per stop', res.speeds.secondsPerStop],
    ['cart totes', res.cart.totes],
    ['cart max kg', res.cart.maxKg],
    ['cart max L', res.cart.maxLitres],
    ['day scale (hours per day = hours × this)', res.dayScale],
    ['default routing', res.defaultRouting],
    ['inputs (JSON)', JSON.stringify(study.inputs)],
    ...study.inputs.whatIfs.map((w, i) => [`what-if ${i + 1}`, `${w.label}: ${JSON.stringify(w.changes)}`]),
    ...res.notes.map((n) => ['note', n]),
  ];
  XLSX.utils.book_append_sheet(wb, sheetOf(inputs), 'inputs');

  res.variants.forEach((v, vi) => {
    const routing = [[`${v.label}`], ROUTING_HEADER, ...v.routing.map((r) => [r.key, r.label, ...figureCells(r), r.reason ?? ''])];
    XLSX.utils.book_append_sheet(wb, sheetOf(routing), sheetName('routing', vi));
    const batching = [
      [`${v.label}`],
      BATCHING_HEADER,
      ...v.batching.map((b) => [b.method, BATCHING_LABELS[b.method], b.trips, b.orders, b.lines, ...figureCells(b)]),
    ];
    XLSX.utils.book_append_sheet(wb, sheetOf(batching), sheetName('batching', vi));
    const keys = v.routing.map((r) => r.key);
    const trips = [
      [`${v.label}`],
      ['trip', 'wave', 'orders', 'stops', 'lines', 'lower bound m', ...keys.map((k) => `${ROUTING_LABELS[k]} m`)],
      ...v.trips.map((t) => [t.n, t.wave, t.orders, t.nodes.length, t.lines, r1(t.lowerBound), ...keys.map((k) => r1(t.metres[k] ?? null))]),
    ];
    XLSX.utils.book_append_sheet(wb, sheetOf(trips), sheetName('trips', vi));
  });

  if (res.whatIf.length) {
    const rows = [
      ['what-if', 'method', 'plan as it is m', 'what-if m', 'difference m', 'difference %', 'difference picker hours per day', 'note'],
      ...res.whatIf.map((w) => [
        w.label,
        w.methodLabel,
        r1(w.baseMetres),
        r1(w.metres),
        r1(w.deltaMetres),
        r2(w.deltaPct),
        r2(w.deltaHoursPerDay),
        w.note ?? '',
      ]),
    ];
    XLSX.utils.book_append_sheet(wb, sheetOf(rows), 'what-if');
  }
  if (res.recorded) {
    const rows = [
      [
        'wave id',
        'wave',
        'trips',
        'confirmed trips',
        'planned m',
        'planned m (confirmed trips)',
        'walked m as confirmed',
        'walked % above planned',
        'default method today m',
      ],
      ...res.recorded.map((w) => [
        w.waveId,
        w.name,
        w.trips,
        w.confirmedTrips,
        r1(w.plannedMetres),
        r1(w.plannedConfirmedMetres),
        r1(w.walkedMetres),
        r2(w.walkedAbovePlannedPct),
        r1(w.defaultMetres),
      ]),
    ];
    XLSX.utils.book_append_sheet(wb, sheetOf(rows), 'recorded waves');
  }
  if (res.replications) XLSX.utils.book_append_sheet(wb, sheetOf(replicationRows(res.replications)), 'replications');
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx', compression: true }) as Buffer;
}
