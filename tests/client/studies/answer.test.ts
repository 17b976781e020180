import { describe, expect, it } from 'vitest';
import { savingOverSShape, studyAnswerLines, studyDayNote, studyQuestion } from '../../../client/views/studies/answer';
import { DEFAULT_ROUTING, type RoutingRow, type StudyDetail, type StudyResults } from '../../../shared/studies';
import { routingRow, variantOf } from './fixtures';

// Hand-worked figures: S-shape walks 300 m and the default 200 m; at 1 m/s with no time per line or
// stop that is 300 s vs 200 s a wave; × 9 waves a day (dayScale 9) → 0.75 h vs 0.5 h → 0.25 h saved.
const row = (key: RoutingRow['key'], metres: number, hoursPerDay: number): RoutingRow => routingRow(key, metres, hoursPerDay);
const variant = variantOf(
  [row('s-shape', 300, 0.75), row(DEFAULT_ROUTING, 200, 0.5)],
  [{ n: 1, wave: 1, orders: 1, lines: 6, nodes: [1, 2, 3], lowerBound: 190, metres: {}, visits: {} }],
  190,
  6,
);
const results: StudyResults = {
  seed: 7,
  speeds: { walkingSpeedMps: 1, secondsPerLine: 0, secondsPerStop: 0 },
  cart: { totes: 8, maxKg: 100, maxLitres: 400 },
  dayScale: 9,
  defaultRouting: DEFAULT_ROUTING,
  variants: [variant],
  whatIf: [
    {
      variant: 'w1',
      label: 'Middle cross aisle',
      method: DEFAULT_ROUTING,
      methodLabel: 'default',
      baseMetres: 200,
      metres: 180,
      deltaMetres: -20,
      deltaPct: -10,
      deltaHoursPerDay: -0.05,
      note: null,
      applicable: true,
    },
  ] as unknown as StudyResults['whatIf'],
  recorded: null,
  notes: [],
  ms: 10,
  replications: null,
};
const study = {
  kind: 'generated',
  inputs: {
    name: 'Routing on the east hall',
    routing: [],
    batching: [],
    seed: 7,
    whatIfs: [{ label: 'Middle cross aisle', changes: [] }],
    work: {
      kind: 'generated',
      plan: { source: 'active' },
      orders: { waves: 1, ordersPerWave: 16, linesMin: 1, linesMax: 4, skus: 100, skewSkuPct: 20, skewLinesPct: 80, qtyMax: 3 },
      batching: 'savings',
      wavesPerDay: 9,
    },
  },
  results,
} as unknown as StudyDetail;

describe('study answer sentences', () => {
  it('states the hours a day and metres the default method saves against S-shape', () => {
    const lines = studyAnswerLines(results);
    expect(lines[0]).toBe(
      "Plan as it is: switching from S-shape to the default method saves 0.25 h of picker time a day (100.0 m less walking in the study's 1 trips).",
    );
  });

  it('says whether a what-if saves or costs, with its signed difference', () => {
    const lines = studyAnswerLines(results);
    expect(lines[1]).toContain('Middle cross aisle, routed by the default method: saves 0.05 h of picker time a day');
    const costly = { ...results, whatIf: [{ ...results.whatIf[0]!, deltaHoursPerDay: 0.1, deltaMetres: 40, deltaPct: 20 }] };
    expect(studyAnswerLines(costly)[1]).toContain('costs 0.10 h');
  });

  it('gives the summary headline: 0.25 h a day and (300 − 200) / 300 = 33.3 % less walking', () => {
    const saved = savingOverSShape(variant)!;
    expect(saved.hoursPerDay).toBeCloseTo(0.25, 12);
    expect(saved.metres).toBe(100);
    expect(saved.pct!.toFixed(1)).toBe('33.3');
  });

  it('leaves out a plan whose S-shape or default figure is missing', () => {
    const gap = { ...results, whatIf: [], variants: [{ ...variant, routing: [row('s-shape', 300, 0.75)] }] };
    expect(studyAnswerLines(gap)).toEqual([]);
  });

  it('words the question and the day for a reader who did not set the study up', () => {
    expect(studyQuestion(study)).toBe(
      "How much picker walking would the routing methods save on the site's active floor plan, for 1 wave(s) of 16 orders of 1–4 lines, and what this change to the floor plan would do: Middle cross aisle?",
    );
    expect(studyDayNote(study)).toBe('9 waves like these (the study has 1 of 16 orders: × 9.000)');
  });
});
