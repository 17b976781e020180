/**
 * The same closure twice used to be stored twice, and the answer to the second said "Every bin can
 * still be reached" right above "Unreachable bins (2)". An identical or covered stretch now returns
 * the open closure; an overlapping one extends it; the answer's sentence agrees with its lists.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ClosureResult, FloorPlanDetail } from '../../../shared/floor-plans';
import { csrf, makeTestApp, type TestApp } from '../../helpers/app';
import { generatePlan } from './helpers';

/** One block, aisles A, B, C 20 m long; bay centres at 3.625, 7.875, 12.125, 16.375 m (see closures.test.ts). */
const PARAMS = { aisles: 3, aisleLengthM: 20, aisleSpacingM: 4, baysPerAisle: 4, levels: 1 };

let t: TestApp;
let base: string;
beforeAll(async () => {
  t = await makeTestApp();
  const planId = await generatePlan(t.as.supervisor, t.siteId, 'Block', PARAMS);
  base = `/api/sites/${t.siteId}/floor-plans/${planId}`;
  expect((await t.as.supervisor.post(`${base}/activate`).set(csrf)).status).toBe(200);
});
afterAll(() => t.close());

async function close(fromM: number, toM: number): Promise<ClosureResult> {
  const res = await t.as.supervisor.post(`${base}/closures`).set(csrf).send({ kind: 'aisle', code: 'B', fromM, toM });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  const r = ClosureResult.parse(res.body);
  // The sentence and the lists under it say the same thing.
  const n = r.unreachableBins.length;
  if (n === 0) expect(r.message).toMatch(/Every bin can still be reached\.$/);
  else expect(r.message).not.toMatch(/Every bin can still be reached/);
  if (r.newlyUnreachable.length)
    expect(r.message).toContain(`${r.newlyUnreachable.length} bin${r.newlyUnreachable.length === 1 ? '' : 's'} can no longer be reached`);
  else if (n) expect(r.message).toContain(`No more bins are cut off; ${n} bin${n === 1 ? '' : 's'} remain`);
  expect(r.plan.unreachableBins).toEqual(r.unreachableBins);
  return r;
}

const openRows = async () => FloorPlanDetail.parse((await t.as.supervisor.get(base)).body).closures;

describe('closing a stretch that is already closed', () => {
  let oldest: ClosureResult;
  let first: ClosureResult;

  it('closes two stretches of aisle B; the second cuts off B-02 and says so', async () => {
    oldest = await close(10, 11);
    expect(oldest.outcome).toBe('closed');
    expect(oldest.message).toBe('Aisle B from 10 m to 11 m: closed. Every bin can still be reached.');
    first = await close(5, 6);
    expect(first.outcome).toBe('closed');
    expect(first.newlyUnreachable).toEqual(['B-02-01-1', 'B-02-01-2']);
    expect(first.message).toBe('Aisle B from 5 m to 6 m: closed. 2 bins can no longer be reached.');
  });

  it('returns the existing closure for an identical stretch, stores nothing and recomputes nothing', async () => {
    const again = await close(5, 6);
    expect(again.outcome).toBe('already_closed');
    expect(again.closure!.id).toBe(first.closure!.id);
    expect(again.newlyUnreachable).toEqual([]);
    expect(again.unreachableBins).toEqual(['B-02-01-1', 'B-02-01-2']);
    expect(again.message).toBe(
      'Aisle B from 5 m to 6 m is already closed (closed by Sam Supervisor); nothing was changed. No more bins are cut off; 2 bins remain unreachable.',
    );
    expect(again.plan.closureVersion).toBe(first.plan.closureVersion);
    expect(await openRows()).toHaveLength(2);
  });

  it('returns the existing closure for a stretch inside it', async () => {
    const inside = await close(5.2, 5.8);
    expect(inside.outcome).toBe('already_closed');
    expect(inside.closure!.id).toBe(first.closure!.id);
    expect(await openRows()).toHaveLength(2);
  });

  it('extends the existing closure over an overlapping stretch instead of storing a second one', async () => {
    const wider = await close(4, 5.5);
    expect(wider.outcome).toBe('extended');
    expect(wider.closure).toMatchObject({ id: first.closure!.id, fromM: 4, toM: 6 });
    expect(wider.message).toMatch(/^Aisle B from 4 m to 6 m: closed; it overlapped the open closure at 5 m–6 m, now one closure\./);
    expect((await openRows()).map((c) => [c.fromM, c.toM])).toEqual([
      [10, 11],
      [4, 6],
    ]);
  });

  it('merges every open closure a bridging stretch overlaps into the oldest of them', async () => {
    const bridge = await close(5.5, 10.5);
    expect(bridge.outcome).toBe('extended');
    expect(bridge.closure).toMatchObject({ id: oldest.closure!.id, fromM: 4, toM: 11 });
    expect((await openRows()).map((c) => [c.fromM, c.toM])).toEqual([[4, 11]]);
    // B-02's access point lies inside the merged stretch: still cut off, and the answer says so.
    expect(bridge.unreachableBins).toEqual(['B-02-01-1', 'B-02-01-2']);
    const audit = await t.deps.db('audit_log').where({ action: 'floor_plan.segment_extended' }).count({ n: '*' });
    expect(Number(audit[0]!.n)).toBe(2);
  });

  it('still stores a stretch that only touches an open closure end to end', async () => {
    const next = await close(11, 12);
    expect(next.outcome).toBe('closed');
    expect(await openRows()).toHaveLength(2);
  });
});
