/** Times on screen and on printed pick lists are shown in the current site's zone, not the browser's. */
import { afterEach, describe, expect, it } from 'vitest';
import { formatClock, formatDateTime, setDisplayTimeZone } from '@client/utils/format';

afterEach(() => setDisplayTimeZone(null));

describe('site time zone on screen', () => {
  it("shows a time in the site's zone and names the zone (Asia/Kolkata is UTC+05:30 all year, IANA tz database)", () => {
    setDisplayTimeZone('Asia/Kolkata');
    const shown = formatDateTime('2026-12-05T08:00:00Z');
    expect(shown).toMatch(/1:30/);
    expect(shown).toMatch(/GMT\+5:30$/);
    expect(formatClock('2026-12-05T08:00:00Z')).toMatch(/1:30/);
  });

  it('follows a change of site', () => {
    setDisplayTimeZone('America/Chicago'); // UTC-06:00 in December (IANA tz database)
    expect(formatClock('2026-12-05T08:00:00Z')).toMatch(/02:00/);
    setDisplayTimeZone('UTC');
    expect(formatDateTime('2026-12-05T08:00:00Z')).toMatch(/8:00.*UTC$/);
  });
});
