import type { Knex } from 'knex';

/**
 * Sign-in state that several app instances must share (issue 13): server-side sessions (a sign-out
 * holds everywhere), attempt counters and back-off. Outbox rows remember the token their link
 * carries, so the link can be hidden once used or expired. Badge codes become case-insensitive:
 * stored upper-case and trimmed, like bin and SKU scans.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('sessions', (t) => {
    // Random, URL-safe; carried in the session token as `sid`.
    t.string('id', 64).primary();
    t.integer('user_id').notNullable().references('users.id').onDelete('CASCADE');
    // Sign-in time in seconds since epoch: the shift limit counts from here.
    t.bigInteger('auth_time').notNullable();
    t.string('device', 200);
    t.string('created_at').notNullable();
    t.string('revoked_at');
    t.index(['user_id']);
    t.index(['auth_time']);
  });
  await knex.schema.createTable('auth_throttle', (t) => {
    // e.g. `acct:b:P-1001`, `pair:e:someone@x.test|10.0.0.7`, `reset:someone@x.test`.
    t.string('key', 320).primary();
    t.integer('count').notNullable().defaultTo(0);
    // Milliseconds since epoch.
    t.bigInteger('started_at').notNullable();
    t.bigInteger('last_at').notNullable();
    t.bigInteger('until').notNullable().defaultTo(0);
    t.index(['last_at']);
  });
  await knex.schema.alterTable('mail_outbox', (t) => {
    // sha256 of the single-use token the mail's link carries, and when that token expires.
    t.string('link_token_hash');
    t.string('link_expires_at');
    // Set when the link was used or expired and has been removed from the stored text.
    t.string('link_closed_at');
    t.index(['link_token_hash']);
  });

  // Normalise stored badges. Two badges that differ only in case cannot both keep their code: the
  // older account keeps it, a newer one gets a visible marker so an admin can sort it out.
  const rows = await knex('users').whereNotNull('badge').orderBy('id').select<{ id: number; badge: string }[]>('id', 'badge');
  const taken = new Set<string>();
  const changes: { id: number; from: string; to: string; renamed: boolean }[] = [];
  for (const r of rows) {
    const norm = r.badge.trim().toUpperCase();
    const code = taken.has(norm) ? `${norm}-DUPLICATE-${r.id}` : norm;
    taken.add(code);
    if (code !== r.badge) changes.push({ id: r.id, from: r.badge, to: code, renamed: code !== norm });
  }
  // Two steps, so a row never takes a code another row still holds (badge is unique).
  for (const c of changes)
    await knex('users')
      .where({ id: c.id })
      .update({ badge: `~migrating-${c.id}` });
  const now = new Date().toISOString();
  for (const c of changes) {
    await knex('users').where({ id: c.id }).update({ badge: c.to });
    if (c.renamed) {
      await knex('audit_log').insert({
        user_id: null,
        action: 'badge.renamed',
        subject: String(c.id),
        detail: JSON.stringify({ from: c.from, to: c.to, reason: 'another badge differs only in case' }),
        at: now,
      });
    }
  }
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('mail_outbox', (t) => {
    t.dropIndex(['link_token_hash']);
    t.dropColumn('link_token_hash');
    t.dropColumn('link_expires_at');
    t.dropColumn('link_closed_at');
  });
  await knex.schema.dropTableIfExists('auth_throttle');
  await knex.schema.dropTableIfExists('sessions');
}
