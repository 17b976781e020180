import type { Knex } from 'knex';

/** A counter raised by every change to a trip, so a tablet's 5-second poll reads one row. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('trips', (t) => {
    t.integer('revision').notNullable().defaultTo(0);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('trips', (t) => t.dropColumn('revision'));
}
