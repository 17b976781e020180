/**
 * Issue 10, item 2: a supervisor closes a stretch holding a stop of a trip being picked. The board
 * stays up and lists the cut-off lines; the trip is re-routed from where the picker is, with the
 * cut-off stop last and flagged; the picker reports it short as "cannot reach" and the trip finishes
 * and saves with finite figures; the wave report holds no Infinity, NaN or error values; the database
 * refuses a non-finite figure.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as XLSX from 'xlsx';
import { Board, CurrentTrip, PickTrip, TripResult } from '../../../shared/picking';
import { loadPlanIndex } from '../../../server/floor-plans/plan-index';
import { csrf, type TestApp } from '../../helpers/app';
import { makeDemoApp, releaseDemoWave } from '../../helpers/waves';
import { confirm, post, readTrip } from './setup';
import { binaryBody } from '../../helpers/http';

let t: TestApp;
beforeAll(async () => {
  t = await makeDemoApp();
});
afterAll(() => t.close());

const finiteEverywhere = (v: unknown): boolean => {
  if (typeof v === 'number') return Number.isFinite(v);
  if (v === null || typeof v !== 'object') return true;
  return Object.values(v as object).every(finiteEverywhere);
};

describe('a closure under a trip being picked', () => {
  let trip: PickTrip;
  let cutStopId: number;
  let cutStopN: number;
  let waveId: number;
  let planId: number;

  it('re-routes the trip, keeps the board up and lists the cut-off lines', async () => {
    const wave = await releaseDemoWave(t, { orders: 12 });
    waveId = wave.id;
    const taken = CurrentTrip.parse((await t.as.picker.post(`/api/sites/${t.siteId}/picking/next`).set(csrf).send({})).body);
    trip = taken.trip!;
    expect(trip.stopList.length).toBeGreaterThanOrEqual(4);
    expect((await t.as.picker.post(`/api/picking/trips/${trip.id}/start`).set(csrf).send({})).status).toBe(200);
    // The picker finishes the first stop; the third stop in walking order is still to come.
    for (const l of trip.stopList[0]!.lines) expect((await confirm(t.as.picker, trip.id, l.id)).status).toBe(200);
    const target = trip.stopList[2]!;
    cutStopId = target.id;
    cutStopN = target.n;
    planId = trip.planId;
    const bin = (await loadPlanIndex(t.deps.db, planId)).geometry.bins.find((b) => b.code === target.bins[0])!;
    const closed = await t.as.supervisor
      .post(`/api/sites/${t.siteId}/floor-plans/${planId}/closures`)
      .set(csrf)
      .send({ kind: 'aisle', code: bin.aisle, fromM: bin.y - 0.3, toM: bin.y + 0.3, reason: 'spill' });
    expect(closed.status, JSON.stringify(closed.body)).toBe(201);

    // The board answers (it crashed with RangeError: Invalid time value) and every figure is finite.
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/board`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const board = Board.parse(res.body);
    expect(finiteEverywhere(board)).toBe(true);
    const boardTrip = board.waves.find((w) => w.id === waveId)!.trips.find((x) => x.id === trip.id)!;
    expect(boardTrip.cutOffLines).toBe(target.lines.length);
    expect(
      board.cutOff
        .filter((c) => c.tripId === trip.id)
        .map((c) => c.lineId)
        .sort(),
    ).toEqual(target.lines.map((l) => l.id).sort());
    expect(board.cutOff.find((c) => c.tripId === trip.id)).toMatchObject({ stopN: cutStopN, pickerName: 'Pat Picker', bin: target.lines[0]!.bin });

    // The tablet: route changed, the cut-off stop last and flagged, printed numbers unchanged.
    const after = await readTrip(t.as.picker, trip.id);
    expect(after.routeChangedAt).not.toBeNull();
    expect(after.stopList.at(-1)).toMatchObject({ id: cutStopId, n: cutStopN, cutOff: true });
    expect(after.stopList.filter((s) => s.cutOff).map((s) => s.id)).toContain(cutStopId);
    expect(new Map(after.stopList.map((s) => [s.id, s.n]))).toEqual(new Map(trip.stopList.map((s) => [s.id, s.n])));
    expect(after.currentStopId).not.toBe(cutStopId);
    expect(after.path.length).toBeGreaterThan(1);
    expect(after.path.flat().every(Number.isFinite)).toBe(true);
    const audit = await t.deps
      .db('audit_log')
      .where({ action: 'trip.reroute', subject: `trip:${trip.id}` })
      .first();
    expect(JSON.parse(audit.detail).cutOffStops).toContain(cutStopN);
    trip = after;
  });

  it('lets the picker report the cut-off stop short as "cannot reach" and finish: the trip saves with finite figures', async () => {
    for (const s of trip.stopList) {
      if (s.status === 'done') continue;
      for (const l of s.lines) {
        if (l.status !== 'open') continue;
        const res = s.cutOff
          ? await post(t.as.picker, `/api/picking/trips/${trip.id}/lines/${l.id}/short`, { qtyFound: 0, reason: 'cannot_reach' })
          : await confirm(t.as.picker, trip.id, l.id);
        expect(res.status, JSON.stringify(res.body)).toBe(200);
      }
    }
    const res = await post(t.as.picker, `/api/picking/trips/${trip.id}/finish`, {});
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const result = TripResult.parse(res.body);
    expect(result.status).toBe('done');
    expect(result.walkedMetres).not.toBeNull();
    expect(Number.isFinite(result.walkedMetres)).toBe(true);
    expect(result.walkedMetres!).toBeGreaterThan(0);
    const row = await t.deps.db('trips').where({ id: trip.id }).first();
    expect(row.status).toBe('done');
    expect(Number.isFinite(row.walked_metres)).toBe(true);
  });

  it('writes a wave report with no Infinity, NaN or error values', async () => {
    const res = await t.as.supervisor.get(`/api/sites/${t.siteId}/board/waves/${waveId}/report.xlsx`).buffer(true).parse(binaryBody);
    expect(res.status).toBe(200);
    const wb = XLSX.read(res.body as Buffer, { type: 'buffer' });
    const rows = XLSX.utils.sheet_to_json<unknown[]>(wb.Sheets.trips!, { header: 1 });
    const cells = rows.flat();
    expect(cells.some((c) => typeof c === 'number' && !Number.isFinite(c))).toBe(false);
    expect(cells.some((c) => typeof c === 'string' && /#DIV|#NUM|#VALUE|Infinity|NaN/.test(c))).toBe(false);
    expect(Object.values(wb.Sheets.trips!).some((c) => (c as { t?: string }).t === 'e')).toBe(false);
  });

  it('finishes a trip whose picked stop was cut off afterwards: walked metres not measurable (null), trip saved', async () => {
    const taken = CurrentTrip.parse((await t.as.picker.post(`/api/sites/${t.siteId}/picking/next`).set(csrf).send({})).body);
    const next = taken.trip!;
    await t.as.picker.post(`/api/picking/trips/${next.id}/start`).set(csrf).send({});
    const first = next.stopList.find((s) => !s.cutOff)!;
    for (const l of first.lines) expect((await confirm(t.as.picker, next.id, l.id)).status).toBe(200);
    const bin = (await loadPlanIndex(t.deps.db, planId)).geometry.bins.find((b) => b.code === first.bins[0])!;
    const closed = await t.as.supervisor
      .post(`/api/sites/${t.siteId}/floor-plans/${planId}/closures`)
      .set(csrf)
      .send({ kind: 'aisle', code: bin.aisle, fromM: bin.y - 0.3, toM: bin.y + 0.3 });
    expect(closed.status, JSON.stringify(closed.body)).toBe(201);
    // The picker stands in the closed stretch: every other stop is cut off from there; report them all.
    const now = await readTrip(t.as.picker, next.id);
    for (const s of now.stopList)
      for (const l of s.lines) {
        if (l.status !== 'open') continue;
        expect((await post(t.as.picker, `/api/picking/trips/${next.id}/lines/${l.id}/short`, { qtyFound: 0, reason: 'cannot_reach' })).status).toBe(200);
      }
    const res = await post(t.as.picker, `/api/picking/trips/${next.id}/finish`, {});
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const result = TripResult.parse(res.body);
    expect(result.status).toBe('done');
    expect(result.walkedMetres).toBeNull();
    expect((await t.deps.db('trips').where({ id: next.id }).first()).walked_metres).toBeNull();
    const board = await t.as.supervisor.get(`/api/sites/${t.siteId}/board`);
    expect(board.status).toBe(200);
    expect(finiteEverywhere(Board.parse(board.body))).toBe(true);
  });

  it('refuses a non-finite figure at the database', async () => {
    // SQLite's triggers abort with non_finite_figure; PostgreSQL's CHECK constraints are named <table>_<column>_finite.
    const refused = /non_finite_figure|_finite"/;
    await expect(t.deps.db('trips').where({ id: trip.id }).update({ walked_metres: Infinity })).rejects.toThrow(refused);
    await expect(t.deps.db('trips').where({ id: trip.id }).update({ planned_metres: -Infinity })).rejects.toThrow(refused);
    await expect(t.deps.db('waves').where({ id: waveId }).update({ est_seconds: Infinity })).rejects.toThrow(refused);
    // A NaN reaches SQLite as NULL, which NOT NULL refuses; PostgreSQL keeps NaN, which the CHECK refuses.
    await expect(t.deps.db('trips').where({ id: trip.id }).update({ planned_metres: NaN })).rejects.toThrow(/NOT NULL|_finite"/);
    expect(Number.isFinite((await t.deps.db('trips').where({ id: trip.id }).first()).walked_metres)).toBe(true);
  });
});
