import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('skus', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.string('sku').notNullable();
    t.string('description').notNullable().defaultTo('');
    // The bin it is slotted in; checked against the active plan at import, kept as text so a plan
    // change does not lose the slotting.
    t.string('bin').notNullable();
    t.float('unit_weight_kg').notNullable();
    t.float('unit_volume_l').notNullable();
    t.string('updated_at').notNullable();
    t.unique(['site_id', 'sku']);
    t.index(['site_id', 'bin']);
  });
  await knex.schema.createTable('orders', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    // The host system's order reference; one order per reference per site.
    t.string('ref').notNullable();
    // open → planned (in a released wave) → picking → done; cancelled
    t.string('status').notNullable().defaultTo('open');
    t.string('due');
    // 1 is the most urgent (common practice: "P1"); null when the host sends none.
    t.integer('priority');
    t.string('source').notNullable();
    t.integer('lines').notNullable();
    t.integer('units').notNullable();
    t.float('weight_kg').notNullable();
    t.float('volume_l').notNullable();
    t.integer('wave_id');
    t.string('created_at').notNullable();
    t.unique(['site_id', 'ref']);
    t.index(['site_id', 'status', 'due']);
  });
  await knex.schema.createTable('order_lines', (t) => {
    t.increments('id');
    t.integer('order_id').notNullable().references('orders.id').onDelete('CASCADE');
    t.integer('line_no').notNullable();
    t.string('sku').notNullable();
    t.integer('qty').notNullable();
    t.unique(['order_id', 'line_no']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ['order_lines', 'orders', 'skus']) await knex.schema.dropTableIfExists(t);
}
