import type { Role } from '@shared/common';

export const ROLE_LABEL: Record<Role, string> = {
  admin: 'Admin',
  supervisor: 'Supervisor',
  engineer: 'Engineer',
  picker: 'Picker',
};

/**
 * The zone every time is shown in: the current site's (set by the session store when the site
 * changes), so a supervisor abroad and the floor read the same clock. Undefined: the browser's zone
 * (no site yet, e.g. on the sign-in pages).
 */
let displayTimeZone: string | undefined;

export function setDisplayTimeZone(zone: string | null | undefined): void {
  displayTimeZone = zone || undefined;
}

export const getDisplayTimeZone = (): string | undefined => displayTimeZone;

/** Date and time in the site's zone, the zone named, e.g. "5 Dec 2026, 14:03 CET". */
export function formatDateTime(iso: string): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return iso;
  return new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short', timeZone: displayTimeZone }).format(date) + zoneSuffix(date);
}

/** Short date and time for dense tables in the site's zone, e.g. "Dec 2, 14:00". */
export function formatShortDateTime(iso: string): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return iso;
  return new Intl.DateTimeFormat(undefined, { month: 'short', day: 'numeric', hour: '2-digit', minute: '2-digit', timeZone: displayTimeZone }).format(date);
}

/** Hours and minutes in the site's zone, e.g. "14:03" (live board, tablet notices). */
export function formatClock(iso: string | null): string {
  if (!iso) return '—';
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return '—';
  return new Intl.DateTimeFormat(undefined, { hour: '2-digit', minute: '2-digit', timeZone: displayTimeZone }).format(date);
}

/** " CET", " UTC", " GMT+1"…: the zone's short name at that date in the site's zone. */
function zoneSuffix(date: Date): string {
  const name = new Intl.DateTimeFormat('en-GB', { timeZone: displayTimeZone, timeZoneName: 'short' })
    .formatToParts(date)
    .find((p) => p.type === 'timeZoneName')?.value;
  return name ? ` ${name}` : '';
}

/** A number with its unit, e.g. `1.0 m/s`, `10 s`, `120 kg`. */
export function withUnit(value: number, unit: string, fractionDigits = 0): string {
  return `${value.toFixed(fractionDigits)} ${unit}`;
}

export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KiB`;
  return `${(bytes / (1024 * 1024)).toFixed(1)} MiB`;
}

const IRREGULAR: Record<string, string> = { box: 'boxes', person: 'people' };
/** A count with its noun in the right number, e.g. `count(1, 'trip')` → "1 trip", `count(3, 'trip')` → "3 trips". */
export function count(n: number, noun: string, plural = IRREGULAR[noun] ?? `${noun}s`): string {
  return `${n.toLocaleString('en-GB')} ${n === 1 ? noun : plural}`;
}

/** Non-breaking space: a figure and its unit never wrap apart ("5 min", never "5 / min"). */
export const NBSP = '\u00a0';

/**
 * The locale figures are grouped in ("1,709" or "1.709"): the site's when one is set, else the
 * browser's. Set beside the site's time zone, so every screen writes numbers the same way.
 */
let displayLocale: string | undefined;

export function setDisplayLocale(locale: string | null | undefined): void {
  displayLocale = locale || undefined;
}

const numberFormats = new Map<string, Intl.NumberFormat>();
function numberFormat(digits: number): Intl.NumberFormat {
  const key = `${displayLocale ?? ''}|${digits}`;
  let f = numberFormats.get(key);
  if (!f) {
    f = new Intl.NumberFormat(displayLocale, { minimumFractionDigits: digits, maximumFractionDigits: digits });
    numberFormats.set(key, f);
  }
  return f;
}

/**
 * The one metre formatter: a distance in the display locale with its unit, e.g. "1,709 m".
 * `digits: 'auto'` writes one decimal only when the value has a fraction; `space` is what stands
 * between figure and unit (a non-breaking space unless a caller's layout needs a plain one).
 */
export function formatMetres(m: number, options: { digits?: number | 'auto'; space?: string } = {}): string {
  const { digits = 0, space = NBSP } = options;
  const d = digits === 'auto' ? (Number.isInteger(m) ? 0 : 1) : digits;
  return `${numberFormat(d).format(m)}${space}m`;
}

/**
 * One unit for a group of distances read together (a sentence, a row of figures): kilometres when the
 * largest is 10 km or more, else metres — so "447 m … 12.30 km" never appears side by side.
 */
export function distanceUnit(values: readonly number[]): 'm' | 'km' {
  return values.some((m) => m >= 10_000) ? 'km' : 'm';
}
export function distance(m: number, unit: 'm' | 'km' = distanceUnit([m])): string {
  return unit === 'km' ? `${numberFormat(2).format(m / 1000)}${NBSP}km` : formatMetres(Math.round(m));
}
/** Every figure of a group in the same unit, in the order given. */
export const distances = (values: readonly number[]): string[] => values.map((m) => distance(m, distanceUnit(values)));

/** Date and time in a given IANA time zone (the site's), e.g. "Dec 5, 2026, 14:00"; the viewer's zone when none. */
export function formatInZone(iso: string, timeZone?: string): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return iso;
  try {
    return new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short', timeZone }).format(date);
  } catch {
    return new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short' }).format(date);
  }
}

/** How long ago a due time passed, in words ("45 min", "3 h 10 min", "2 days"); null when not yet due. */
export function overdueBy(dueIso: string | null, now: number): string | null {
  if (!dueIso) return null;
  const due = new Date(dueIso).getTime();
  if (Number.isNaN(due) || due >= now) return null;
  const min = Math.floor((now - due) / 60_000);
  if (min < 60) return `${Math.max(min, 1)}${NBSP}min`;
  if (min < 48 * 60) return `${Math.floor(min / 60)}${NBSP}h${min % 60 ? ` ${min % 60}${NBSP}min` : ''}`;
  return count(Math.floor(min / (24 * 60)), 'day').replace(' ', NBSP);
}
