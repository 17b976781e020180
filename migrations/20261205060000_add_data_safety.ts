import type { Knex } from 'knex';

/**
 * Data safety: mail retries (attempts, when the next try is due, when a body was pruned), an expiry
 * on integration tokens, the retention settings, and an index for pruning the audit log by age.
 */
export const config = { transaction: false };

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('mail_outbox', (t) => {
    t.integer('attempts').notNullable().defaultTo(0);
    t.string('next_attempt_at');
    t.string('last_attempt_at');
    t.string('pruned_at');
    t.index(['status', 'next_attempt_at']);
  });
  await knex.schema.alterTable('integration_tokens', (t) => {
    t.string('expires_at');
  });
  await knex.schema.createTable('retention_settings', (t) => {
    t.string('key').primary();
    t.integer('days').notNullable();
    t.string('updated_at').notNullable();
    t.integer('updated_by').references('users.id').onDelete('SET NULL');
  });
  await knex.schema.alterTable('audit_log', (t) => {
    t.index(['at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('audit_log', (t) => t.dropIndex(['at']));
  await knex.schema.dropTableIfExists('retention_settings');
  await knex.schema.alterTable('integration_tokens', (t) => t.dropColumn('expires_at'));
  await knex.schema.alterTable('mail_outbox', (t) => {
    t.dropIndex(['status', 'next_attempt_at']);
    for (const c of ['attempts', 'next_attempt_at', 'last_attempt_at', 'pruned_at']) t.dropColumn(c);
  });
}
