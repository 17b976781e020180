import type { Knex } from 'knex';

/** Of `bins`, those not on the site's active floor plan (every one of them when no plan is active). */
export async function missingBinsOnActivePlan(db: Knex, siteId: number, bins: string[]): Promise<Set<string>> {
  const wanted = [...new Set(bins)];
  const plan = await db('floor_plans').where({ site_id: siteId, state: 'active' }).first<{ id: number } | undefined>('id');
  if (!plan) return new Set(wanted);
  const found = new Set<string>();
  for (let i = 0; i < wanted.length; i += 500) {
    const rows: { code: string }[] = await db('floor_plan_bins').where({ plan_id: plan.id }).whereIn('code', wanted.slice(i, i + 500)).select('code');
    for (const r of rows) found.add(r.code);
  }
  return new Set(wanted.filter((b) => !found.has(b)));
}
