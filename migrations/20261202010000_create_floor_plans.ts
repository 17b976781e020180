import type { Knex } from 'knex';

/**
 * Floor plans: one row per version of a site's layout, its geometry as rows (other domains join bins
 * by code), its closures, and the walk graph + distance index as typed-array BLOBs.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('floor_plans', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    // Null while the plan is still being saved ('building'); numbered when it becomes a draft.
    t.integer('version');
    t.string('name').notNullable();
    // building → draft → active → retired; 'building' rows are never listed.
    t.string('state').notNullable();
    t.string('source').notNullable();
    t.string('source_filename');
    t.text('generator_params');
    t.integer('uploaded_by').references('users.id').onDelete('SET NULL');
    t.string('created_at').notNullable();
    t.string('activated_at');
    t.string('retired_at');
    t.integer('bins').notNullable().defaultTo(0);
    t.integer('aisles').notNullable().defaultTo(0);
    t.integer('cross_aisles').notNullable().defaultTo(0);
    t.integer('access_points').notNullable().defaultTo(0);
    t.integer('depots').notNullable().defaultTo(0);
    t.float('total_aisle_length_m').notNullable().defaultTo(0);
    t.integer('node_count').notNullable().defaultTo(0);
    t.integer('hub_count').notNullable().defaultTo(0);
    t.integer('stored_bytes').notNullable().defaultTo(0);
    t.float('build_ms').notNullable().defaultTo(0);
    // Raised on every closure and reopening: cached plan indexes compare it to know they are stale.
    t.integer('closure_version').notNullable().defaultTo(0);
    t.text('warnings').notNullable().defaultTo('[]');
    t.unique(['site_id', 'version']);
    t.index(['site_id', 'state']);
  });
  // One active plan per site, enforced by the database as well as the service.
  await knex.raw(`CREATE UNIQUE INDEX floor_plans_one_active_per_site ON floor_plans (site_id) WHERE state = 'active'`);

  await knex.schema.createTable('floor_plan_aisles', (t) => {
    t.integer('plan_id').notNullable().references('floor_plans.id').onDelete('CASCADE');
    t.integer('idx').notNullable();
    t.string('code').notNullable();
    t.float('x_m').notNullable();
    t.float('y_start_m').notNullable();
    t.float('y_end_m').notNullable();
    t.primary(['plan_id', 'idx']);
  });
  await knex.schema.createTable('floor_plan_cross_aisles', (t) => {
    t.integer('plan_id').notNullable().references('floor_plans.id').onDelete('CASCADE');
    t.integer('idx').notNullable();
    t.string('code').notNullable();
    t.float('y_m').notNullable();
    t.float('x_start_m').notNullable();
    t.float('x_end_m').notNullable();
    t.primary(['plan_id', 'idx']);
  });
  await knex.schema.createTable('floor_plan_bins', (t) => {
    t.integer('plan_id').notNullable().references('floor_plans.id').onDelete('CASCADE');
    t.integer('idx').notNullable();
    t.string('code').notNullable();
    t.string('aisle').notNullable();
    t.float('y_m').notNullable();
    t.integer('bay');
    t.string('side').notNullable();
    t.integer('level').notNullable();
    t.string('zone');
    t.primary(['plan_id', 'idx']);
    t.unique(['plan_id', 'code']);
  });
  await knex.schema.createTable('floor_plan_depots', (t) => {
    t.integer('plan_id').notNullable().references('floor_plans.id').onDelete('CASCADE');
    t.integer('idx').notNullable();
    t.string('code').notNullable();
    t.float('x_m').notNullable();
    t.float('y_m').notNullable();
    t.primary(['plan_id', 'idx']);
  });
  await knex.schema.createTable('floor_plan_closures', (t) => {
    t.increments('id');
    t.integer('plan_id').notNullable().references('floor_plans.id').onDelete('CASCADE');
    t.string('kind').notNullable();
    t.string('code').notNullable();
    t.float('from_m').notNullable();
    t.float('to_m').notNullable();
    t.string('reason');
    t.integer('created_by').references('users.id').onDelete('SET NULL');
    t.string('created_at').notNullable();
    t.integer('reopened_by').references('users.id').onDelete('SET NULL');
    t.string('reopened_at');
    t.index(['plan_id', 'reopened_at']);
  });
  // Headers of the serialised walk graph and distance index (server/core/plan/serialize.ts) …
  await knex.schema.createTable('floor_plan_graphs', (t) => {
    t.integer('plan_id').primary().references('floor_plans.id').onDelete('CASCADE');
    t.integer('closure_version').notNullable();
    t.text('graph_header').notNullable();
    t.text('index_header').notNullable();
  });
  // … and one BLOB per typed array.
  await knex.schema.createTable('floor_plan_arrays', (t) => {
    t.integer('plan_id').notNullable().references('floor_plans.id').onDelete('CASCADE');
    t.string('set_name').notNullable();
    t.string('array_name').notNullable();
    t.binary('data').notNullable();
    t.primary(['plan_id', 'set_name', 'array_name']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const t of [
    'floor_plan_arrays',
    'floor_plan_graphs',
    'floor_plan_closures',
    'floor_plan_depots',
    'floor_plan_bins',
    'floor_plan_cross_aisles',
    'floor_plan_aisles',
    'floor_plans',
  ]) {
    await knex.schema.dropTableIfExists(t);
  }
}
