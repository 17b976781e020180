import type { Knex } from 'knex';

/** When the picker confirmed which order goes in which tote before the first stop (cart set-up). */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('trips', (t) => {
    t.string('cart_ready_at').nullable();
  });
}

// A plain DROP COLUMN (SQLite ≥ 3.35 and PostgreSQL): Knex's SQLite dropColumn rebuilds the table and
// would lose the finite-figure triggers on `trips`.
export async function down(knex: Knex): Promise<void> {
  await knex.raw('ALTER TABLE trips DROP COLUMN cart_ready_at');
}
