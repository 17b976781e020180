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
  const name = new Intl.DateTimeFormat('en-GB', { timeZone: displayTimeZone, timeZoneName: 'short' }).formatToParts(date).find((p) => p.type === 'timeZoneName')?.value;
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
