import type { Knex } from 'knex';

/**
 * Studies: an engineer's saved comparison of methods. Inputs (with the seed) are stored as given so
 * a study reruns exactly; results are stored whole so it reopens without recomputing.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('studies', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.string('name').notNullable();
    // recorded | generated
    t.string('kind').notNullable();
    t.integer('seed').notNullable();
    // JSON of StudyInputs (shared/studies.ts)
    t.text('inputs').notNullable();
    // queued → running → done | failed | cancelled
    t.string('status').notNullable();
    // JSON of StudyResults once done
    t.text('results');
    t.text('error');
    t.integer('rerun_of').references('studies.id').onDelete('SET NULL');
    t.integer('created_by').references('users.id').onDelete('SET NULL');
    t.string('created_at').notNullable();
    t.string('finished_at');
    t.index(['site_id', 'created_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('studies');
}
