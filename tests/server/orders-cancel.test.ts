import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csrf, type TestApp } from '../helpers/app';
import { makeDemoApp, releaseDemoWave } from '../helpers/waves';

let t: TestApp;
beforeAll(async () => {
  t = await makeDemoApp();
});
afterAll(() => t.close());

const cancel = (id: number, body: object = {}) => t.as.supervisor.post(`/api/sites/${t.siteId}/orders/${id}/cancel`).set(csrf).send(body);
const orderRow = (id: number) => t.deps.db('orders').where({ id }).first<{ status: string; ref: string; wave_id: number | null }>();

describe('cancelling an order', () => {
  it('cancels an open order, takes it out of the open pool and audits who and why', async () => {
    const open = await t.deps.db('orders').where({ site_id: t.siteId, status: 'open' }).orderBy('id', 'desc').first<{ id: number; ref: string }>();
    const res = await cancel(open!.id, { reason: 'Customer withdrew it' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ id: open!.id, status: 'cancelled', trips: [] });
    expect((await orderRow(open!.id))!.status).toBe('cancelled');
    const openList = await t.as.supervisor.get(`/api/sites/${t.siteId}/orders?status=open&search=${open!.ref}`);
    expect(openList.body.rows).toHaveLength(0);
    const entries = await t.deps.db('audit_log').where({ action: 'order.cancelled', subject: open!.ref });
    expect(entries).toHaveLength(1);
    expect(JSON.parse(entries[0].detail)).toMatchObject({ orderId: open!.id, reason: 'Customer withdrew it' });
  });

  it('refuses an order already in a released wave with 409 and a reason that says what to do, changing nothing', async () => {
    const wave = await releaseDemoWave(t, { orders: 4 });
    const inWave = await t.deps.db('orders').where({ wave_id: wave.id }).first<{ id: number; ref: string }>();
    const before = await t.deps.db('audit_log').where({ action: 'order.cancelled' }).count({ n: '*' }).first();
    const res = await cancel(inWave!.id);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('order_not_open');
    expect(res.body.error.message).toContain(inWave!.ref);
    expect(res.body.error.message).toMatch(/released wave/);
    expect((await orderRow(inWave!.id))!.status).toBe('planned');
    expect(await t.deps.db('audit_log').where({ action: 'order.cancelled' }).count({ n: '*' }).first()).toEqual(before);

    // The order screen shows which wave and trip carry it.
    const detail = await t.as.supervisor.get(`/api/sites/${t.siteId}/orders/${inWave!.id}`);
    expect(detail.status).toBe(200);
    expect(detail.body.trips).toHaveLength(1);
    expect(detail.body.trips[0]).toMatchObject({ waveId: wave.id, waveName: wave.name });
    expect(wave.tripList.find((x) => x.id === detail.body.trips[0].tripId)?.orders).toContain(inWave!.ref);
  });

  it('refuses a second cancel, an unknown order and a picker', async () => {
    const cancelled = await t.deps.db('orders').where({ site_id: t.siteId, status: 'cancelled' }).first<{ id: number }>();
    const again = await cancel(cancelled!.id);
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/already cancelled/);
    expect((await cancel(999_999)).status).toBe(404);
    const open = await t.deps.db('orders').where({ site_id: t.siteId, status: 'open' }).first<{ id: number }>();
    expect((await t.as.picker.post(`/api/sites/${t.siteId}/orders/${open!.id}/cancel`).set(csrf).send({})).status).toBe(403);
    expect((await orderRow(open!.id))!.status).toBe('open');
  });

  it('rejects an unknown body field with 400 naming it', async () => {
    const open = await t.deps.db('orders').where({ site_id: t.siteId, status: 'open' }).first<{ id: number }>();
    const res = await cancel(open!.id, { why: 'x' });
    expect(res.status).toBe(400);
    expect(JSON.stringify(res.body.error)).toContain('why');
  });
});
