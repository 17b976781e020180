/**
 * echarts options for the study charts, as pure functions of a study variant so they unit-test
 * without a DOM. Colours: the product palette's teal and amber with slate, and series also differ by
 * symbol shape, so colour is never the only cue.
 */
import { DEFAULT_ROUTING, type Replications, type RoutingMethodKey, type RoutingRow, type StudyVariant } from '@shared/studies';

const SERIES_COLOURS = ['#0E5E63', '#B86E00', '#4B5A69', '#6A9FA3', '#8C4A2F'];
const SYMBOLS = ['circle', 'triangle', 'rect', 'diamond', 'pin'];
/** Methods drawn on the per-trip chart when they apply: the default, the usual baselines, the optimum. */
const SCATTER_KEYS: RoutingMethodKey[] = [DEFAULT_ROUTING, 's-shape', 'largest-gap', 'ratliff-rosenthal', 'nearest-neighbor+none'];

/** The replicated figures of one plan, when the study ran several seeds. */
export function replicatedOf(v: StudyVariant, rep: Replications | null): Replications['variants'][number] | null {
  return rep?.variants.find((x) => x.key === v.key) ?? null;
}

/**
 * Total metres per applicable method, shortest first, the default marked. With replications the bar is
 * the mean over the seeds and a whisker spans its 95 % interval (a custom series: line and end caps).
 */
export function totalDistanceOption(v: StudyVariant, rep: Replications | null = null): Record<string, unknown> {
  const reps = replicatedOf(v, rep);
  const ciOf = (key: string) => reps?.routing.find((f) => f.key === key)?.metresCi ?? null;
  const valueOf = (r: RoutingRow) => (reps ? (ciOf(r.key)?.mean ?? null) : r.metres);
  const rows = v.routing.filter((r) => valueOf(r) !== null).sort((a, b) => valueOf(a)! - valueOf(b)!);
  const r1 = (x: number) => Math.round(x * 10) / 10;
  const m = (x: number) => `${x.toLocaleString('en-US')} m`;
  const bars = {
    type: 'bar',
    data: rows.map((r) => ({ value: r1(valueOf(r)!), itemStyle: { color: r.key === DEFAULT_ROUTING ? '#B86E00' : '#0E5E63' } })),
    // With whiskers the figure goes inside the bar, where no whisker crosses it.
    label: {
      show: true,
      position: reps ? 'insideLeft' : 'right',
      ...(reps ? { color: '#FFFFFF', fontWeight: 600 } : {}),
      formatter: (p: { value: number; dataIndex: number }) => {
        const half = ciOf(rows[p.dataIndex]!.key)?.halfWidth;
        return half == null ? m(p.value) : `${m(p.value)} ± ${m(r1(half))}`;
      },
    },
  };
  const whiskers = {
    type: 'custom',
    name: '95 % interval',
    encode: { x: [0, 1], y: 2 },
    data: rows.flatMap((r, i) => {
      const ci = ciOf(r.key);
      return ci?.low != null && ci.high != null ? [[ci.low, ci.high, i]] : [];
    }),
    renderItem: (_: unknown, api: { value: (i: number) => number; coord: (p: number[]) => number[]; size: (p: number[]) => number[] }) => {
      const lo = api.coord([api.value(0), api.value(2)]);
      const hi = api.coord([api.value(1), api.value(2)]);
      const cap = api.size([0, 1])[1]! * 0.25;
      const style = { stroke: '#1F2933', lineWidth: 1.5 };
      const line = (x1: number, y1: number, x2: number, y2: number) => ({ type: 'line', shape: { x1, y1, x2, y2 }, style });
      return {
        type: 'group',
        children: [line(lo[0]!, lo[1]!, hi[0]!, hi[1]!), line(lo[0]!, lo[1]! - cap, lo[0]!, lo[1]! + cap), line(hi[0]!, hi[1]! - cap, hi[0]!, hi[1]! + cap)],
      };
    },
    z: 3,
  };
  const what = reps ? `Total walking distance per method, mean of ${rep!.seeds.length} seeds with 95 % interval` : 'Total walking distance per method';
  return {
    title: { text: `${what} — ${v.label}`, left: 0, textStyle: { fontSize: 14 } },
    grid: { left: 290, right: 40, top: 40, bottom: 30 },
    tooltip: { trigger: 'axis', axisPointer: { type: 'shadow' }, valueFormatter: (x: number) => `${x.toFixed(1)} m` },
    xAxis: { type: 'value', name: 'm', axisLabel: { formatter: '{value} m' } },
    yAxis: {
      type: 'category',
      inverse: true,
      data: rows.map((r) => (r.key === DEFAULT_ROUTING ? `${r.label} (default)` : r.solved !== null ? `${r.label} (partly solved: lower bound)` : r.label)),
    },
    series: reps ? [bars, whiskers] : [bars],
    animation: false,
  };
}

export function stopsScatterOption(v: StudyVariant): Record<string, unknown> {
  const keys = SCATTER_KEYS.filter((k) => v.routing.some((r) => r.key === k && r.metres !== null));
  return {
    title: { text: `Distance against stops per trip — ${v.label}`, left: 0, textStyle: { fontSize: 14 } },
    grid: { left: 60, right: 30, top: 70, bottom: 50 },
    legend: { top: 28, data: keys.map((k) => v.routing.find((r) => r.key === k)!.label) },
    tooltip: {
      trigger: 'item',
      formatter: (p: { seriesName: string; value: [number, number, number] }) => `${p.seriesName}<br/>trip ${p.value[2]}: ${p.value[0]} stops, ${p.value[1]} m`,
    },
    xAxis: { type: 'value', name: 'stops per trip', nameLocation: 'middle', nameGap: 30, minInterval: 1 },
    yAxis: { type: 'value', name: 'metres per trip', axisLabel: { formatter: '{value} m' } },
    series: keys.map((k, i) => ({
      name: v.routing.find((r) => r.key === k)!.label,
      type: 'scatter',
      symbol: SYMBOLS[i % SYMBOLS.length],
      symbolSize: 9,
      itemStyle: { color: SERIES_COLOURS[i % SERIES_COLOURS.length], opacity: 0.8 },
      data: v.trips.filter((t) => t.metres[k] != null).map((t) => [t.nodes.length, Math.round(t.metres[k]! * 10) / 10, t.n]),
    })),
    animation: false,
  };
}
