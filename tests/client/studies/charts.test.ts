import { describe, expect, it } from 'vitest';
import { stopsScatterOption, totalDistanceOption } from '../../../client/views/studies/charts';
import { byNullable, metres1, signed } from '../../../client/views/studies/format';
import type { RoutingRow, StudyVariant } from '../../../shared/studies';

const row = (key: RoutingRow['key'], metres: number | null): RoutingRow => ({
  key,
  label: key,
  applicable: metres !== null,
  reason: metres === null ? 'does not apply' : null,
  metres,
  metresPerTrip: null,
  metresPerLine: null,
  aboveBestPct: null,
  aboveBoundPct: null,
  hours: null,
  hoursPerDay: null,
  ms: 1,
  solved: null,
});

const variant: StudyVariant = {
  key: 'base',
  label: 'Plan as it is',
  changes: [],
  layout: { aisles: 4, crossAisles: 2, bins: 10, blocks: 1, policyNote: null },
  depotNode: 0,
  routing: [row('s-shape', 300.04), row('best+local', 200.06), row('return', null)],
  batching: [],
  unplaced: [],
  lowerBound: 190,
  lines: 6,
  trips: [
    { n: 1, wave: 1, orders: 1, lines: 3, nodes: [1, 2, 3], lowerBound: 90, metres: { 's-shape': 140, 'best+local': 100, return: null }, visits: {} },
    { n: 2, wave: 1, orders: 1, lines: 3, nodes: [4, 5], lowerBound: 100, metres: { 's-shape': 160.04, 'best+local': 100.06, return: null }, visits: {} },
  ],
};

describe('study charts', () => {
  it('draws the total per applicable method, shortest first, the default marked', () => {
    const o = totalDistanceOption(variant) as { yAxis: { data: string[] }; series: { data: { value: number; itemStyle: { color: string } }[] }[] };
    expect(o.yAxis.data).toEqual(['best+local (default)', 's-shape']);
    expect(o.series[0]!.data.map((d) => d.value)).toEqual([200.1, 300]);
    expect(o.series[0]!.data[0]!.itemStyle.color).not.toBe(o.series[0]!.data[1]!.itemStyle.color);
  });

  it('plots each trip as (stops, metres) for the methods that apply, each series with its own symbol', () => {
    const o = stopsScatterOption(variant) as { series: { name: string; symbol: string; data: number[][] }[] };
    expect(o.series.map((s) => s.name)).toEqual(['best+local', 's-shape']);
    expect(o.series[1]!.data).toEqual([
      [3, 140, 1],
      [2, 160, 2],
    ]);
    expect(new Set(o.series.map((s) => s.symbol)).size).toBe(2);
  });

  it('formats figures with units and sorts missing figures last', () => {
    expect(metres1(1234.56)).toBe('1,234.6 m');
    expect(metres1(null)).toBe('—');
    expect(signed(-1.046, 'h')).toBe('−1.05 h');
    const rows = [row('return', null), row('s-shape', 3), row('best+local', 1)];
    expect(rows.sort(byNullable((r) => r.metres)).map((r) => r.key)).toEqual(['best+local', 's-shape', 'return']);
  });
});
