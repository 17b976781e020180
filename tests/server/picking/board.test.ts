/**
 * The live board: snapshot figures, server-sent events after a confirmation, reassignment, cancelling
 * the rest of a trip, closing a wave, and the wave report mailed when a wave completes.
 */
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as XLSX from 'xlsx';
import { Board, CancelResult, CloseWaveResult } from '../../../shared/picking';
import { csrf } from '../../helpers/app';
import { binaryBody, readEventStream, sessionCookie } from '../../helpers/http';
import { planDistance } from '../../helpers/picking';
import { confirm, makePickingApp, post, readTrip, type PickingFixture, freePickers } from './setup';

let t: PickingFixture;
beforeAll(async () => {
  t = await makePickingApp();
});
afterAll(() => t.close());

const boardNow = async () => Board.parse((await t.as.supervisor.get(`/api/sites/${t.siteId}/board`)).body);

describe('the board snapshot', () => {
  it('shows per trip the picker, progress, shorts, elapsed and remaining time, and a wave forecast', async () => {
    await freePickers(t);
    const began = Date.now();
    const w = await t.wave([{ stops: 4, pickerId: t.ids.picker }, { stops: 3 }], 'Board wave A');
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const before = (await boardNow()).waves.find((x) => x.id === w.waveId)!;
    expect(before.trips[0]).toMatchObject({ pickerName: 'Pat Picker', stopsDone: 0, linesDone: 0, elapsedMinutes: null });
    // Nothing walked yet: the remaining estimate is the trip's own estimate (same walk, same speeds).
    expect(before.trips[0]!.remainingMinutes).toBeCloseTo(before.trips[0]!.estMinutes, 6);
    await confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id);
    await post(t.as.picker, `/api/picking/trips/${trip.id}/lines/${trip.stopList[1]!.lines[0]!.id}/short`, { qtyFound: 0, reason: 'empty_bin' });
    const after = (await boardNow()).waves.find((x) => x.id === w.waveId)!;
    expect(after.status).toBe('picking');
    expect(after.trips[0]).toMatchObject({ status: 'picking', stopsDone: 2, linesDone: 2, shorts: 1 });
    expect(after.trips[0]!.elapsedMinutes).toBeGreaterThanOrEqual(0);
    // From above: the trip started after this test began (a few seconds of rounding allowed).
    expect(after.trips[0]!.elapsedMinutes).toBeLessThanOrEqual((Date.now() - began) / 60_000 + 0.1);
    expect(after.trips[0]!.remainingMinutes).toBeLessThan(before.trips[0]!.remainingMinutes);
    expect(after.remainingMinutes).toBeCloseTo(after.trips[0]!.remainingMinutes + after.trips[1]!.remainingMinutes, 6);
    // One picker on the wave: the forecast is now + all remaining work.
    expect(after.pickersCounted).toBe(1);
    const forecastMin = (Date.parse(after.forecastAt!) - Date.now()) / 60_000;
    expect(Math.abs(forecastMin - after.remainingMinutes)).toBeLessThan(0.5);
  });
});

describe('server-sent events', () => {
  it('sends the snapshot on connect and again after a confirmation', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 3, pickerId: t.ids.picker }], 'Board wave SSE');
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const server = t.app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    const port = (server.address() as AddressInfo).port;
    const cookie = sessionCookie(
      await t.anon.post('/api/auth/sign-in').set(csrf).send({ email: 'supervisor@demo.aislewright.test', password: 'demo-password-1' }),
    );
    const read = await readEventStream({
      port,
      path: `/api/sites/${t.siteId}/board/events`,
      cookie,
      event: 'board',
      parse: (d) => Board.parse(d),
      timeoutMs: 5000,
      onEvent: (events, fail) => {
        // Supertest sends only when awaited or then-ed.
        if (events.length === 1) confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id).then(() => undefined, fail);
        return events.length === 2;
      },
    }).finally(() => server.close());
    expect(read.contentType).toContain('text/event-stream');
    const { events } = read;
    const tripOf = (b: Board) => b.waves.find((x) => x.id === w.waveId)!.trips[0]!;
    expect(tripOf(events[0]!).linesDone).toBe(0);
    expect(tripOf(events[1]!).linesDone).toBe(1);
  });
});

describe('supervisor actions', () => {
  it('reassigns a trip and audits it; refuses a picker who already holds a trip', async () => {
    await freePickers(t);
    const w = await t.wave([
      { stops: 2, pickerId: t.ids.picker },
      { stops: 2, pickerId: t.ids.picker2 },
    ]);
    const busy = await t.as.supervisor.post(`/api/sites/${t.siteId}/board/trips/${w.tripIds[0]}/assign`).set(csrf).send({ pickerId: t.ids.picker2 });
    expect(busy.status).toBe(409);
    expect(busy.body.error.code).toBe('picker_busy');
    await t.deps.db('trips').where({ id: w.tripIds[1] }).update({ status: 'cancelled' });
    const ok = await t.as.supervisor.post(`/api/sites/${t.siteId}/board/trips/${w.tripIds[0]}/assign`).set(csrf).send({ pickerId: t.ids.picker2 });
    expect(ok.status).toBe(200);
    expect((await t.as.picker2.get(`/api/picking/trips/${w.tripIds[0]}`)).status).toBe(200);
    expect((await t.as.picker.get(`/api/picking/trips/${w.tripIds[0]}`)).status).toBe(403);
    const a = await t.deps
      .db('audit_log')
      .where({ action: 'trip.reassign', subject: `trip:${w.tripIds[0]}` })
      .first();
    expect(JSON.parse(a.detail)).toEqual({ from: t.ids.picker, to: t.ids.picker2 });
    expect(a.user_id).toBe(t.ids.supervisor);
    expect((await t.as.picker.post(`/api/sites/${t.siteId}/board/trips/${w.tripIds[0]}/assign`).set(csrf).send({ pickerId: t.ids.picker })).status).toBe(403);
  });

  it('cancels the rest of a trip: open lines cancelled, their orders open again, the picker stopped', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 4, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    await confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id);
    const res = await t.as.supervisor.post(`/api/sites/${t.siteId}/board/trips/${trip.id}/cancel`).set(csrf).send({ reason: 'aisle blocked' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const out = CancelResult.parse(res.body);
    expect(out.linesCancelled).toBe(trip.lines - 1);
    const lines = await t.deps.db('pick_lines').where({ trip_id: trip.id }).orderBy('id').pluck('status');
    expect(lines.filter((s: string) => s === 'picked')).toHaveLength(1);
    expect(lines.filter((s: string) => s === 'cancelled')).toHaveLength(trip.lines - 1);
    const orders = await t.deps.db('orders').whereIn('ref', out.ordersReopened);
    expect(orders.length).toBeGreaterThan(0);
    for (const o of orders) expect([o.status, o.wave_id]).toEqual(['open', null]);
    const late = await confirm(t.as.picker, trip.id, trip.stopList[1]!.lines[0]!.id);
    expect(late.status).toBe(409);
    expect(late.body.error.code).toBe('trip_closed');
    const a = await t.deps
      .db('audit_log')
      .where({ action: 'trip.cancel', subject: `trip:${trip.id}` })
      .first();
    expect(JSON.parse(a.detail)).toMatchObject({ reason: 'aisle blocked', linesCancelled: trip.lines - 1 });
  });

  it('cancels the rest of a partly picked order without picking its picked lines again: done, and a remainder order holds the rest', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 6, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    const first = trip.stopList[0]!.lines[0]!;
    // The SKU master holds the trip's SKUs, as an import leaves it (the test wave writes lines only).
    const tripLines = trip.stopList.flatMap((st) => st.lines);
    const skuRows = [...new Map(tripLines.map((l) => [l.sku, l])).values()].map((l) => ({
      site_id: t.siteId,
      sku: l.sku,
      description: l.description,
      bin: l.bin,
      unit_weight_kg: 0.5,
      unit_volume_l: 1,
      updated_at: new Date().toISOString(),
    }));
    await t.deps.db('skus').insert(skuRows).onConflict(['site_id', 'sku']).ignore();
    await confirm(t.as.picker, trip.id, first.id);
    const out = CancelResult.parse((await t.as.supervisor.post(`/api/sites/${t.siteId}/board/trips/${trip.id}/cancel`).set(csrf).send({})).body);
    const started = await t.deps.db('orders').where({ ref: first.orderRef }).first();
    // The helper's trip has two orders, lines alternating: one has a picked line, the other nothing yet.
    expect(out.ordersReopened).toHaveLength(1);
    expect(out.ordersReopened).not.toContain(first.orderRef);
    expect(out.remainderOrders).toEqual([`${first.orderRef}-R1`]);
    expect(started.status).toBe('done');
    // The remainder order holds exactly the cancelled lines of the started order, and is open for the next wave.
    const cancelled = await t.deps.db('pick_lines').where({ trip_id: trip.id, order_id: started.id, status: 'cancelled' }).orderBy('id').select('sku', 'qty');
    expect(cancelled.length).toBeGreaterThan(0);
    const remainder = await t.deps
      .db('orders')
      .where({ site_id: t.siteId, ref: `${first.orderRef}-R1` })
      .first();
    expect([remainder.status, remainder.wave_id, remainder.due]).toEqual(['open', null, started.due]);
    const remainderLines = await t.deps.db('order_lines').where({ order_id: remainder.id }).orderBy('line_no').select('sku', 'qty');
    expect(remainderLines).toEqual(cancelled.map((l: { sku: string; qty: number }) => ({ sku: l.sku, qty: l.qty })));
    expect(remainderLines.map((l: { sku: string }) => l.sku)).not.toContain(first.sku);
    const a = await t.deps
      .db('audit_log')
      .where({ action: 'trip.cancel', subject: `trip:${trip.id}` })
      .first();
    expect(JSON.parse(a.detail)).toMatchObject({ remainderOrders: [`${first.orderRef}-R1`] });
  });

  it('mails the wave report with walked metres in the order actually picked once the last trip is done', async () => {
    await freePickers(t);
    await t.deps.db('mail_outbox').delete();
    const w = await t.wave([{ stops: 5, pickerId: t.ids.picker }], 'Report wave');
    let trip = await readTrip(t.as.picker, w.tripIds[0]!);
    // Skip the first stop, pick the rest, then the skipped one: the walk is not the planned circuit.
    const first = trip.stopList[0]!;
    trip = (await post(t.as.picker, `/api/picking/trips/${trip.id}/stops/${first.id}/skip`, {})).body.trip;
    const finishOrder: number[] = [];
    for (const s of trip.stopList) {
      for (const l of s.lines) expect((await confirm(t.as.picker, trip.id, l.id)).status).toBe(200);
      finishOrder.push(s.id);
    }
    const fin = await post(t.as.picker, `/api/picking/trips/${trip.id}/finish`, {});
    expect(fin.status).toBe(200);
    // Walked metres recomputed here from the stop nodes in finishing order on the plan's distances.
    const nodes = new Map((await t.deps.db('stops').where({ trip_id: trip.id }).select('id', 'node')).map((r: { id: number; node: number }) => [r.id, r.node]));
    const d = await planDistance(t.deps.db, t.planId);
    const plan = await import('../../../server/floor-plans/plan-index').then((m) => m.loadPlanIndex(t.deps.db, t.planId));
    const depot = plan.depotNodes[0]!;
    const seq = [depot, ...finishOrder.map((id) => nodes.get(id)!), depot];
    let walked = 0;
    for (let i = 1; i < seq.length; i++) walked += d(seq[i - 1]!, seq[i]!);
    expect(fin.body.walkedMetres).toBeCloseTo(walked, 6);
    expect(fin.body.walkedMetres).toBeGreaterThanOrEqual(fin.body.plannedMetres - 1e-6);

    const wave = await t.deps.db('waves').where({ id: w.waveId }).first();
    expect(wave.status).toBe('completed');
    const mails = await t.deps.db('mail_outbox').where({ site_id: t.siteId });
    expect(mails).toHaveLength(1);
    expect(mails[0].to).toBe('supervisor@demo.aislewright.test');
    expect(mails[0].subject).toContain('Report wave');
    const att = JSON.parse(mails[0].attachments)[0];
    expect(att.filename).toMatch(/\.xlsx$/);
    const wb = XLSX.read(Buffer.from(att.base64, 'base64'), { type: 'buffer' });
    const rows = XLSX.utils.sheet_to_json<unknown[]>(wb.Sheets.trips!, { header: 1 });
    expect(rows[0]).toEqual([
      'trip',
      'picker',
      'status',
      'stops',
      'stops done',
      'lines',
      'picked',
      'short',
      'cancelled',
      'planned m',
      'walked m',
      'estimated min',
      'actual min',
      'started (UTC)',
      'finished (UTC)',
    ]);
    expect(rows[1]!.slice(0, 9)).toEqual([1, 'Pat Picker', 'done', 5, 5, trip.lines, trip.lines, 0, 0]);
    expect(rows[1]![10]).toBeCloseTo(Math.round(walked * 10) / 10, 6);
    // A second completion path (closing the finished wave) does not mail again.
    expect((await t.as.supervisor.post(`/api/sites/${t.siteId}/board/waves/${w.waveId}/close`).set(csrf).send({})).status).toBe(409);
    expect(await t.deps.db('mail_outbox').where({ site_id: t.siteId })).toHaveLength(1);
  });

  it('closes a wave: open trips cancelled, the report mailed, the board shows it completed', async () => {
    await freePickers(t);
    await t.deps.db('mail_outbox').delete();
    const w = await t.wave([{ stops: 2, pickerId: t.ids.picker }, { stops: 2 }], 'Closed wave');
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    await confirm(t.as.picker, trip.id, trip.stopList[0]!.lines[0]!.id);
    const res = await t.as.supervisor.post(`/api/sites/${t.siteId}/board/waves/${w.waveId}/close`).set(csrf).send({ reason: 'end of shift' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(CloseWaveResult.parse(res.body)).toMatchObject({ tripsCancelled: 2, reportMailedTo: ['supervisor@demo.aislewright.test'] });
    const b = (await boardNow()).waves.find((x) => x.id === w.waveId)!;
    expect(b.status).toBe('completed');
    expect(b.trips.map((x) => x.status)).toEqual(['cancelled', 'cancelled']);
    expect(await t.deps.db('audit_log').where({ action: 'wave.close', subject: `wave:${w.waveId}` })).toHaveLength(1);
    const report = await t.as.supervisor.get(`/api/sites/${t.siteId}/board/waves/${w.waveId}/report.xlsx`).buffer(true).parse(binaryBody);
    expect(report.status).toBe(200);
    const wb = XLSX.read(report.body as Buffer, { type: 'buffer' });
    expect(wb.SheetNames).toEqual(['trips', 'shorts']);
  });

  it('lets a supervisor mark a short handled, which takes it off the attention list', async () => {
    await freePickers(t);
    const w = await t.wave([{ stops: 2, pickerId: t.ids.picker }]);
    const trip = await readTrip(t.as.picker, w.tripIds[0]!);
    await post(t.as.picker, `/api/picking/trips/${trip.id}/lines/${trip.stopList[0]!.lines[0]!.id}/short`, { qtyFound: 0, reason: 'empty_bin' });
    const short = (await boardNow()).shorts.find((s) => s.tripId === trip.id)!;
    expect((await t.as.supervisor.post(`/api/sites/${t.siteId}/board/shorts/${short.id}/handled`).set(csrf).send({})).status).toBe(200);
    expect((await boardNow()).shorts.find((s) => s.tripId === trip.id)).toBeUndefined();
  });
});
