import type { Knex } from 'knex';

/**
 * Request counters per client key and window, shared by every instance on one database (the sign-in
 * rate limit). `reset_at` is milliseconds since the epoch.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('rate_limits', (t) => {
    t.string('key', 300).primary();
    t.integer('hits').notNullable();
    t.bigInteger('reset_at').notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('rate_limits');
}
