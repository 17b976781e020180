import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('sites', (t) => {
    t.increments('id');
    t.string('code').notNullable().unique();
    t.string('name').notNullable();
    t.string('timezone').notNullable().defaultTo('UTC');
    t.float('walking_speed_mps').notNullable().defaultTo(1.0);
    t.float('seconds_per_line').notNullable().defaultTo(10);
    t.float('seconds_per_stop').notNullable().defaultTo(5);
    t.string('confirm_scan').notNullable().defaultTo('bin');
    t.string('created_at').notNullable();
  });
  await knex.schema.createTable('cart_profiles', (t) => {
    t.increments('id');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.string('name').notNullable();
    t.integer('totes').notNullable();
    t.float('max_kg').notNullable();
    t.float('max_litres').notNullable();
    t.boolean('archived').notNullable().defaultTo(false);
    t.unique(['site_id', 'name']);
  });
  await knex.schema.createTable('users', (t) => {
    t.increments('id');
    t.string('name').notNullable();
    t.string('email').unique();
    t.string('badge').unique();
    t.string('role').notNullable();
    t.string('password_hash');
    t.string('pin_hash');
    t.boolean('active').notNullable().defaultTo(true);
    // Raised on deactivation, role change or password change: older session tokens stop working.
    t.integer('token_version').notNullable().defaultTo(0);
    t.string('created_at').notNullable();
  });
  await knex.schema.createTable('user_sites', (t) => {
    t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE');
    t.integer('site_id').notNullable().references('sites.id').onDelete('CASCADE');
    t.primary(['user_id', 'site_id']);
  });
  await knex.schema.createTable('invites', (t) => {
    t.increments('id');
    t.string('email').notNullable();
    t.string('role').notNullable();
    t.text('site_ids').notNullable();
    t.string('token_hash').notNullable().unique();
    t.string('expires_at').notNullable();
    t.string('accepted_at');
    t.integer('invited_by').references('users.id').onDelete('SET NULL');
    t.string('created_at').notNullable();
  });
  await knex.schema.createTable('password_resets', (t) => {
    t.increments('id');
    t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE');
    t.string('token_hash').notNullable().unique();
    t.string('expires_at').notNullable();
    t.string('used_at');
    t.string('created_at').notNullable();
  });
  await knex.schema.createTable('mail_outbox', (t) => {
    t.increments('id');
    t.integer('site_id').references('sites.id').onDelete('SET NULL');
    t.string('to').notNullable();
    t.string('subject').notNullable();
    t.text('text').notNullable();
    t.text('html');
    // JSON: [{ filename, contentType, base64 }]
    t.text('attachments').notNullable().defaultTo('[]');
    t.string('status').notNullable();
    t.text('error');
    t.string('created_at').notNullable();
  });
  await knex.schema.createTable('audit_log', (t) => {
    t.increments('id');
    t.integer('site_id').references('sites.id').onDelete('SET NULL');
    t.integer('user_id').references('users.id').onDelete('SET NULL');
    t.string('action').notNullable();
    t.string('subject');
    t.text('detail');
    t.string('device');
    t.string('at').notNullable();
    t.index(['site_id', 'at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  for (const t of ['audit_log', 'mail_outbox', 'password_resets', 'invites', 'user_sites', 'users', 'cart_profiles', 'sites']) {
    await knex.schema.dropTableIfExists(t);
  }
}
