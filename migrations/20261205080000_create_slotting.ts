import type { Knex } from 'knex';

/** Slotting runs, uploaded order histories they learn from, and the SKU master's bin history. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('slotting_histories', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.string('file_name').notNullable();
    // JSON: [{ ref, day, lines: [{ sku, qty }] }]
    t.text('orders').notNullable();
    t.integer('order_count').notNullable();
    t.integer('created_by').references('users.id').onDelete('SET NULL');
    t.string('created_at').notNullable();
  });
  await knex.schema.createTable('slotting_runs', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.string('name').notNullable();
    t.string('method').notNullable();
    t.text('inputs').notNullable();
    // queued → running → done | failed | cancelled
    t.string('status').notNullable();
    t.text('results');
    t.text('error');
    t.integer('created_by').references('users.id').onDelete('SET NULL');
    t.string('created_at').notNullable();
    t.string('finished_at');
    t.integer('applied_moves');
    t.integer('applied_by').references('users.id').onDelete('SET NULL');
    t.string('applied_at');
    t.index(['site_id', 'id']);
  });
  await knex.schema.createTable('sku_bin_history', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.string('sku').notNullable();
    t.string('from_bin').notNullable();
    t.string('to_bin').notNullable();
    t.string('source').notNullable();
    t.integer('changed_by').references('users.id').onDelete('SET NULL');
    t.string('changed_at').notNullable();
    t.index(['site_id', 'sku']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ['sku_bin_history', 'slotting_runs', 'slotting_histories']) await knex.schema.dropTableIfExists(t);
}
