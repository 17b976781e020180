import { describe, expect, it } from 'vitest';
import { stopsScatterOption, totalDistanceOption } from '../../../client/views/studies/charts';
import { byNullable, metres1, signed } from '../../../client/views/studies/format';
import { meanInterval } from '../../../server/studies/replications';
import type { ReplicatedFigure, Replications } from '../../../shared/studies';
import { routingRow, variantOf } from './fixtures';

const row = routingRow;
const variant = variantOf(
  [row('s-shape', 300.04), row('best+local', 200.06), row('return', null)],
  [
    { n: 1, wave: 1, orders: 1, lines: 3, nodes: [1, 2, 3], lowerBound: 90, metres: { 's-shape': 140, 'best+local': 100, return: null }, visits: {} },
    { n: 2, wave: 1, orders: 1, lines: 3, nodes: [4, 5], lowerBound: 100, metres: { 's-shape': 160.04, 'best+local': 100.06, return: null }, visits: {} },
  ],
  190,
  6,
);

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

  it("draws each method's mean over the seeds with a whisker from the 95 % interval's low to high end", () => {
    const fig = (key: string, metres: (number | null)[]): ReplicatedFigure => ({
      key,
      label: key,
      metres,
      hoursPerDay: metres.map(() => null),
      metresCi: metres.every((m) => m !== null) ? meanInterval(metres as number[]) : null,
      hoursPerDayCi: null,
    });
    // S-shape 300, 310, 320 m: mean 310, s = 10, t(0.975, 2) = 4.303 (t table) → ± 24.84 m.
    const rep: Replications = {
      seeds: [1, 2, 3],
      variants: [
        {
          key: 'base',
          label: 'Plan as it is',
          routing: [fig('s-shape', [300, 310, 320]), fig('best+local', [200, 202, 204]), fig('return', [null, null, null])],
          batching: [],
        },
      ],
      whatIf: [],
    };
    const o = totalDistanceOption(variant, rep) as {
      title: { text: string };
      yAxis: { data: string[] };
      series: { type: string; data: ({ value: number } | number[])[] }[];
    };
    expect(o.title.text).toContain('mean of 3 seeds');
    expect(o.yAxis.data).toEqual(['best+local (default)', 's-shape']);
    expect(o.series[0]!.data.map((d) => (d as { value: number }).value)).toEqual([202, 310]);
    const whiskers = o.series[1]!;
    expect(whiskers.type).toBe('custom');
    const [lo, hi, at] = whiskers.data[1] as number[];
    expect(at).toBe(1);
    expect(lo).toBeCloseTo(310 - (4.303 * 10) / Math.sqrt(3), 2);
    expect(hi).toBeCloseTo(310 + (4.303 * 10) / Math.sqrt(3), 2);
    // One replication: no whiskers, the figures as they are.
    expect((totalDistanceOption(variant, null) as { series: unknown[] }).series).toHaveLength(1);
  });
});
