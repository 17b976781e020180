import type { Knex } from 'knex';

/**
 * What the supervisor did about a short: marked handled, re-picked in a later wave (a new open order
 * for the quantity not found, named after the original order), or sent to the replenishment list
 * (and later marked restocked). Plain integer ids, no foreign keys: SQLite cannot drop a column that
 * a foreign key uses, and the original line and order stay in their own tables anyway.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('pick_shorts', (t) => {
    // handled | repick | replenish; null while the short needs attention
    t.string('follow_up').nullable();
    t.integer('repick_order_id').nullable();
    t.string('restocked_at').nullable();
    t.integer('restocked_by').nullable();
  });
  await knex('pick_shorts').whereNotNull('handled_at').update({ follow_up: 'handled' });
  await knex.schema.alterTable('pick_shorts', (t) => {
    t.index(['site_id', 'follow_up'], 'pick_shorts_site_follow_up_index');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('pick_shorts', (t) => t.dropIndex(['site_id', 'follow_up'], 'pick_shorts_site_follow_up_index'));
  for (const c of ['follow_up', 'repick_order_id', 'restocked_at', 'restocked_by']) await knex.raw(`ALTER TABLE pick_shorts DROP COLUMN ${c}`);
}
