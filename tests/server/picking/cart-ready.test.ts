/**
 * Issue 16, picker: cart set-up before the first stop. Every tote of the trip confirmed (scan or tap)
 * is stored once on the trip with an audit entry; a second call changes nothing (a reload does not
 * ask again); a wrong set of totes, a trip not started and another picker's trip are refused.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PickTrip } from '../../../shared/picking';
import { csrf } from '../../helpers/app';
import { makePickingApp, readTrip, type PickingFixture } from './setup';

let t: PickingFixture;
beforeAll(async () => {
  t = await makePickingApp();
});
afterAll(() => t.close());

async function assignedTrip() {
  await t.deps.db('trips').whereIn('status', ['released', 'assigned', 'picking']).update({ status: 'cancelled', cancelled_at: new Date().toISOString() });
  const w = await t.wave([{ stops: 4, pickerId: t.ids.picker }]);
  return w.tripIds[0]!;
}
const totesOf = async (tripId: number) =>
  (await t.deps.db('pick_lines').where({ trip_id: tripId }).distinct('tote').orderBy('tote')).map((r: { tote: number }) => r.tote);
const cartReady = (tripId: number, totes: { tote: number; via: 'scan' | 'tap' }[]) =>
  t.as.picker.post(`/api/picking/trips/${tripId}/cart-ready`).set(csrf).send({ totes });

describe('cart set-up', () => {
  it('stores the set-up once with its audit entry; the trip then says so and a second call changes nothing', async () => {
    const id = await assignedTrip();
    expect((await t.as.picker.post(`/api/picking/trips/${id}/start`).set(csrf).send({})).status).toBe(200);
    const before = await readTrip(t.as.picker, id);
    expect(before.cartReadyAt).toBeNull();
    const totes = await totesOf(id);
    expect(totes.length).toBeGreaterThan(0);
    const body = totes.map((tote, i) => ({ tote, via: i === 0 ? ('scan' as const) : ('tap' as const) }));
    const res = await cartReady(id, body);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const trip = PickTrip.parse(res.body);
    expect(trip.cartReadyAt).not.toBeNull();
    expect(trip.revision).toBeGreaterThan(before.revision);
    const again = await cartReady(id, body);
    expect(again.status).toBe(200);
    expect(again.body.cartReadyAt).toBe(trip.cartReadyAt);
    expect((await readTrip(t.as.picker, id)).cartReadyAt).toBe(trip.cartReadyAt);
    const audits = await t.deps.db('audit_log').where({ action: 'trip.cart_ready', subject: `trip:${id}` });
    expect(audits).toHaveLength(1);
    expect(JSON.parse(audits[0].detail)).toEqual({ totes: body });
  });

  it('refuses a set-up that leaves out a tote, names one not on the trip or repeats one, storing nothing', async () => {
    const id = await assignedTrip();
    await t.as.picker.post(`/api/picking/trips/${id}/start`).set(csrf).send({});
    const totes = await totesOf(id);
    const all = totes.map((tote) => ({ tote, via: 'tap' as const }));
    for (const bad of [all.slice(1), [...all, { tote: 99, via: 'tap' as const }], [...all, all[0]!]]) {
      if (bad.length === 0) continue;
      const res = await cartReady(id, bad);
      expect(res.status, JSON.stringify(bad)).toBe(400);
      expect(res.body.error.code).toBe('totes_mismatch');
      expect(res.body.error.details.expected).toEqual(totes);
    }
    expect((await readTrip(t.as.picker, id)).cartReadyAt).toBeNull();
    expect(await t.deps.db('audit_log').where({ action: 'trip.cart_ready', subject: `trip:${id}` })).toHaveLength(0);
  });

  it('refuses before the trip is started (the safety caution comes first) and for another picker', async () => {
    const id = await assignedTrip();
    const totes = (await totesOf(id)).map((tote) => ({ tote, via: 'tap' as const }));
    const early = await cartReady(id, totes);
    expect(early.status).toBe(409);
    expect(early.body.error.code).toBe('trip_not_started');
    const other = await t.as.supervisor.post(`/api/picking/trips/${id}/cart-ready`).set(csrf).send({ totes });
    expect([403, 404]).toContain(other.status);
  });
});
