import { describe, expect, it } from 'vitest';
import { meanInterval, studentCdf, studentQuantile } from '../../../server/studies/replications';
import { runStudy } from '../../../server/studies/study-engine';
import { StudyInputs, type StudyInputsBody } from '../../../shared/studies';
import { smallPlan, smallStudy, wavesOn } from './helpers';

describe("Student's t interval", () => {
  it('gives the two-sided 95 % quantiles of the t table (any statistics text; 3 decimals)', () => {
    // t(0.975, df) as printed in the t table, e.g. Montgomery & Runger, Appendix Table V.
    const table: [number, number][] = [
      [1, 12.706],
      [2, 4.303],
      [3, 3.182],
      [4, 2.776],
      [5, 2.571],
      [9, 2.262],
      [10, 2.228],
      [19, 2.093],
      [29, 2.045],
    ];
    for (const [df, t] of table) expect(studentQuantile(0.975, df)).toBeCloseTo(t, 3);
  });

  it('matches the closed forms for 1 and 2 degrees of freedom and a reference library to 1e-9', () => {
    // df = 1 is the Cauchy distribution: quantile tan(π (p − ½)); df = 2: (2p − 1) / √(2 p (1 − p)).
    expect(studentQuantile(0.975, 1)).toBeCloseTo(Math.tan(Math.PI * 0.475), 9);
    expect(studentQuantile(0.975, 2)).toBeCloseTo(0.95 / Math.sqrt(2 * 0.975 * 0.025), 9);
    // scipy.stats.t.ppf(0.975, df) and t.cdf(1.5, 7), SciPy 1.17.1, run on this machine.
    expect(studentQuantile(0.975, 4)).toBeCloseTo(2.7764451051977934, 9);
    expect(studentQuantile(0.975, 29)).toBeCloseTo(2.045229642132703, 9);
    expect(studentQuantile(0.975, 100)).toBeCloseTo(1.9839715185235518, 9);
    expect(studentCdf(1.5, 7)).toBeCloseTo(0.911350756505015, 9);
    expect(studentCdf(-1.5, 7)).toBeCloseTo(1 - 0.911350756505015, 9);
  });

  it('gives mean ± t·s/√n on a worked example: 2, 4, 4, 4, 5, 5, 7, 9', () => {
    // By hand: mean 5, s = √(32 / 7) = 2.1381, t(0.975, 7) = 2.365 (t table) → half-width 2.365 · 2.1381 / √8 = 1.788.
    // scipy.stats.t.interval(0.95, 7, loc=5, scale=s/√8) = (3.21251208176379, 6.787487918236209).
    const ci = meanInterval([2, 4, 4, 4, 5, 5, 7, 9])!;
    expect(ci.n).toBe(8);
    expect(ci.mean).toBe(5);
    expect(ci.sd).toBeCloseTo(Math.sqrt(32 / 7), 12);
    expect(ci.t).toBeCloseTo(2.365, 3);
    expect(ci.halfWidth).toBeCloseTo(1.788, 2); // the table's t is rounded to 3 decimals
    expect(ci.low).toBeCloseTo(3.21251208176379, 9);
    expect(ci.high).toBeCloseTo(6.787487918236209, 9);
  });

  it('gives one value a mean and no interval, identical values a zero-width interval, nothing none', () => {
    expect(meanInterval([7])).toEqual({ n: 1, mean: 7, sd: null, t: null, halfWidth: null, low: null, high: null });
    const flat = meanInterval([3, 3, 3])!;
    expect(flat.halfWidth).toBe(0);
    expect(flat.low).toBe(3);
    expect(meanInterval([])).toBeNull();
  });
});

describe('replications', () => {
  const body = (replications: number, kind: 'generated' | 'recorded' = 'generated'): StudyInputsBody => ({
    name: 'r',
    seed: 5,
    replications,
    work:
      kind === 'recorded'
        ? { kind: 'recorded', waveIds: [1] }
        : {
            kind: 'generated',
            plan: { source: 'active' },
            orders: { waves: 1, ordersPerWave: 4, linesMin: 1, linesMax: 2, skus: 10, skewSkuPct: 20, skewLinesPct: 80 },
            wavesPerDay: 1,
          },
  });

  it('accepts 1–30 replications of generated work and refuses them on recorded waves, naming the field', () => {
    expect(StudyInputs.parse(body(30)).replications).toBe(30);
    expect(StudyInputs.safeParse(body(31)).success).toBe(false);
    expect(StudyInputs.safeParse(body(0)).success).toBe(false);
    const { replications: _r, ...noCount } = body(1);
    expect(StudyInputs.parse(noCount).replications).toBe(1);
    expect(StudyInputs.parse(body(1, 'recorded')).replications).toBe(1);
    const refused = StudyInputs.safeParse(body(3, 'recorded'));
    expect(refused.success).toBe(false);
    expect(refused.error!.issues[0]!.path).toEqual(['replications']);
    expect(refused.error!.issues[0]!.message).toMatch(/nothing to replicate/);
  });

  it('runs each seed, keeps the first as the study and summarises every method by mean and interval, progress counting replications', () => {
    const geometry = smallPlan();
    const spec = { waves: 1, ordersPerWave: 12, linesMin: 1, linesMax: 3, skus: 60, skewSkuPct: 20, skewLinesPct: 80, qtyMax: 2 };
    const draw = (seed: number) => wavesOn(geometry, spec, seed);
    const input = smallStudy(geometry, draw(11), 11, {
      whatIfs: [{ label: 'Middle cross aisle', changes: [{ kind: 'add_cross_aisle', yM: 10 }] }],
      dayScale: 2,
    });
    const one = runStudy(input);
    expect(one.replications).toBeNull();
    const seen: { f: number; phase: string }[] = [];
    const three = runStudy({ ...input, replicas: [12, 13].map((seed) => ({ seed, waves: draw(seed) })), progress: (f, phase) => seen.push({ f, phase }) });
    const strip = (r: typeof one) => r.variants.map((v) => ({ routing: v.routing.map(({ ms: _m, ...x }) => x), trips: v.trips }));
    // The first replication is the study as it would be alone.
    expect(strip(three)).toEqual(strip(one));
    const rep = three.replications!;
    expect(rep.seeds).toEqual([11, 12, 13]);
    const alone = [11, 12, 13].map((seed) => runStudy({ ...input, seed, waves: draw(seed) }));
    const sShape = rep.variants[0]!.routing.find((r) => r.key === 's-shape')!;
    const perSeed = alone.map((r) => r.variants[0]!.routing.find((x) => x.key === 's-shape')!.metres!);
    expect(sShape.metres).toEqual(perSeed);
    // The seeds draw different work, so the interval has width.
    expect(new Set(perSeed).size).toBeGreaterThan(1);
    expect(sShape.metresCi).toEqual(meanInterval(perSeed));
    expect(sShape.metresCi!.low!).toBeLessThan(sShape.metresCi!.mean);
    const savings = rep.variants[1]!.batching.find((b) => b.key === 'savings')!;
    expect(savings.hoursPerDay).toEqual(alone.map((r) => r.variants[1]!.batching.find((b) => b.method === 'savings')!.hoursPerDay));
    // What-if differences are paired by seed.
    const diff = rep.whatIf.find((w) => w.key === 's-shape')!;
    expect(diff.metres).toEqual(alone.map((r) => r.whatIf.find((w) => w.method === 's-shape')!.deltaMetres));
    // Progress runs once through 0…1 across the three replications and names each.
    for (let i = 1; i < seen.length; i++) expect(seen[i]!.f).toBeGreaterThanOrEqual(seen[i - 1]!.f);
    expect(seen.at(-1)!.f).toBe(1);
    for (const r of [1, 2, 3]) expect(seen.some((s) => s.phase.startsWith(`Replication ${r} of 3 (seed ${10 + r})`))).toBe(true);
    expect(seen.find((s) => s.phase.startsWith('Replication 2 of 3'))!.f).toBeGreaterThanOrEqual(1 / 3 - 1e-9);
  });
});
