/** Study figures as the page and the workbook show them; numbers always carry units. */
import { formatMetres } from '@client/utils/format';

const nf = (digits: number) => new Intl.NumberFormat('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits });
const n2 = nf(2);

export const metres1 = (m: number | null): string => (m === null ? '—' : formatMetres(m, { digits: 1, space: ' ' }));
export const hours2 = (h: number | null): string => (h === null ? '—' : `${n2.format(h)} h`);
export const pct2 = (p: number | null): string => (p === null ? '—' : `${n2.format(p)} %`);
export const ms0 = (ms: number): string => `${Math.round(ms).toLocaleString('en-US')} ms`;
/** Signed difference, e.g. "−1.23 h" for a saving. */
export const signed = (v: number | null, unit: string, digits = 2): string =>
  v === null ? '—' : `${v > 0 ? '+' : v < 0 ? '−' : '±'}${nf(digits).format(Math.abs(v))} ${unit}`;

/** Sorter for nullable numbers: missing figures always last. */
export function byNullable<T>(get: (row: T) => number | null): (a: T, b: T) => number {
  return (a, b) => {
    const x = get(a);
    const y = get(b);
    if (x === null) return y === null ? 0 : 1;
    if (y === null) return -1;
    return x - y;
  };
}
