import type { Knex } from 'knex';

/**
 * Studies can be archived (hidden from the default list, kept whole), and engineers can upload a
 * candidate layout workbook for a what-if. A candidate is kept as its checked geometry (JSON of
 * PlanGeometry), never as a floor plan of the site, so it can neither be activated nor planned on.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('studies', (t) => {
    t.string('archived_at').nullable();
  });
  await knex.schema.createTable('study_layouts', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.string('name').notNullable();
    t.string('filename').notNullable();
    // JSON of PlanGeometry (shared/floor-plans.ts), as the floor-plan check returned it
    t.text('geometry').notNullable();
    // JSON of FloorPlanStats
    t.text('stats').notNullable();
    t.integer('created_by').references('users.id').onDelete('SET NULL');
    t.string('created_at').notNullable();
    t.index(['site_id', 'id']);
  });
}

// A plain DROP COLUMN (SQLite ≥ 3.35 and PostgreSQL), as the other added columns are dropped.
export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('study_layouts');
  await knex.raw('ALTER TABLE studies DROP COLUMN archived_at');
}
