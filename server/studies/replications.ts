/**
 * Replications of a generated study: the same scenario drawn with several seeds, each method's figure
 * summarised by its mean and a 95 % confidence interval, mean ± t(0.975, n − 1) · s / √n with s the
 * sample standard deviation (Student's t interval, e.g. Montgomery & Runger, *Applied Statistics and
 * Probability for Engineers*, ch. 8). Pure: no Node, no database.
 */
import type { Interval, ReplicatedFigure, Replications, StudyResults } from '../../shared/studies';

/** ln Γ(x) for x > 0 (Lanczos approximation, g = 7, n = 9; about 15 correct digits). */
function lnGamma(x: number): number {
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905, -0.13857109526572012,
    9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - lnGamma(1 - x);
  const z = x - 1;
  let a = c[0]!;
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += c[i]! / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

/** Continued fraction of the incomplete beta function, modified Lentz's method (Press et al., *Numerical Recipes*, betacf). */
function betaFraction(a: number, b: number, x: number): number {
  const tiny = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 300; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-15) break;
  }
  return h;
}

/** Regularised incomplete beta I_x(a, b), 0 ≤ x ≤ 1. */
function incompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const front = Math.exp(lnGamma(a + b) - lnGamma(a) - lnGamma(b) + a * Math.log(x) + b * Math.log(1 - x));
  return x < (a + 1) / (a + b + 2) ? (front * betaFraction(a, b, x)) / a : 1 - (front * betaFraction(b, a, 1 - x)) / b;
}

/** P(T ≤ t) for Student's t with `df` degrees of freedom. */
export function studentCdf(t: number, df: number): number {
  const tail = 0.5 * incompleteBeta(df / (df + t * t), df / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

/** The p-quantile of Student's t (0.5 < p < 1), by bisection on the distribution function to 1e-12. */
export function studentQuantile(p: number, df: number): number {
  if (!(p > 0.5 && p < 1) || !(df > 0)) throw new RangeError('studentQuantile needs 0.5 < p < 1 and df > 0');
  let lo = 0;
  let hi = 1;
  while (studentCdf(hi, df) < p) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-12; i++) {
    const mid = (lo + hi) / 2;
    if (studentCdf(mid, df) < p) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Mean and 95 % interval of a sample (two-sided, Student's t with n − 1 degrees of freedom). One value
 * has a mean but no interval (t, s and the bounds are null). Null for an empty sample. O(n).
 */
export function meanInterval(values: readonly number[]): Interval | null {
  const n = values.length;
  if (n === 0) return null;
  const mean = values.reduce((s, v) => s + v, 0) / n;
  if (n === 1) return { n, mean, sd: null, t: null, halfWidth: null, low: null, high: null };
  const sd = Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / (n - 1));
  const t = studentQuantile(0.975, n - 1);
  const halfWidth = (t * sd) / Math.sqrt(n);
  return { n, mean, sd, t, halfWidth, low: mean - halfWidth, high: mean + halfWidth };
}

/**
 * Each method's figures across the replications (all run with the same methods and what-ifs, so their
 * variants and rows line up by key), with mean and interval; what-if differences are paired by seed.
 */
export function summariseReplications(runs: readonly StudyResults[]): Replications {
  const first = runs[0]!;
  type Pair = { metres: number | null; hoursPerDay: number | null } | undefined;
  // One row's figure in every run, its interval when every run has the figure.
  const across = (key: string, label: string, pick: (r: StudyResults) => Pair): ReplicatedFigure => {
    const rows = runs.map(pick);
    const metres = rows.map((r) => r?.metres ?? null);
    const hoursPerDay = rows.map((r) => r?.hoursPerDay ?? null);
    const all = (xs: (number | null)[]) => (xs.every((x): x is number => x !== null) ? meanInterval(xs) : null);
    return { key, label, metres, hoursPerDay, metresCi: all(metres), hoursPerDayCi: all(hoursPerDay) };
  };
  return {
    seeds: runs.map((r) => r.seed),
    variants: first.variants.map((v) => {
      const on = (r: StudyResults) => r.variants.find((x) => x.key === v.key);
      return {
        key: v.key,
        label: v.label,
        routing: v.routing.map((row) => across(row.key, row.label, (r) => on(r)?.routing.find((y) => y.key === row.key))),
        batching: v.batching.map((row) => across(row.method, row.label, (r) => on(r)?.batching.find((y) => y.method === row.method))),
      };
    }),
    whatIf: first.whatIf.map((w) => ({
      variant: w.variant,
      ...across(w.method, w.methodLabel, (r) => {
        const x = r.whatIf.find((y) => y.variant === w.variant && y.method === w.method);
        return x && { metres: x.deltaMetres, hoursPerDay: x.deltaHoursPerDay };
      }),
    })),
  };
}
