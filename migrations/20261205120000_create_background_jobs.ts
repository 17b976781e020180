import type { Knex } from 'knex';

/**
 * Heavy jobs (wave previews, studies, slotting runs, plan builds): state, progress and outcome, so any
 * instance on one PostgreSQL can answer a poll, cancel a job or take over one whose instance died
 * (server/workers/pg-jobs.ts; the queue itself is pg-boss's, in its own schema). One SQLite process
 * keeps these in memory and does not use the table.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('background_jobs', (t) => {
    t.string('id', 36).primary();
    t.string('kind', 40).notNullable();
    t.integer('site_id').nullable();
    /** What the job is for, e.g. `study:12`: the latest job of a key tells a row's live state. */
    t.string('key', 80).nullable().index();
    t.string('state', 12).notNullable();
    t.float('progress').notNullable().defaultTo(0);
    t.string('phase', 40).nullable();
    t.text('result').nullable();
    t.text('error').nullable();
    t.string('instance', 120).nullable();
    t.integer('attempt').notNullable().defaultTo(0);
    t.string('heartbeat_at').nullable();
    t.string('created_at').notNullable();
    t.string('started_at').nullable();
    t.string('finished_at').nullable();
    t.index(['state', 'heartbeat_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('background_jobs');
}
