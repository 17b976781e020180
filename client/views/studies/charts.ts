/**
 * echarts options for the study charts, as pure functions of a study variant so they unit-test
 * without a DOM. Colours: the product palette's teal and amber with slate, and series also differ by
 * symbol shape, so colour is never the only cue.
 */
import { DEFAULT_ROUTING, type RoutingMethodKey, type StudyVariant } from '@shared/studies';

const SERIES_COLOURS = ['#0E5E63', '#B86E00', '#4B5A69', '#6A9FA3', '#8C4A2F'];
const SYMBOLS = ['circle', 'triangle', 'rect', 'diamond', 'pin'];
/** Methods drawn on the per-trip chart when they apply: the default, the usual baselines, the optimum. */
const SCATTER_KEYS: RoutingMethodKey[] = [DEFAULT_ROUTING, 's-shape', 'largest-gap', 'ratliff-rosenthal', 'nearest-neighbor+none'];

export function totalDistanceOption(v: StudyVariant): Record<string, unknown> {
  const rows = v.routing.filter((r) => r.metres !== null).sort((a, b) => a.metres! - b.metres!);
  return {
    title: { text: `Total walking distance per method — ${v.label}`, left: 0, textStyle: { fontSize: 14 } },
    grid: { left: 290, right: 40, top: 40, bottom: 30 },
    tooltip: { trigger: 'axis', axisPointer: { type: 'shadow' }, valueFormatter: (x: number) => `${x.toFixed(1)} m` },
    xAxis: { type: 'value', name: 'm', axisLabel: { formatter: '{value} m' } },
    yAxis: {
      type: 'category',
      inverse: true,
      data: rows.map((r) => (r.key === DEFAULT_ROUTING ? `${r.label} (default)` : r.solved !== null ? `${r.label} (partly solved: lower bound)` : r.label)),
    },
    series: [
      {
        type: 'bar',
        data: rows.map((r) => ({ value: Math.round(r.metres! * 10) / 10, itemStyle: { color: r.key === DEFAULT_ROUTING ? '#B86E00' : '#0E5E63' } })),
        label: { show: true, position: 'right', formatter: (p: { value: number }) => `${p.value.toLocaleString('en-US')} m` },
      },
    ],
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
