import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('integration_tokens', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.string('name').notNullable();
    t.string('token_hash').notNullable().unique();
    // First characters, shown in the admin list so a token can be recognised without storing it.
    t.string('prefix').notNullable();
    t.integer('created_by').references('users.id').onDelete('SET NULL');
    t.string('created_at').notNullable();
    t.string('revoked_at');
    t.string('last_used_at');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('integration_tokens');
}
