import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TestApp } from '../helpers/app';
import { makeDemoApp, releaseDemoWave } from '../helpers/waves';
import type { WaveDetail } from '../../shared/waves';

let t: TestApp;
let wave: WaveDetail;
beforeAll(async () => {
  t = await makeDemoApp();
  wave = await releaseDemoWave(t, { orders: 10 });
});
afterAll(() => t.close());

describe('GET /api/sites/:siteId/waves/:id/actuals', () => {
  it('gives one row per trip with its planned figures, and no actual time or shorts before picking', async () => {
    const res = await t.as.engineer.get(`/api/sites/${t.siteId}/waves/${wave.id}/actuals`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.rows).toHaveLength(wave.tripList.length);
    for (const trip of wave.tripList) {
      const row = res.body.rows.find((r: { trip: number }) => r.trip === trip.n);
      expect(row.plannedMetres).toBeCloseTo(trip.plannedMetres, 1);
      expect(row).toMatchObject({ lines: trip.lines, picked: 0, shorts: 0, minutes: null, walkedMetres: null });
    }
  });

  it("answers the wave report's shorts once a line is short", async () => {
    const line = await t.deps
      .db('pick_lines')
      .join('trips', 'trips.id', 'pick_lines.trip_id')
      .where('trips.wave_id', wave.id)
      .first<{ id: number; trip_id: number }>('pick_lines.id', 'pick_lines.trip_id');
    await t.deps.db('pick_lines').where({ id: line!.id }).update({ status: 'short', picked_qty: 0, short_reason: 'empty' });
    const n = (await t.deps.db('trips').where({ id: line!.trip_id }).first<{ n: number }>('n'))!.n;
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/waves/${wave.id}/actuals`);
    expect(res.body.rows.find((r: { trip: number }) => r.trip === n).shorts).toBe(1);
  });

  it('is 404 for an unknown wave', async () => {
    expect((await t.as.supervisor.get(`/api/sites/${t.siteId}/waves/999999/actuals`)).status).toBe(404);
  });
});
