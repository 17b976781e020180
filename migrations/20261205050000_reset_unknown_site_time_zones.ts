import type { Knex } from 'knex';
import { isIanaTimeZone } from '../shared/time-zone';

/**
 * Site time zones were free text before they were checked: a value that is not an IANA zone name
 * (e.g. "Mars/Olympus_Mons") becomes UTC, and the change is written to the audit log so an admin
 * can see what was typed and set the right zone.
 */
export async function up(knex: Knex): Promise<void> {
  const sites: { id: number; timezone: string }[] = await knex('sites').select('id', 'timezone');
  const now = new Date().toISOString();
  for (const s of sites) {
    if (isIanaTimeZone(s.timezone)) continue;
    await knex('sites').where({ id: s.id }).update({ timezone: 'UTC' });
    await knex('audit_log').insert({
      site_id: s.id,
      user_id: null,
      action: 'site.timezone_reset',
      subject: null,
      detail: JSON.stringify({ was: s.timezone, now: 'UTC' }),
      at: now,
    });
  }
}

/** Nothing to undo: the old values were not usable time zones. */
export async function down(): Promise<void> {}
