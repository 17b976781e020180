import { isUniqueViolation, type Q } from '../db/knex';
import type { Role } from '../../shared/common';
import type { CartProfile, Site, SiteSettings } from '../../shared/sites';
import { isIanaTimeZone } from '../../shared/time-zone';

export interface DbSiteRow {
  id: number;
  code: string;
  name: string;
  timezone: string;
  walking_speed_mps: number;
  seconds_per_line: number;
  seconds_per_stop: number;
  confirm_scan: 'bin' | 'sku';
  created_at: string;
}

interface DbCartProfileRow {
  id: number;
  site_id: number;
  name: string;
  totes: number;
  max_kg: number;
  max_litres: number;
  archived: number;
}

export const settingsOf = (s: DbSiteRow): SiteSettings => ({
  walkingSpeedMps: s.walking_speed_mps,
  secondsPerLine: s.seconds_per_line,
  secondsPerStop: s.seconds_per_stop,
  confirmScan: s.confirm_scan,
});

export const settingsColumns = (p: Partial<SiteSettings>): Partial<DbSiteRow> => ({
  ...(p.walkingSpeedMps !== undefined && { walking_speed_mps: p.walkingSpeedMps }),
  ...(p.secondsPerLine !== undefined && { seconds_per_line: p.secondsPerLine }),
  ...(p.secondsPerStop !== undefined && { seconds_per_stop: p.secondsPerStop }),
  ...(p.confirmScan !== undefined && { confirm_scan: p.confirmScan }),
});

const toCartProfile = (r: DbCartProfileRow): CartProfile => ({ id: r.id, name: r.name, totes: r.totes, maxKg: r.max_kg, maxLitres: r.max_litres });

export async function cartProfilesOf(db: Q, siteId: number): Promise<CartProfile[]> {
  const rows: DbCartProfileRow[] = await db('cart_profiles').where({ site_id: siteId, archived: false }).orderBy('name');
  return rows.map(toCartProfile);
}

export async function getCartProfile(db: Q, siteId: number, id: number): Promise<CartProfile | null> {
  const r: DbCartProfileRow | undefined = await db('cart_profiles').where({ site_id: siteId, id, archived: false }).first();
  return r ? toCartProfile(r) : null;
}

export async function getSiteRow(db: Q, id: number): Promise<DbSiteRow | undefined> {
  return db<DbSiteRow>('sites').where({ id }).first();
}

export async function getSite(db: Q, id: number): Promise<Site | null> {
  const s = await getSiteRow(db, id);
  if (!s) return null;
  return { id: s.id, code: s.code, name: s.name, timezone: s.timezone, settings: settingsOf(s), cartProfiles: await cartProfilesOf(db, id) };
}

/** The site's short code (file names of downloads), or undefined for no such site. */
export async function siteCodeOf(db: Q, siteId: number): Promise<string | undefined> {
  return (await db('sites').where({ id: siteId }).first<{ code: string } | undefined>('code'))?.code;
}

/** Sites a user may work in: their own; admins see every site. */
export async function listSitesOf(db: Q, userId: number, role: Role): Promise<DbSiteRow[]> {
  if (role === 'admin') return db<DbSiteRow>('sites').orderBy('name');
  return db<DbSiteRow>('sites')
    .join('user_sites', 'user_sites.site_id', 'sites.id')
    .where('user_sites.user_id', userId)
    .orderBy('sites.name')
    .select('sites.*');
}

/**
 * The site's IANA time zone for times shown, printed, mailed and exported; 'UTC' for a missing site
 * or a zone this runtime does not know (values stored before zones were checked).
 */
export async function siteTimeZone(db: Q, siteId: number): Promise<string> {
  const row = await db('sites').where({ id: siteId }).first<{ timezone: string } | undefined>('timezone');
  return row && isIanaTimeZone(row.timezone) ? row.timezone : 'UTC';
}

export interface SiteColumns {
  code: string;
  name: string;
  timezone: string;
}

/**
 * A new site, or null when its code is taken. The check and the insert share one transaction, and a
 * code another request inserted meanwhile (the UNIQUE index) is the same answer, not a crash.
 */
export async function insertSite(db: Q, cols: SiteColumns): Promise<number | null> {
  try {
    return await db.transaction(async (trx) => {
      if (await trx('sites').where({ code: cols.code }).first()) return null;
      const [row] = await trx('sites').insert({ ...cols, created_at: new Date().toISOString() }, 'id');
      return (row as { id: number }).id;
    });
  } catch (err) {
    if (isUniqueViolation(err)) return null;
    throw err;
  }
}

export async function updateSiteRow(db: Q, id: number, patch: Partial<DbSiteRow>): Promise<void> {
  if (Object.keys(patch).length) await db('sites').where({ id }).update(patch);
}

export interface CartProfileColumns {
  name: string;
  totes: number;
  max_kg: number;
  max_litres: number;
}

/**
 * Adds a cart profile, or brings back an archived one of the same name; null when a live profile has
 * the name. One transaction, and a name inserted meanwhile by another request answers null too.
 */
export async function saveCartProfile(db: Q, siteId: number, cols: CartProfileColumns): Promise<number | null> {
  try {
    return await db.transaction(async (trx) => {
      const clash = await trx('cart_profiles').where({ site_id: siteId, name: cols.name }).first<{ id: number; archived: number | boolean } | undefined>();
      if (clash && !clash.archived) return null;
      if (clash) {
        await trx('cart_profiles')
          .where({ id: clash.id })
          .update({ ...cols, archived: false });
        return clash.id;
      }
      const [row] = await trx('cart_profiles').insert({ site_id: siteId, ...cols, archived: false }, 'id');
      return (row as { id: number }).id;
    });
  } catch (err) {
    if (isUniqueViolation(err)) return null;
    throw err;
  }
}

/** Changes a live cart profile; false when the site has no such profile. */
export async function updateCartProfile(db: Q, siteId: number, id: number, cols: CartProfileColumns): Promise<boolean> {
  return (await db('cart_profiles').where({ id, site_id: siteId, archived: false }).update(cols)) > 0;
}

/** Archives a live cart profile (waves that used it keep their figures); false when there is none. */
export async function archiveCartProfile(db: Q, siteId: number, id: number): Promise<boolean> {
  return (await db('cart_profiles').where({ id, site_id: siteId, archived: false }).update({ archived: true })) > 0;
}
