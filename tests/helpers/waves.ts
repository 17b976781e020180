/** A test app with the demo plan, SKUs and open orders, and a way to release a wave through the API. */
import { expect } from 'vitest';
import { seedDemoFloorPlan } from '../../server/floor-plans/demo-seed';
import { seedDemoOrders } from '../../server/orders/demo-seed';
import type { WaveDetail, WaveJob } from '../../shared/waves';
import { csrf, makeTestApp, type TestApp } from './app';

export const makeDemoApp = (): Promise<TestApp> => makeTestApp({ seeders: [seedDemoFloorPlan, seedDemoOrders] });

export async function openOrderIds(t: TestApp, limit: number): Promise<number[]> {
  return t.deps.db('orders').where({ site_id: t.siteId, status: 'open' }).orderBy('id').limit(limit).pluck('id');
}

/** Polls a preview job until it ends. */
export async function awaitPreview(t: TestApp, jobId: string): Promise<WaveJob> {
  for (let i = 0; i < 600; i++) {
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/wave-previews/${jobId}`);
    expect(res.status).toBe(200);
    if (res.body.state !== 'running') return res.body as WaveJob;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('preview did not finish in 60 s');
}

export async function previewWave(t: TestApp, options: { orders?: number; batching?: string; method?: string; improve?: string } = {}): Promise<WaveJob> {
  const orderIds = await openOrderIds(t, options.orders ?? 12);
  const cartProfileId = (await t.deps.db('cart_profiles').where({ site_id: t.siteId }).orderBy('id').first<{ id: number }>('id'))!.id;
  const res = await t.as.supervisor
    .post(`/api/sites/${t.siteId}/wave-previews`)
    .set(csrf)
    .send({
      orderIds,
      cartProfileId,
      batching: options.batching ?? 'savings',
      method: options.method ?? 'best',
      improve: options.improve ?? 'local',
    });
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  return awaitPreview(t, res.body.id);
}

/** Plans and releases a wave of the first `orders` open orders; returns the released wave. */
export async function releaseDemoWave(t: TestApp, options: { orders?: number; batching?: string } = {}): Promise<WaveDetail> {
  const job = await previewWave(t, options);
  expect(job.state, JSON.stringify(job.error)).toBe('done');
  const res = await t.as.supervisor
    .post(`/api/sites/${t.siteId}/waves`)
    .set(csrf)
    .send({ previewId: job.id, releaseKey: `key-${job.id}` });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as WaveDetail;
}

/**
 * Releases a wave through the real path (preview → release) and assigns its trip with the most stops
 * to `pickerId` through the board, as a supervisor does; returns that trip's id.
 */
export async function releaseTripFor(t: TestApp, pickerId: number, options: { orders?: number; minStops?: number } = {}): Promise<number> {
  const wave = await releaseDemoWave(t, { orders: options.orders ?? 6 });
  expect(wave.tripList.length).toBeGreaterThan(0);
  const trip = [...wave.tripList].sort((a, b) => b.stops - a.stops)[0]!;
  expect(trip.stops).toBeGreaterThanOrEqual(options.minStops ?? 1);
  const res = await t.as.supervisor.post(`/api/sites/${t.siteId}/board/trips/${trip.id}/assign`).set(csrf).send({ pickerId });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return trip.id;
}
