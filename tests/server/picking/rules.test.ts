/**
 * Picking server rules: who may read and write a trip, taking trips, idempotency keys, conflicts,
 * scans, shorts, skips, finishing, and the audit trail behind each.
 */
import { isPg } from '../../../server/db/dialect';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { routeTable } from '../../../server/routes';
import { csrf } from '../../helpers/app';
import { CurrentTrip, IDEMPOTENCY_HEADER, DEVICE_HEADER, LineAnswer, PickAnswer, TripPulse, TripResult } from '../../../shared/picking';
import { confirm, makePickingApp, newKey, post, readTrip, type PickingFixture, freePickers } from './setup';

let t: PickingFixture;
beforeAll(async () => {
  t = await makePickingApp();
});
afterAll(() => t.close());

const take = async (agent: PickingFixture['as']['picker']) => {
  const res = await agent.post(`/api/sites/${t.siteId}/picking/next`).set(csrf).send({});
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return CurrentTrip.parse(res.body);
};

/** Finishes whatever trips the demo pickers hold, so each test starts with free pickers. */

describe('taking a trip', () => {
  it('gives the assigned trip before any released one', async () => {
    await freePickers(t);
    const w = await t.wave([
      { stops: 3, due: '2026-12-01T08:00:00Z' },
      { stops: 3, pickerId: t.ids.picker },
    ]);
    const got = await take(t.as.picker);
    expect(got.trip?.id).toBe(w.tripIds[1]);
  });

  it('takes released trips oldest due first, those without a due date last', async () => {
    await freePickers(t);
    const w = await t.wave([
      { stops: 2, due: null },
      { stops: 2, due: '2026-12-02T15:00:00Z' },
      { stops: 2, due: '2026-12-02T09:00:00Z' },
    ]);
    expect((await take(t.as.picker)).trip?.id).toBe(w.tripIds[2]);
    expect((await take(t.as.picker2)).trip?.id).toBe(w.tripIds[1]);
    // Asking again returns the trip already held, not another one.
    expect((await take(t.as.picker)).trip?.id).toBe(w.tripIds[2]);
  });

  it('never gives one trip to two pickers asking at the same moment', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 2 }]);
    const [a, b] = await Promise.all([take(t.as.picker), take(t.as.picker2)]);
    const got = [a.trip?.id ?? null, b.trip?.id ?? null];
    expect(got.filter((x) => x === w.tripIds[0])).toHaveLength(1);
    expect(got).toContain(null);
    const rows = await t.deps.db('trip_assignments').where({ trip_id: w.tripIds[0] });
    expect(rows).toHaveLength(1);
  });

  it('answers null when nothing is released', async () => {
    await freePickers(t);
    const got = await take(t.as.picker);
    expect(got).toEqual({ trip: null, releasedTrips: 0 });
  });
});

describe("another picker's trip", () => {
  const pickingPaths = routeTable.filter((r) => r.path.startsWith('/api/picking/trips/:tripId'));

  it('covers every picking route of the table', () => {
    // confirm, short, undo, skip, finish, start, cart set-up, read, plan, result
    expect(pickingPaths.map((r) => `${r.method} ${r.path}`).sort()).toEqual([
      'get /api/picking/trips/:tripId',
      'get /api/picking/trips/:tripId/plan',
      'get /api/picking/trips/:tripId/result',
      'get /api/picking/trips/:tripId/status',
      'post /api/picking/trips/:tripId/cart-ready',
      'post /api/picking/trips/:tripId/finish',
      'post /api/picking/trips/:tripId/lines/:lineId/confirm',
      'post /api/picking/trips/:tripId/lines/:lineId/short',
      'post /api/picking/trips/:tripId/lines/:lineId/undo',
      'post /api/picking/trips/:tripId/start',
      'post /api/picking/trips/:tripId/stops/:stopId/skip',
    ]);
  });

  for (const route of routeTable.filter((r) => r.path.startsWith('/api/picking/trips/:tripId'))) {
    it(`is 403 on ${route.method.toUpperCase()} ${route.path}, and changes nothing`, async () => {
      await freePickers(t);
      const w = await t.wave([{ stops: 3, pickerId: t.ids.picker }]);
      const trip = await readTrip(t.as.picker, w.tripIds[0]!);
      const stop = trip.stopList[0]!;
      const path = route.path.replace(':tripId', String(trip.id)).replace(':lineId', String(stop.lines[0]!.id)).replace(':stopId', String(stop.id));
      const body = route.path.endsWith('/short')
        ? { qtyFound: 0, reason: 'empty_bin' }
        : route.path.endsWith('/confirm')
          ? { via: 'tap' }
          : route.path.endsWith('/cart-ready')
            ? { totes: [...new Set(trip.stopList.flatMap((s) => s.lines.map((l) => l.tote)))].map((tote) => ({ tote, via: 'tap' })) }
            : {};
      const res = route.method === 'get' ? await t.as.picker2.get(path) : await t.as.picker2.post(path).set(csrf).set(IDEMPOTENCY_HEADER, newKey()).send(body);
      expect(res.status, JSON.stringify(res.body)).toBe(403);
      expect(res.body.error.code).toBe('not_your_trip');
      const after = await readTrip(t.as.picker, trip.id);
      expect(after.stopList.flatMap((s) => s.lines.map((l) => l.status))).toEqual(trip.stopList.flatMap((s) => s.lines.map((l) => l.status)));
      expect(after.status).toBe('assigned');
    });
  }
});

describe('idempotency keys', () => {
  it('answers the stored answer for the same key and body, and records the confirmation once', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 3, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const line = trip.stopList[0]!.lines[0]!;
    const key = newKey('same');
    const first = await confirm(t.as.picker, trip.id, line.id, { via: 'scan', scan: line.bin }, key);
    expect(first.status, JSON.stringify(first.body)).toBe(200);
    const again = await confirm(t.as.picker, trip.id, line.id, { via: 'scan', scan: line.bin }, key);
    expect(again.status).toBe(200);
    expect(again.body).toEqual(first.body);
    expect(LineAnswer.parse(again.body).line.status).toBe('picked');
    const audits = await t.deps.db('audit_log').where({ action: 'pick.confirm', subject: `line:${line.id}` });
    expect(audits).toHaveLength(1);
    expect(await t.deps.db('pick_requests').where({ idem_key: key })).toHaveLength(1);
  });

  it('refuses the same key with a different body with 422', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 3, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const [l1, l2] = [trip.stopList[0]!.lines[0]!, trip.stopList[1]!.lines[0]!];
    const key = newKey('reuse');
    expect((await confirm(t.as.picker, trip.id, l1.id, { via: 'tap' }, key)).status).toBe(200);
    const otherBody = await confirm(t.as.picker, trip.id, l1.id, { via: 'scan', scan: l1.bin }, key);
    expect(otherBody.status).toBe(422);
    expect(otherBody.body.error.code).toBe('idempotency_key_reused');
    // Another line under the same key is another request too.
    const otherLine = await confirm(t.as.picker, trip.id, l2.id, { via: 'tap' }, key);
    expect(otherLine.status).toBe(422);
    expect((await readTrip(t.as.picker, trip.id)).stopList[1]!.lines[0]!.status).toBe('open');
  });

  it('refuses one key sent to two trips at the same moment like one sent twice: one write, the other 422', async () => {
    // A picker may write to two trips (their own and one taken from them, for work done before); the
    // trip lock then does not serialise the two. Each round sends one key to both trips at once.
    for (let round = 0; round < 4; round++) {
      await freePickers(t);
      const w = await t.wave([
        { stops: 2, pickerId: t.ids.picker },
        { stops: 2, pickerId: t.ids.picker },
      ]);
      const trips = await Promise.all(w.tripIds.map((id) => readTrip(t.as.picker, id)));
      const key = newKey('two-trips');
      const rs = await Promise.all(trips.map((trip) => confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id, { via: 'tap' }, key)));
      expect(rs.map((r) => r.status).sort(), JSON.stringify(rs.map((r) => r.body))).toEqual([200, 422]);
      expect(rs.find((r) => r.status === 422)!.body.error.code).toBe('idempotency_key_reused');
      expect(await t.deps.db('pick_requests').where({ idem_key: key })).toHaveLength(1);
      // The refused write left its line open; the taken one is picked.
      const after = await Promise.all(trips.map((trip) => readTrip(t.as.picker, trip.id)));
      expect(after.map((trip) => trip.stopList[0]!.lines[0]!.status).sort()).toEqual(['open', 'picked']);
    }
  });

  it('refuses a write without a key with 400, and nothing is confirmed', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 2, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const stop = trip.stopList[0]!;
    const line = stop.lines[0]!;
    for (const [path, body] of [
      [`/api/picking/trips/${trip.id}/lines/${line.id}/confirm`, { via: 'tap' }],
      [`/api/picking/trips/${trip.id}/lines/${line.id}/short`, { qtyFound: 0, reason: 'damaged' }],
      [`/api/picking/trips/${trip.id}/stops/${stop.id}/skip`, {}],
      [`/api/picking/trips/${trip.id}/finish`, {}],
    ] as const) {
      const res = await post(t.as.picker, path, body, null);
      expect(res.status, path).toBe(400);
      expect(res.body.error.code).toBe('idempotency_key_required');
    }
    expect((await readTrip(t.as.picker, trip.id)).stopList[0]!.lines[0]!.status).toBe('open');
  });

  it('answers 409 with who and when for a line someone else already confirmed', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 3, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const line = trip.stopList[0]!.lines[0]!;
    const done = await confirm(t.as.picker, trip.id, line.id);
    expect(done.status).toBe(200);
    const assign = await t.as.supervisor.post(`/api/sites/${t.siteId}/board/trips/${trip.id}/assign`).set(csrf).send({ pickerId: t.ids.picker2 });
    expect(assign.status, JSON.stringify(assign.body)).toBe(200);
    const res = await confirm(t.as.picker2, trip.id, line.id);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('already_confirmed');
    const row = (await t.deps.db('pick_lines').where({ id: line.id }).first())!;
    expect(res.body.error.details).toEqual({ lineId: line.id, by: 'Pat Picker', byId: t.ids.picker, at: row.confirmed_at, status: 'picked' });
    expect(res.body.error.message).toContain('Pat Picker');
  });

  it('gives one success and one 409 when two pickers confirm the same line at once', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 3, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const line = trip.stopList[0]!.lines[0]!;
    // The first picker picked it offline before the trip was given to the second, who picks it too.
    const pickedAt = new Date().toISOString();
    await t.as.supervisor.post(`/api/sites/${t.siteId}/board/trips/${trip.id}/assign`).set(csrf).send({ pickerId: t.ids.picker2 });
    const [a, b] = await Promise.all([
      confirm(t.as.picker, trip.id, line.id, { via: 'tap', pickedAt }),
      confirm(t.as.picker2, trip.id, line.id, { via: 'tap' }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const loser = a.status === 409 ? a : b;
    const winnerId = a.status === 200 ? t.ids.picker : t.ids.picker2;
    expect(loser.body.error.details.byId).toBe(winnerId);
    expect(await t.deps.db('audit_log').where({ action: 'pick.confirm', subject: `line:${line.id}` })).toHaveLength(1);
  });

  it("refuses a former picker's work stamped after the trip was taken from them", async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 3, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    await t.as.supervisor.post(`/api/sites/${t.siteId}/board/trips/${trip.id}/assign`).set(csrf).send({ pickerId: t.ids.picker2 });
    const late = new Date(Date.now() + 10 * 60_000).toISOString();
    const res = await confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id, { via: 'tap', pickedAt: late });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('trip_reassigned');
    // …and the former picker can no longer read it.
    expect((await t.as.picker.get(`/api/picking/trips/${trip.id}`)).status).toBe(403);
  });
});

describe("the tablet's poll", () => {
  it('reads status and a revision that every write raises', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 3, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const pulse = async () => TripPulse.parse((await t.as.picker.get(`/api/picking/trips/${trip.id}/status`)).body);
    const r0 = await pulse();
    expect(r0).toEqual({ id: trip.id, status: 'assigned', revision: trip.revision });
    const c = LineAnswer.parse((await confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id)).body);
    const r1 = await pulse();
    expect(r1.status).toBe('picking');
    expect(r1.revision).toBe(c.revision);
    expect(r1.revision).toBeGreaterThan(r0.revision);
    // A supervisor's cancel shows up in the poll too.
    await t.as.supervisor.post(`/api/sites/${t.siteId}/board/trips/${trip.id}/cancel`).set(csrf).send({});
    const r2 = await pulse();
    expect(r2.status).toBe('cancelled');
    expect(r2.revision).toBeGreaterThan(r1.revision);
  });
});

describe('scans', () => {
  it('refuses a wrong bin scan with what was expected and what was scanned, confirming nothing', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 2, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const line = trip.stopList[0]!.lines[0]!;
    const res = await confirm(t.as.picker, trip.id, line.id, { via: 'scan', scan: 'Z-99-99-9' });
    expect(res.status).toBe(422);
    expect(res.body.error).toMatchObject({ code: 'wrong_scan', details: { expected: line.bin, scanned: 'Z-99-99-9', kind: 'bin' } });
    expect((await readTrip(t.as.picker, trip.id)).stopList[0]!.lines[0]!.status).toBe('open');
    // Scanners send other case or padding; the code is what counts.
    const ok = await confirm(t.as.picker, trip.id, line.id, { via: 'scan', scan: ` ${line.bin.toLowerCase()} ` });
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
  });

  it('expects the SKU barcode when the site says so', async () => {
    await freePickers(t);
    await t.deps.db('sites').where({ id: t.siteId }).update({ confirm_scan: 'sku' });
    try {
      const w = await t.wave([{ stops: 2, pickerId: t.ids.picker }]);
      const trip = await readTrip(t.as.picker, w.tripIds[0]!);
      expect(trip.confirmScan).toBe('sku');
      const line = trip.stopList[0]!.lines[0]!;
      const byBin = await confirm(t.as.picker, trip.id, line.id, { via: 'scan', scan: line.bin });
      expect(byBin.status).toBe(422);
      expect(byBin.body.error.details).toMatchObject({ expected: line.sku, kind: 'sku' });
      expect((await confirm(t.as.picker, trip.id, line.id, { via: 'scan', scan: line.sku })).status).toBe(200);
    } finally {
      await t.deps.db('sites').where({ id: t.siteId }).update({ confirm_scan: 'bin' });
    }
  });
});

describe('shorts, skips and the end of a trip', () => {
  it('records a short with quantity and reason, for the supervisor to see', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 3, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const line = trip.stopList[0]!.lines.find((l) => l.qty > 1) ?? trip.stopList[0]!.lines[0]!;
    const tooMany = await post(t.as.picker, `/api/picking/trips/${trip.id}/lines/${line.id}/short`, { qtyFound: line.qty, reason: 'damaged' });
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error.details[0].field).toBe('qtyFound');
    const res = await post(t.as.picker, `/api/picking/trips/${trip.id}/lines/${line.id}/short`, { qtyFound: line.qty - 1, reason: 'damaged' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const l = LineAnswer.parse(res.body).line;
    expect(l).toMatchObject({ status: 'short', pickedQty: line.qty - 1, shortReason: 'damaged' });
    const board = await t.as.supervisor.get(`/api/sites/${t.siteId}/board`);
    expect(board.body.shorts.find((s: { tripId: number }) => s.tripId === trip.id)).toMatchObject({
      sku: line.sku,
      qtyOrdered: line.qty,
      qtyFound: line.qty - 1,
      reason: 'damaged',
      reportedBy: 'Pat Picker',
    });
  });

  it('moves a skipped stop to the end and re-sequences the rest from where the picker stands', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 7, pickerId: t.ids.picker }]);
    let trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const w0 = trip.stopList;
    for (const l of trip.stopList[0]!.lines) expect((await confirm(t.as.picker, trip.id, l.id)).status).toBe(200);
    const skipped = trip.stopList[1]!;
    const res = await post(t.as.picker, `/api/picking/trips/${trip.id}/stops/${skipped.id}/skip`, {});
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    trip = PickAnswer.parse(res.body).trip;
    // Printed stop numbers are fixed at release: the walk changes, the numbers do not (issue 10, item 5).
    expect(trip.stopList.map((s) => s.n).sort((a, b) => a - b)).toEqual([1, 2, 3, 4, 5, 6, 7]);
    expect(trip.stopList[0]!.status).toBe('done');
    expect(trip.stopList.at(-1)).toMatchObject({ id: skipped.id, skipped: true, n: skipped.n });
    const rows = await t.deps.db('stops').where({ trip_id: trip.id }).orderBy('id').select('id', 'n');
    expect(new Map(rows.map((r: { id: number; n: number }) => [r.id, r.n]))).toEqual(new Map(w0.map((s) => [s.id, s.n])));
    expect(trip.currentStopId).toBe(trip.stopList[1]!.id);
    expect(new Set(trip.stopList.map((s) => s.id)).size).toBe(7);
    const audit = await t.deps
      .db('audit_log')
      .where({ action: 'pick.skip', subject: `stop:${skipped.id}` })
      .first();
    expect(audit.user_id).toBe(t.ids.picker);
    // A second skip of another stop puts it after the first one skipped.
    const second = trip.stopList[1]!;
    trip = PickAnswer.parse((await post(t.as.picker, `/api/picking/trips/${trip.id}/stops/${second.id}/skip`, {})).body).trip;
    expect(trip.stopList.slice(-2).map((s) => s.id)).toEqual([skipped.id, second.id]);
  });

  it('finishes only when no line is open, then sums lines, shorts, metres and minutes', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 4, twoLineEvery: 2, pickerId: t.ids.picker }]);
    let trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const early = await post(t.as.picker, `/api/picking/trips/${trip.id}/finish`, {});
    expect(early.status).toBe(409);
    expect(early.body.error.code).toBe('lines_open');
    const lines = trip.stopList.flatMap((s) => s.lines);
    for (const [i, l] of lines.entries()) {
      const res =
        i === 0
          ? await post(t.as.picker, `/api/picking/trips/${trip.id}/lines/${l.id}/short`, { qtyFound: 0, reason: 'empty_bin' })
          : await confirm(t.as.picker, trip.id, l.id);
      expect(res.status).toBe(200);
    }
    trip = await readTrip(t.as.picker, trip.id);
    expect(trip.currentStopId).toBeNull();
    const fin = await post(t.as.picker, `/api/picking/trips/${trip.id}/finish`, {});
    expect(fin.status, JSON.stringify(fin.body)).toBe(200);
    const result = TripResult.parse(fin.body);
    expect(result).toMatchObject({ status: 'done', lines: lines.length, picked: lines.length - 1, shorts: 1, cancelled: 0, stops: 4 });
    // Picked in the planned order, the walk is the planned circuit (same distances, same order).
    expect(result.walkedMetres).toBeCloseTo(result.plannedMetres, 6);
    expect(result.minutes).not.toBeNull();
    const orders = await t.deps.db('orders').whereIn('id', w.orderIds).pluck('status');
    expect(orders).toEqual(['done', 'done']);
    const again = await post(t.as.picker, `/api/picking/trips/${trip.id}/lines/${lines[1]!.id}/confirm`, { via: 'tap' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('trip_closed');
  });

  it('records who, when, what and the device for every confirmation and short', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 2, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const [a, b] = [trip.stopList[0]!.lines[0]!, trip.stopList[1]!.lines[0]!];
    await t.as.picker
      .post(`/api/picking/trips/${trip.id}/lines/${a.id}/confirm`)
      .set(csrf)
      .set(IDEMPOTENCY_HEADER, newKey())
      .set(DEVICE_HEADER, 'cart-tablet-07')
      .send({ via: 'scan', scan: a.bin });
    await t.as.picker
      .post(`/api/picking/trips/${trip.id}/lines/${b.id}/short`)
      .set(csrf)
      .set(IDEMPOTENCY_HEADER, newKey())
      .set(DEVICE_HEADER, 'cart-tablet-07')
      .send({ qtyFound: 0, reason: 'cannot_reach' });
    const rows = await t.deps
      .db('audit_log')
      .whereIn('subject', [`line:${a.id}`, `line:${b.id}`])
      .orderBy('id');
    expect(rows.map((r) => [r.action, r.user_id, r.device])).toEqual([
      ['pick.confirm', t.ids.picker, 'cart-tablet-07'],
      ['pick.short', t.ids.picker, 'cart-tablet-07'],
    ]);
    for (const r of rows) {
      expect(Date.parse(r.at)).toBeGreaterThan(Date.now() - 60_000);
      expect(Date.parse(r.at)).toBeLessThanOrEqual(Date.now());
    }
    expect(JSON.parse(rows[0].detail)).toMatchObject({ tripId: trip.id, sku: a.sku, bin: a.bin, via: 'scan', scan: a.bin });
    expect(JSON.parse(rows[1].detail)).toMatchObject({ found: 0, reason: 'cannot_reach' });
  });

  it('commits on a connection with synchronous=FULL (PostgreSQL: synchronous_commit on) before answering', async () => {
    if (isPg(t.deps.db)) {
      // PostgreSQL documentation (WAL configuration): synchronous_commit=on waits for the WAL flush before
      // a commit returns; a 200 is sent after the commit.
      const r = await t.deps.db.raw('show synchronous_commit');
      expect(r.rows[0].synchronous_commit).toBe('on');
      return;
    }
    // SQLite documentation: synchronous=FULL (2) syncs at each commit; a 200 is sent after the commit.
    const r = await t.deps.db.raw('PRAGMA synchronous');
    expect(r[0].synchronous).toBe(2);
  });
});
