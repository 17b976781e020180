/**
 * Issue 10, items 4 and 6: a confirmation only for the line the tablet showed (stop number sent with
 * it; a second tap within the guard refused), undo on the tablet and the supervisor's correction, each
 * audited; the tablet's time recorded as the pick time (bounded), the arrival time apart; a former
 * picker's writes refused unless made before the reassignment.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LineAnswer, UNDO_WINDOW_MS } from '../../../shared/picking';
import { CLOCK_SKEW_MS, TAP_GUARD_MS } from '../../../server/picking/picking.service';
import { csrf } from '../../helpers/app';
import { releaseTripFor } from '../../helpers/waves';
import { confirm, makeDemoPickingApp, post, readTrip, freePickers } from './setup';

let t: Awaited<ReturnType<typeof makeDemoPickingApp>>;
beforeAll(async () => {
  t = await makeDemoPickingApp();
});
afterAll(() => t.close());

async function startedTrip(stops = 4) {
  await freePickers(t);
  const tripId = await releaseTripFor(t, t.ids.picker, { minStops: stops });
  expect((await t.as.picker.post(`/api/picking/trips/${tripId}/start`).set(csrf).send({})).status).toBe(200);
  return readTrip(t.as.picker, tripId);
}

describe('a tap confirms only the line on screen', () => {
  it("refuses a confirmation whose shown stop number is not the line's (409 line_not_shown), recording nothing", async () => {
    const trip = await startedTrip();
    const [a, b] = trip.stopList;
    const res = await confirm(t.as.picker, trip.id, b!.lines[0]!.id, { via: 'tap', stopN: a!.n });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('line_not_shown');
    expect((await t.deps.db('pick_lines').where({ id: b!.lines[0]!.id }).first()).status).toBe('open');
    expect((await confirm(t.as.picker, trip.id, a!.lines[0]!.id, { via: 'tap', stopN: a!.n })).status).toBe(200);
  });

  it('refuses a second tap on the next line 120 ms after the first (double tap)', async () => {
    const trip = await startedTrip();
    const [a, b] = trip.stopList;
    const t0 = Date.now() - 5_000;
    const first = await confirm(t.as.picker, trip.id, a!.lines[0]!.id, { via: 'tap', stopN: a!.n, pickedAt: new Date(t0).toISOString() });
    expect(first.status).toBe(200);
    const second = await confirm(t.as.picker, trip.id, b!.lines[0]!.id, { via: 'tap', stopN: b!.n, pickedAt: new Date(t0 + 120).toISOString() });
    expect(second.status, JSON.stringify(second.body)).toBe(409);
    expect(second.body.error.code).toBe('line_not_shown');
    expect(await t.deps.db('pick_lines').where({ trip_id: trip.id, status: 'picked' }).count({ n: '*' })).toEqual([{ n: 1 }]);
    // A real pick of the next line, later than the guard, is recorded.
    const later = await confirm(t.as.picker, trip.id, b!.lines[0]!.id, {
      via: 'tap',
      stopN: b!.n,
      pickedAt: new Date(t0 + TAP_GUARD_MS + 2_000).toISOString(),
    });
    expect(later.status).toBe(200);
  });
});

describe('undo and correction', () => {
  it('undoes a line just confirmed: open again, stop open, audited; refuses after the window', async () => {
    const trip = await startedTrip();
    const line = trip.stopList[0]!.lines[0]!;
    expect((await confirm(t.as.picker, trip.id, line.id)).status).toBe(200);
    const res = await post(t.as.picker, `/api/picking/trips/${trip.id}/lines/${line.id}/undo`, {});
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const a = LineAnswer.parse(res.body);
    expect(a.line.status).toBe('open');
    expect(a.stop.status).toBe('open');
    const row = await t.deps.db('pick_lines').where({ id: line.id }).first();
    expect(row).toMatchObject({ status: 'open', confirmed_by: null, confirmed_at: null, picked_qty: null });
    const entry = await t.deps
      .db('audit_log')
      .where({ action: 'pick.undo', subject: `line:${line.id}` })
      .first();
    expect(entry.user_id).toBe(t.ids.picker);
    expect(JSON.parse(entry.detail).was.status).toBe('picked');
    // Confirm again, then pretend the window passed.
    expect((await confirm(t.as.picker, trip.id, line.id)).status).toBe(200);
    await t.deps
      .db('pick_lines')
      .where({ id: line.id })
      .update({ received_at: new Date(Date.now() - UNDO_WINDOW_MS - 1_000).toISOString() });
    const late = await post(t.as.picker, `/api/picking/trips/${trip.id}/lines/${line.id}/undo`, {});
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe('undo_expired');
    // Another picker cannot undo it.
    expect((await post(t.as.picker2, `/api/picking/trips/${trip.id}/lines/${line.id}/undo`, {})).status).toBe(403);
  });

  it('lets the supervisor reopen a recorded line of an open trip with a reason (audited), not of a finished one', async () => {
    const trip = await startedTrip(2);
    const line = trip.stopList[0]!.lines[0]!;
    expect((await confirm(t.as.picker, trip.id, line.id)).status).toBe(200);
    const missing = await t.as.supervisor.post(`/api/sites/${t.siteId}/board/lines/${line.id}/reopen`).set(csrf).send({});
    expect(missing.status).toBe(400);
    const res = await t.as.supervisor.post(`/api/sites/${t.siteId}/board/lines/${line.id}/reopen`).set(csrf).send({ reason: 'double tap, not picked' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(LineAnswer.parse(res.body).line.status).toBe('open');
    const entry = await t.deps
      .db('audit_log')
      .where({ action: 'pick.correct', subject: `line:${line.id}` })
      .first();
    expect(entry.user_id).toBe(t.ids.supervisor);
    expect(JSON.parse(entry.detail)).toMatchObject({ reason: 'double tap, not picked', was: { status: 'picked', by: t.ids.picker } });
    // The picker sees it open again and picks the trip to the end.
    const again = await readTrip(t.as.picker, trip.id);
    expect(again.currentStopId).toBe(trip.stopList[0]!.id);
    for (const s of again.stopList) for (const l of s.lines) if (l.status === 'open') expect((await confirm(t.as.picker, trip.id, l.id)).status).toBe(200);
    expect((await post(t.as.picker, `/api/picking/trips/${trip.id}/finish`, {})).status).toBe(200);
    const closed = await t.as.supervisor.post(`/api/sites/${t.siteId}/board/lines/${line.id}/reopen`).set(csrf).send({ reason: 'too late' });
    expect(closed.status).toBe(409);
    expect(closed.body.error.code).toBe('trip_closed');
  });
});

describe('pick time and arrival time', () => {
  it("records an offline pick at the tablet's time and the arrival time apart", async () => {
    const trip = await startedTrip();
    const started = Date.parse((await t.deps.db('trips').where({ id: trip.id }).first()).started_at);
    // Pretend the trip started 20 minutes ago and the picker confirmed 10 minutes ago, offline.
    await t.deps
      .db('trips')
      .where({ id: trip.id })
      .update({ started_at: new Date(started - 20 * 60_000).toISOString() });
    const pickedAt = new Date(Date.now() - 10 * 60_000).toISOString();
    const before = Date.now();
    const res = await confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id, { via: 'tap', pickedAt });
    expect(res.status).toBe(200);
    const row = await t.deps.db('pick_lines').where({ id: trip.stopList[0]!.lines[0]!.id }).first();
    expect(row.confirmed_at).toBe(pickedAt);
    expect(Date.parse(row.received_at)).toBeGreaterThanOrEqual(before - 5);
    expect((await t.deps.db('stops').where({ id: trip.stopList[0]!.id }).first()).done_at).toBe(pickedAt);
  });

  it('bounds the pick time: not before the trip started, not after now; refuses a clock far ahead', async () => {
    const trip = await startedTrip();
    const started = (await t.deps.db('trips').where({ id: trip.id }).first()).started_at as string;
    const early = await confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id, {
      via: 'tap',
      pickedAt: new Date(Date.parse(started) - 3_600_000).toISOString(),
    });
    expect(early.status).toBe(200);
    expect((await t.deps.db('pick_lines').where({ id: trip.stopList[0]!.lines[0]!.id }).first()).confirmed_at).toBe(started);
    const slightlyAhead = new Date(Date.now() + CLOCK_SKEW_MS / 2).toISOString();
    const ahead = await confirm(t.as.picker, trip.id, trip.stopList[1]!.lines[0]!.id, { via: 'tap', pickedAt: slightlyAhead });
    expect(ahead.status).toBe(200);
    const aheadRow = await t.deps.db('pick_lines').where({ id: trip.stopList[1]!.lines[0]!.id }).first();
    expect(Date.parse(aheadRow.confirmed_at)).toBeLessThanOrEqual(Date.parse(aheadRow.received_at));
    const farAhead = await confirm(t.as.picker, trip.id, trip.stopList[2]!.lines[0]!.id, {
      via: 'tap',
      pickedAt: new Date(Date.now() + CLOCK_SKEW_MS + 60_000).toISOString(),
    });
    expect(farAhead.status).toBe(400);
    expect((await t.deps.db('pick_lines').where({ id: trip.stopList[2]!.lines[0]!.id }).first()).status).toBe('open');
  });

  it("takes a former picker's work made before the reassignment and refuses work made after it", async () => {
    const trip = await startedTrip();
    await new Promise((r) => setTimeout(r, 10));
    const beforeReassign = new Date().toISOString();
    await new Promise((r) => setTimeout(r, 10));
    expect((await t.as.supervisor.post(`/api/sites/${t.siteId}/board/trips/${trip.id}/assign`).set(csrf).send({ pickerId: t.ids.picker2 })).status).toBe(200);
    const ok = await confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id, { via: 'tap', pickedAt: beforeReassign });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    const row = await t.deps.db('pick_lines').where({ id: trip.stopList[0]!.lines[0]!.id }).first();
    expect(row).toMatchObject({ status: 'picked', confirmed_by: t.ids.picker, confirmed_at: beforeReassign });
    const after = await confirm(t.as.picker, trip.id, trip.stopList[1]!.lines[0]!.id, { via: 'tap', pickedAt: new Date().toISOString() });
    expect(after.status).toBe(403);
    expect(after.body.error.code).toBe('trip_reassigned');
    const noTime = await confirm(t.as.picker, trip.id, trip.stopList[1]!.lines[0]!.id, { via: 'tap' });
    expect(noTime.status).toBe(403);
    expect((await t.deps.db('pick_lines').where({ id: trip.stopList[1]!.lines[0]!.id }).first()).status).toBe('open');
  });
});
