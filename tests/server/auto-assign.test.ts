import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csrf, type TestApp } from '../helpers/app';
import { makeDemoApp, releaseDemoWave } from '../helpers/waves';
import type { WaveDetail } from '../../shared/waves';

let t: TestApp;
let wave: WaveDetail;
const userOf = async (badge: string) => (await t.deps.db('users').where({ badge }).first<{ id: number; name: string }>('id', 'name'))!;

beforeAll(async () => {
  t = await makeDemoApp();
  // One order per trip, so the wave has more waiting trips than there are pickers.
  wave = await releaseDemoWave(t, { orders: 4, batching: 'single' });
});
afterAll(() => t.close());

describe('who is signed in, and assigning waiting trips to free pickers', () => {
  it('lists the pickers with a live session (P-1001, P-1002), not one whose sessions are revoked', async () => {
    const p1 = await userOf('P-1001');
    const p2 = await userOf('P-1002');
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/pickers/signed-in`);
    expect(res.status).toBe(200);
    const ids = res.body.map((p: { id: number }) => p.id);
    expect(ids).toEqual(expect.arrayContaining([p1.id, p2.id]));
    expect(res.body.every((p: { tripId: number | null }) => p.tripId === null)).toBe(true);

    const p3 = await userOf('P-1003');
    expect(ids).not.toContain(p3.id); // never signed in in this test app
  });

  it('gives each free signed-in picker the next waiting trip in trip order, and audits each', async () => {
    expect(wave.tripList.length).toBeGreaterThanOrEqual(3);
    const res = await t.as.supervisor.post(`/api/sites/${t.siteId}/waves/${wave.id}/auto-assign`).set(csrf).send({});
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.assigned).toHaveLength(2);
    expect(res.body.assigned.map((a: { n: number }) => a.n)).toEqual([1, 2]);
    expect(new Set(res.body.assigned.map((a: { pickerId: number }) => a.pickerId)).size).toBe(2);
    expect(res.body.waiting).toBe(wave.tripList.length - 2);
    expect(res.body.note).toMatch(/still waiting/);
    const trips = await t.deps.db('trips').where({ wave_id: wave.id }).orderBy('n');
    expect(trips.slice(0, 2).map((x) => x.status)).toEqual(['assigned', 'assigned']);
    expect(trips.slice(2).every((x) => x.picker_id === null)).toBe(true);
    expect(await t.deps.db('audit_log').where({ action: 'trip.assign' })).toHaveLength(2);

    // Now both hold a trip: the list says which, and a second call assigns nobody.
    const list = await t.as.supervisor.get(`/api/sites/${t.siteId}/pickers/signed-in`);
    expect(
      list.body
        .filter((p: { tripN: number | null }) => p.tripN !== null)
        .map((p: { tripN: number }) => p.tripN)
        .sort(),
    ).toEqual([1, 2]);
    const again = await t.as.supervisor.post(`/api/sites/${t.siteId}/waves/${wave.id}/auto-assign`).set(csrf).send({});
    expect(again.body.assigned).toHaveLength(0);
    expect(again.body.note).toMatch(/No signed-in picker is free/);
  });

  it('leaves out a picker whose sessions were ended', async () => {
    const p2 = await userOf('P-1002');
    await t.deps.db('sessions').where({ user_id: p2.id }).update({ revoked_at: new Date().toISOString() });
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/pickers/signed-in`);
    expect(res.body.map((p: { id: number }) => p.id)).not.toContain(p2.id);
  });

  it('is 404 for an unknown wave and 403 for a picker', async () => {
    expect((await t.as.supervisor.post(`/api/sites/${t.siteId}/waves/999999/auto-assign`).set(csrf).send({})).status).toBe(404);
    expect((await t.as.picker.post(`/api/sites/${t.siteId}/waves/${wave.id}/auto-assign`).set(csrf).send({})).status).toBe(403);
  });
});
