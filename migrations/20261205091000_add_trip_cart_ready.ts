import type { Knex } from 'knex';

/** When the picker confirmed which order goes in which tote before the first stop (cart set-up). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('trips', (t) => {
    t.string('cart_ready_at').nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('trips', (t) => t.dropColumn('cart_ready_at'));
}
