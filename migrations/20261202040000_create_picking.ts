import type { Knex } from 'knex';

/**
 * Picking on released trips: the idempotency store for every picker write, the assignment history
 * (who held a trip, until when), shorts for the supervisor's attention, and a few columns on the
 * waves tables: the order stops were actually picked in, skips, and when the wave report was mailed.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('pick_requests', (t) => {
    t.increments('id');
    t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE');
    // Made by the tablet once per intended action; a retry or a queued resend carries the same key.
    t.string('idem_key').notNullable();
    // sha256 of method, path and canonical body: the same key with another body is refused.
    t.string('request_hash').notNullable();
    t.integer('trip_id').notNullable().references('trips.id').onDelete('CASCADE');
    t.integer('status').notNullable();
    t.text('response').notNullable();
    t.string('created_at').notNullable();
    t.unique(['user_id', 'idem_key']);
  });
  await knex.schema.createTable('trip_assignments', (t) => {
    t.increments('id');
    t.integer('trip_id').notNullable().references('trips.id').onDelete('CASCADE');
    t.integer('picker_id').notNullable().references('users.id').onDelete('CASCADE');
    t.integer('assigned_by').references('users.id').onDelete('SET NULL');
    t.string('assigned_at').notNullable();
    // Set when the trip is taken from this picker; their work done before then still counts.
    t.string('ended_at');
    t.index(['trip_id', 'picker_id']);
  });
  await knex.schema.createTable('pick_shorts', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.integer('wave_id').notNullable().references('waves.id').onDelete('CASCADE');
    t.integer('trip_id').notNullable().references('trips.id').onDelete('CASCADE');
    t.integer('line_id').notNullable().references('pick_lines.id').onDelete('CASCADE');
    t.integer('qty_ordered').notNullable();
    t.integer('qty_found').notNullable();
    // empty_bin | damaged | cannot_reach
    t.string('reason').notNullable();
    t.integer('reported_by').references('users.id').onDelete('SET NULL');
    t.string('reported_at').notNullable();
    t.integer('handled_by').references('users.id').onDelete('SET NULL');
    t.string('handled_at');
    t.unique(['line_id']);
    t.index(['site_id', 'handled_at']);
  });
  await knex.schema.alterTable('stops', (t) => {
    // 1, 2, 3… in the order the picker finished stops: walked metres follow this, not the plan.
    t.integer('done_seq');
    // Set by "Skip for now"; skipped stops keep their skip order at the end of the trip.
    t.string('skipped_at');
  });
  await knex.schema.alterTable('trips', (t) => {
    t.string('cancelled_at');
    t.float('walked_metres');
  });
  await knex.schema.alterTable('waves', (t) => {
    t.string('report_mailed_at');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('waves', (t) => t.dropColumn('report_mailed_at'));
  await knex.schema.alterTable('trips', (t) => {
    t.dropColumn('cancelled_at');
    t.dropColumn('walked_metres');
  });
  await knex.schema.alterTable('stops', (t) => {
    t.dropColumn('done_seq');
    t.dropColumn('skipped_at');
  });
  for (const t of ['pick_shorts', 'trip_assignments', 'pick_requests']) await knex.schema.dropTableIfExists(t);
}
