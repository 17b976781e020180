/**
 * Generates a large site into a database file, for the backup benchmark: a generated floor plan of
 * 50,000 bins (50 aisles × 50 bays × 2 sides × 10 levels, with its distance table) and one released
 * wave of 1,000 trips, 50,000 stops and 100,000 pick lines (10,000 orders of 10 lines), half of them
 * confirmed. `npx tsx tests/bench/site-50k.ts FILE` writes it; the bench calls `generateLargeSite`.
 */
import { rmSync } from 'node:fs';
import Database from 'better-sqlite3';
import { migrateLatest, openDb } from '../../server/db/knex';
import { createHasher } from '../../server/auth/hasher';
import { seedDemoIfEmpty } from '../../server/seed/demo';
import { seedPlan } from '../helpers/picking';

export const LARGE_SITE = { aisles: 50, baysPerAisle: 50, levels: 10, trips: 1000, stopsPerTrip: 50, linesPerStop: 2 } as const;

export async function generateLargeSite(file: string): Promise<{ bins: number; pickLines: number }> {
  for (const side of ['', '-wal', '-shm']) rmSync(`${file}${side}`, { force: true });
  const db = openDb(file);
  await migrateLatest(db);
  await seedDemoIfEmpty(db, createHasher({ memoryCost: 1024, timeCost: 1 }), []);
  const siteId = (await db('sites').first<{ id: number }>('id'))!.id;
  const supervisor = (await db('users').where({ role: 'supervisor' }).first<{ id: number }>('id'))!.id;
  const planId = await seedPlan(db, siteId, supervisor, {
    aisles: LARGE_SITE.aisles,
    aisleLengthM: 75,
    aisleSpacingM: 3.2,
    baysPerAisle: LARGE_SITE.baysPerAisle,
    levels: LARGE_SITE.levels,
    bothSides: true,
    crossAisles: { front: true, back: true, middle: 1 },
    crossAisleWidthM: 3,
    depot: 'front_centre',
  });
  await db.destroy();

  const raw = new Database(file);
  raw.pragma('journal_mode = WAL');
  raw.pragma('foreign_keys = ON');
  const bins = raw.prepare('SELECT code FROM floor_plan_bins WHERE plan_id = ? ORDER BY idx').pluck().all(planId) as string[];
  const pickers = raw.prepare("SELECT id FROM users WHERE role = 'picker' ORDER BY id").pluck().all() as number[];
  const now = new Date().toISOString();
  const insert = raw.transaction(() => {
    const wave = raw
      .prepare(
        `INSERT INTO waves (site_id, plan_id, name, status, cart_name, cart_totes, cart_max_kg, cart_max_litres, batching, routing_method, routing_improve, depot_idx, orders_count, lines_count, planned_metres, lower_bound_metres, single_metres, est_seconds, release_key, created_by, created_at)
      VALUES (?, ?, 'Bench wave', 'released', 'Standard cart', 8, 150, 400, 'fcfs', 'best', 'local', 0, ?, ?, 0, 0, 0, 0, 'bench', ?, ?)`,
      )
      .run(siteId, planId, LARGE_SITE.trips * 10, LARGE_SITE.trips * LARGE_SITE.stopsPerTrip * LARGE_SITE.linesPerStop, supervisor, now).lastInsertRowid;
    const order = raw.prepare(
      "INSERT INTO orders (site_id, ref, status, source, lines, units, weight_kg, volume_l, wave_id, created_at) VALUES (?, ?, 'planned', 'bench', 10, 20, 5, 10, ?, ?)",
    );
    const line = raw.prepare('INSERT INTO order_lines (order_id, line_no, sku, qty) VALUES (?, ?, ?, ?)');
    const trip = raw.prepare(
      "INSERT INTO trips (wave_id, site_id, n, status, picker_id, planned_metres, lower_bound_metres, est_seconds, totes, kg, litres, depot_node) VALUES (?, ?, ?, 'picking', ?, 800, 760, 1800, 8, 40, 80, 0)",
    );
    const tripOrder = raw.prepare('INSERT INTO trip_orders (trip_id, order_id, totes) VALUES (?, ?, ?)');
    const stop = raw.prepare('INSERT INTO stops (trip_id, n, node, x_m, y_m, bins, status) VALUES (?, ?, ?, ?, ?, ?, ?)');
    const pick = raw.prepare(
      'INSERT INTO pick_lines (trip_id, stop_id, order_id, order_line_id, order_ref, sku, description, bin, qty, tote, status, picked_qty, confirmed_by, confirmed_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)',
    );
    let b = 0;
    for (let t = 0; t < LARGE_SITE.trips; t++) {
      const picker = pickers[t % pickers.length]!;
      const tripId = trip.run(wave, siteId, t + 1, picker).lastInsertRowid;
      // 10 orders per trip, each with 10 lines: 100 lines on 50 stops (2 lines per stop).
      const orders: { id: number | bigint; ref: string; lines: (number | bigint)[] }[] = [];
      for (let o = 0; o < 10; o++) {
        const ref = `B-${t + 1}-${o + 1}`;
        const id = order.run(siteId, ref, wave, now).lastInsertRowid;
        tripOrder.run(tripId, id, JSON.stringify([o + 1]));
        orders.push({ id, ref, lines: [] });
      }
      for (let s = 0; s < LARGE_SITE.stopsPerTrip; s++) {
        const code = bins[b++ % bins.length]!;
        const done = s < LARGE_SITE.stopsPerTrip / 2;
        const stopId = stop.run(tripId, s + 1, s, 1.5, 2 + s, JSON.stringify([code]), done ? 'done' : 'open').lastInsertRowid;
        for (let k = 0; k < LARGE_SITE.linesPerStop; k++) {
          const o = orders[(s * 2 + k) % 10]!;
          const lineNo = o.lines.length + 1;
          const sku = `SKU-${String((b * 7 + k) % 6000).padStart(5, '0')}`;
          const olId = line.run(o.id, lineNo, sku, 2).lastInsertRowid;
          o.lines.push(olId);
          pick.run(
            tripId,
            stopId,
            o.id,
            olId,
            o.ref,
            sku,
            'Bench item',
            code,
            2,
            ((s * 2 + k) % 10) + 1,
            done ? 'picked' : 'open',
            done ? 2 : null,
            done ? picker : null,
            done ? now : null,
          );
        }
      }
    }
  });
  insert();
  const pickLines = raw.prepare('SELECT count(*) FROM pick_lines').pluck().get() as number;
  raw.pragma('wal_checkpoint(TRUNCATE)');
  raw.close();
  return { bins: bins.length, pickLines };
}

if (process.argv[1]?.endsWith('site-50k.ts') && process.argv[2]) {
  const r = await generateLargeSite(process.argv[2]);
  console.log(JSON.stringify(r));
}
