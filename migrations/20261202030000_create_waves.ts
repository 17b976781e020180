import type { Knex } from 'knex';

/**
 * Released waves: their trips (cart loads), numbered stops and pick lines, on the plan version they
 * were planned on. Planned figures are stored, not recomputed, so a later plan change leaves them as
 * they were.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('waves', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.integer('plan_id').notNullable().references('floor_plans.id');
    t.string('name').notNullable();
    // released → picking → completed; cancelled
    t.string('status').notNullable();
    t.string('cart_name').notNullable();
    t.integer('cart_totes').notNullable();
    t.float('cart_max_kg').notNullable();
    t.float('cart_max_litres').notNullable();
    t.string('batching').notNullable();
    t.string('routing_method').notNullable();
    t.string('routing_improve').notNullable();
    t.integer('depot_idx').notNullable();
    t.integer('orders_count').notNullable();
    t.integer('lines_count').notNullable();
    t.float('planned_metres').notNullable();
    t.float('lower_bound_metres').notNullable();
    t.float('single_metres').notNullable();
    t.float('s_shape_metres');
    t.float('est_seconds').notNullable();
    t.text('notes').notNullable().defaultTo('[]');
    // The client's key for this release: a double click or a retry finds the same wave.
    t.string('release_key').notNullable();
    t.integer('created_by').references('users.id').onDelete('SET NULL');
    t.string('created_at').notNullable();
    t.string('completed_at');
    t.string('cancelled_at');
    t.unique(['site_id', 'release_key']);
    t.index(['site_id', 'status']);
  });
  await knex.schema.createTable('trips', (t) => {
    t.increments('id');
    t.integer('wave_id').notNullable().references('waves.id').onDelete('CASCADE');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.integer('n').notNullable();
    // released → assigned → picking → done; cancelled
    t.string('status').notNullable();
    t.integer('picker_id').references('users.id').onDelete('SET NULL');
    t.float('planned_metres').notNullable();
    t.float('lower_bound_metres').notNullable();
    t.float('s_shape_metres');
    t.float('est_seconds').notNullable();
    t.integer('totes').notNullable();
    t.float('kg').notNullable();
    t.float('litres').notNullable();
    t.integer('depot_node').notNullable();
    t.string('due');
    t.string('assigned_at');
    t.string('started_at');
    t.string('finished_at');
    t.unique(['wave_id', 'n']);
    t.index(['site_id', 'status']);
    t.index(['picker_id', 'status']);
  });
  await knex.schema.createTable('trip_orders', (t) => {
    t.integer('trip_id').notNullable().references('trips.id').onDelete('CASCADE');
    t.integer('order_id').notNullable().references('orders.id');
    // JSON array of tote numbers on the cart.
    t.text('totes').notNullable();
    t.primary(['trip_id', 'order_id']);
  });
  await knex.schema.createTable('stops', (t) => {
    t.increments('id');
    t.integer('trip_id').notNullable().references('trips.id').onDelete('CASCADE');
    // Stop number in circuit order, 1-based; may change when a picker skips a stop.
    t.integer('n').notNullable();
    t.integer('node').notNullable();
    t.float('x_m').notNullable();
    t.float('y_m').notNullable();
    t.string('bins').notNullable();
    // open → done; skipped stays open but moves to the end
    t.string('status').notNullable().defaultTo('open');
    t.string('done_at');
    t.index(['trip_id', 'n']);
  });
  await knex.schema.createTable('pick_lines', (t) => {
    t.increments('id');
    t.integer('trip_id').notNullable().references('trips.id').onDelete('CASCADE');
    t.integer('stop_id').notNullable().references('stops.id').onDelete('CASCADE');
    t.integer('order_id').notNullable().references('orders.id');
    t.integer('order_line_id').notNullable().references('order_lines.id');
    t.string('order_ref').notNullable();
    t.string('sku').notNullable();
    t.string('description').notNullable();
    t.string('bin').notNullable();
    t.integer('qty').notNullable();
    t.integer('tote').notNullable();
    // open → picked | short; cancelled when the rest of a trip is cancelled
    t.string('status').notNullable().defaultTo('open');
    t.integer('picked_qty');
    t.string('short_reason');
    t.integer('confirmed_by').references('users.id').onDelete('SET NULL');
    t.string('confirmed_at');
    t.index(['trip_id', 'stop_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ['pick_lines', 'stops', 'trip_orders', 'trips', 'waves']) await knex.schema.dropTableIfExists(t);
}
