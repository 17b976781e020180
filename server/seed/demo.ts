import type { Knex } from 'knex';
import type { Hasher } from '../auth/hasher';
import { withAdvisoryLock } from '../db/dialect';
import { insertUser } from '../users/users.repository';

/** The invented demo scenario: a fictional company and site, no real data. */
export const DEMO_COMPANY = 'Brambleway Supply Co.';
export const DEMO_PASSWORD = 'demo-password-1';
export const DEMO_PIN = '246810';

export interface DemoSignIn {
  role: string;
  name: string;
  signIn: string;
  secret: string;
}

export const DEMO_USERS = [
  { role: 'admin', name: 'Avery Admin', email: 'admin@demo.aislewright.test' },
  { role: 'supervisor', name: 'Sam Supervisor', email: 'supervisor@demo.aislewright.test' },
  { role: 'engineer', name: 'Eli Engineer', email: 'engineer@demo.aislewright.test' },
] as const;
export const DEMO_PICKERS = [
  { name: 'Pat Picker', badge: 'P-1001' },
  { name: 'Robin Picker', badge: 'P-1002' },
  { name: 'Kai Picker', badge: 'P-1003' },
] as const;

/** Extra demo content from other domains (floor plan, SKUs, orders), run after the base seed. */
export type DemoSeeder = (db: Knex, siteId: number, userIds: Record<string, number>) => Promise<void>;

/**
 * Seeds the demo site when the database has no users; returns the sign-ins to print, or null when
 * the database already had users (nothing is touched then). Instances starting together on one
 * PostgreSQL take turns under an advisory lock, so the demo is seeded once.
 */
export function seedDemoIfEmpty(db: Knex, hasher: Hasher, extra: DemoSeeder[] = []): Promise<DemoSignIn[] | null> {
  return withAdvisoryLock(db, 'aislewright:demo-seed', () => seedUnlocked(db, hasher, extra));
}

async function seedUnlocked(db: Knex, hasher: Hasher, extra: DemoSeeder[]): Promise<DemoSignIn[] | null> {
  const { n } = (await db('users').count<{ n: number }[]>({ n: '*' }))[0]!;
  if (Number(n) > 0) return null;
  const now = new Date().toISOString();
  const [{ id: siteId }] = await db('sites').insert({ code: 'BWE', name: 'Brambleway East DC', timezone: 'UTC', created_at: now }, 'id');
  await db('cart_profiles').insert([
    { site_id: siteId, name: 'Standard cart (8 totes)', totes: 8, max_kg: 150, max_litres: 400 },
    { site_id: siteId, name: 'Compact cart (4 totes)', totes: 4, max_kg: 80, max_litres: 200 },
  ]);
  const passwordHash = await hasher.hash(DEMO_PASSWORD);
  const pinHash = await hasher.hash(DEMO_PIN);
  const ids: Record<string, number> = {};
  const out: DemoSignIn[] = [];
  for (const u of DEMO_USERS) {
    ids[u.role] = await insertUser(
      db,
      { name: u.name, email: u.email, badge: null, role: u.role, password_hash: passwordHash, pin_hash: null, created_at: now },
      [siteId!],
    );
    out.push({ role: u.role, name: u.name, signIn: u.email, secret: DEMO_PASSWORD });
  }
  for (const p of DEMO_PICKERS) {
    ids[p.badge] = await insertUser(
      db,
      { name: p.name, email: null, badge: p.badge, role: 'picker', password_hash: null, pin_hash: pinHash, created_at: now },
      [siteId!],
    );
    out.push({ role: 'picker', name: p.name, signIn: `badge ${p.badge}`, secret: `PIN ${DEMO_PIN}` });
  }
  for (const seed of extra) await seed(db, siteId!, ids);
  return out;
}
