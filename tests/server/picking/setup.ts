/** Shared set-up for the picking API tests: a test app with a small plan and a released wave. */
import request from 'supertest';
import { csrf, makeTestApp, type TestApp } from '../../helpers/app';
import { insertReleasedWave, seedPlan, type TestTripSpec, type TestWave } from '../../helpers/picking';
import { makeDemoApp } from '../../helpers/waves';
import { IDEMPOTENCY_HEADER, PickTrip, type ConfirmBody } from '../../../shared/picking';

export type Agent = ReturnType<typeof request.agent>;

export interface PickingFixture extends TestApp {
  planId: number;
  ids: Record<'supervisor' | 'picker' | 'picker2' | 'admin', number>;
  wave(trips: TestTripSpec[], name?: string): Promise<TestWave>;
}

async function userIds(t: TestApp): Promise<PickingFixture['ids']> {
  const user = async (where: object) => (await t.deps.db('users').where(where).first<{ id: number }>('id'))!.id;
  return {
    supervisor: await user({ role: 'supervisor' }),
    admin: await user({ role: 'admin' }),
    picker: await user({ badge: 'P-1001' }),
    picker2: await user({ badge: 'P-1002' }),
  };
}

/** The demo plan, SKUs and open orders: waves come through the real release path (tests/helpers/waves.ts). */
export async function makeDemoPickingApp(): Promise<TestApp & { ids: PickingFixture['ids'] }> {
  const t = await makeDemoApp();
  return { ...t, ids: await userIds(t) };
}

export async function makePickingApp(): Promise<PickingFixture> {
  const t = await makeTestApp();
  const ids = await userIds(t);
  const planId = await seedPlan(t.deps.db, t.siteId, ids.supervisor);
  let offset = 0;
  return {
    ...t,
    planId,
    ids,
    wave: (trips, name) =>
      insertReleasedWave(t.deps.db, { siteId: t.siteId, planId, createdBy: ids.supervisor, trips, ...(name ? { name } : {}), binOffset: (offset += 3) }),
  };
}

let keySerial = 0;
export const newKey = (tag = 'k') => `${tag}-${process.pid}-${Date.now().toString(36)}-${(keySerial++).toString(36)}`;

export async function readTrip(agent: Agent, tripId: number): Promise<PickTrip> {
  const res = await agent.get(`/api/picking/trips/${tripId}`);
  if (res.status !== 200) throw new Error(`GET trip ${res.status} ${JSON.stringify(res.body)}`);
  return PickTrip.parse(res.body);
}

export function confirm(agent: Agent, tripId: number, lineId: number, body: Partial<ConfirmBody> = { via: 'tap' }, key: string | null = newKey()) {
  const req = agent.post(`/api/picking/trips/${tripId}/lines/${lineId}/confirm`).set(csrf);
  if (key !== null) req.set(IDEMPOTENCY_HEADER, key);
  return req.send({ via: 'tap', ...body });
}

export function post(agent: Agent, path: string, body: object = {}, key: string | null = newKey()) {
  const req = agent.post(path).set(csrf);
  if (key !== null) req.set(IDEMPOTENCY_HEADER, key);
  return req.send(body);
}

/** Ends every trip in progress (cancelled), so the fixture's pickers are free for the next test's trip. */
export async function freePickers(t: Pick<TestApp, 'deps'>): Promise<void> {
  await t.deps.db('trips').whereIn('status', ['released', 'assigned', 'picking']).update({ status: 'cancelled', cancelled_at: new Date().toISOString() });
}
