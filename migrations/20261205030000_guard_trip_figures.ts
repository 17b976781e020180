import type { Knex } from 'knex';

/**
 * Shift safety on trips being picked:
 * - `stops.walk_seq`: the walking order of a trip's stops. The printed stop number `n` is fixed at
 *   release; "Skip for now" and re-routing after a closure change only the walking order.
 * - `trips.route_changed_at`: set when a closure change re-routed the trip's remaining stops.
 * - `pick_lines.received_at`: when the server got the confirmation or short (`confirmed_at` is the
 *   tablet's time, bounded); `pick_lines.tablet_at` the tablet's time as sent.
 * - Metres, minutes and weights on waves and trips are finite numbers: SQLite stores Infinity as a
 *   REAL and a NaN as NULL, PostgreSQL stores both in float8. PostgreSQL gets CHECK constraints;
 *   SQLite gets BEFORE INSERT/UPDATE triggers that abort (adding a CHECK to an existing SQLite table
 *   means rebuilding it, and rebuilding `trips` would cascade-delete stops and lines through their
 *   foreign keys unless every referencing table were rebuilt too).
 */
export const config = { transaction: false };

const FIGURES: Record<string, string[]> = {
  waves: ['planned_metres', 'lower_bound_metres', 'single_metres', 's_shape_metres', 'est_seconds', 'cart_max_kg', 'cart_max_litres'],
  trips: ['planned_metres', 'lower_bound_metres', 's_shape_metres', 'est_seconds', 'kg', 'litres', 'walked_metres'],
  stops: ['x_m', 'y_m'],
};

const isPg = (knex: Knex) => /pg|postgres/i.test(String(knex.client.config.client ?? ''));

export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('stops', (t) => {
    t.integer('walk_seq');
  });
  await knex('stops').update({ walk_seq: knex.ref('n') });
  await knex.schema.alterTable('pick_lines', (t) => {
    t.string('received_at');
    // The tablet's time exactly as sent (unbounded): the double-tap guard compares two taps by it.
    t.string('tablet_at');
  });
  await knex.schema.alterTable('trips', (t) => {
    t.string('route_changed_at');
  });
  for (const [table, columns] of Object.entries(FIGURES)) {
    if (isPg(knex)) {
      for (const c of columns) {
        await knex.raw(
          `ALTER TABLE ?? ADD CONSTRAINT ?? CHECK (?? IS NULL OR (?? <> 'Infinity'::float8 AND ?? <> '-Infinity'::float8 AND ?? <> 'NaN'::float8))`,
          [table, `${table}_${c}_finite`, c, c, c, c],
        );
      }
    } else {
      // 9e999 is how SQLite writes ±Infinity; a NaN arrives as NULL and meets NOT NULL where it matters.
      const bad = columns.map((c) => `NEW.${c} IN (9e999, -9e999)`).join(' OR ');
      for (const op of ['INSERT', 'UPDATE']) {
        await knex.raw(
          `CREATE TRIGGER ${table}_finite_${op.toLowerCase()} BEFORE ${op} ON ${table} WHEN ${bad} BEGIN SELECT RAISE(ABORT, 'non_finite_figure: ${table} metres, minutes and weights must be finite numbers'); END`,
        );
      }
    }
  }
}

export async function down(knex: Knex): Promise<void> {
  for (const [table, columns] of Object.entries(FIGURES)) {
    if (isPg(knex)) {
      for (const c of columns) await knex.raw('ALTER TABLE ?? DROP CONSTRAINT IF EXISTS ??', [table, `${table}_${c}_finite`]);
    } else {
      for (const op of ['insert', 'update']) await knex.raw(`DROP TRIGGER IF EXISTS ${table}_finite_${op}`);
    }
  }
  await knex.schema.alterTable('trips', (t) => t.dropColumn('route_changed_at'));
  await knex.schema.alterTable('pick_lines', (t) => {
    t.dropColumn('received_at');
    t.dropColumn('tablet_at');
  });
  await knex.schema.alterTable('stops', (t) => t.dropColumn('walk_seq'));
}
