/**
 * Site time zones: IANA zone names (the tz database, e.g. "Europe/Berlin", "America/Chicago", "UTC"),
 * checked against the zones the JavaScript runtime knows (ECMA-402: an unknown zone is a RangeError),
 * and times written in a site's zone for pick lists, mails and exports.
 */
import { z } from 'zod';

/** Area/Location names ("America/Argentina/Buenos_Aires") and single names ("UTC"); offsets such as "+01:00" are not zone names. */
const ZONE_NAME = /^[A-Za-z][A-Za-z0-9_+-]*(\/[A-Za-z0-9_+-]+){0,2}$/;

/** True for a time zone name of the IANA tz database that this runtime can convert to. */
export function isIanaTimeZone(zone: string): boolean {
  if (!ZONE_NAME.test(zone)) return false;
  try {
    new Intl.DateTimeFormat('en', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

export const TimeZoneName = z
  .string()
  .trim()
  .min(1)
  .max(64)
  .refine(isIanaTimeZone, { message: 'must be a time zone name of the IANA tz database, such as Europe/Berlin, America/Chicago or UTC' });

const formatters = new Map<string, Intl.DateTimeFormat>();

/** "2026-12-05 14:03" in `zone` (24-hour clock); '' for a missing or unreadable time. */
export function formatInZone(iso: string | null | undefined, zone: string): string {
  if (!iso) return '';
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return '';
  let f = formatters.get(zone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-CA', {
      timeZone: zone,
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      hourCycle: 'h23',
    });
    formatters.set(zone, f);
  }
  const p = Object.fromEntries(f.formatToParts(date).map((x) => [x.type, x.value]));
  return `${p.year}-${p.month}-${p.day} ${p.hour}:${p.minute}`;
}
