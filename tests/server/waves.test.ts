import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csrf, type TestApp } from '../helpers/app';
import { makeDemoApp, openOrderIds, previewWave } from '../helpers/waves';

let t: TestApp;
beforeAll(async () => {
  t = await makeDemoApp();
});
afterAll(() => t.close());

describe('wave preview', () => {
  it('plans trips within the cart and puts every line of every order in exactly one trip', async () => {
    const job = await previewWave(t, { orders: 30 });
    expect(job.state).toBe('done');
    const p = job.preview!;
    const cart = (await t.deps.db('cart_profiles').where({ id: p.cart.id }).first())!;
    for (const trip of p.trips) {
      expect(trip.totes).toBeLessThanOrEqual(cart.totes);
      expect(trip.kg).toBeLessThanOrEqual(cart.max_kg + 1e-9);
      expect(trip.litres).toBeLessThanOrEqual(cart.max_litres + 1e-9);
      expect(trip.metres).toBeGreaterThanOrEqual(trip.lowerBound - 1e-6);
      expect(trip.path.length).toBeGreaterThan(2);
      expect(trip.path[0]).toEqual(trip.depot);
      expect(trip.stops.map((s) => s.n)).toEqual(trip.stops.map((_s, i) => i + 1));
    }
    const refs = p.trips.flatMap((tr) => tr.orders.map((o) => o.ref));
    expect(new Set(refs).size).toBe(refs.length);
    expect(refs.length + p.unplaced.length).toBe(30);
    const lines = await t.deps.db('order_lines').join('orders', 'orders.id', 'order_lines.order_id').whereIn('orders.ref', refs).count({ n: '*' });
    expect(p.trips.reduce((a, tr) => a + tr.lines, 0)).toBe(Number(lines[0]!.n));
    // Batching walks less than one order per trip on the same orders (de Koster, van der Poort & Wolters 1999).
    expect(p.totals.metres).toBeLessThan(p.totals.singleMetres);
    expect(p.totals.sShapeMetres).not.toBeNull();
  });

  it('never routes a trip longer than S-shape on the same stops (regression: a 24-stop demo trip was 3.5 % longer)', async () => {
    const job = await previewWave(t, { orders: 160 });
    const p = job.preview!;
    expect(p.trips.length).toBeGreaterThan(10);
    for (const trip of p.trips) expect(trip.metres, `trip ${trip.n}`).toBeLessThanOrEqual(trip.sShapeMetres! + 0.05);
  });

  it('names orders that fit no cart instead of dropping them', async () => {
    const id = (await openOrderIds(t, 1))[0]!;
    const line = (await t.deps.db('order_lines').where({ order_id: id }).first())!;
    await t.deps.db('order_lines').where({ id: line.id }).update({ qty: 5000 });
    const cartProfileId = (await t.deps.db('cart_profiles').where({ site_id: t.siteId }).first<{ id: number }>('id'))!.id;
    const res = await t.as.supervisor
      .post(`/api/sites/${t.siteId}/wave-previews`)
      .set(csrf)
      .send({ orderIds: [id], cartProfileId });
    const { awaitPreview } = await import('../helpers/waves');
    const job = await awaitPreview(t, res.body.id);
    expect(job.preview!.trips).toHaveLength(0);
    expect(job.preview!.unplaced[0]!.reason).toMatch(/kg|litres|tote/);
    await t.deps.db('order_lines').where({ id: line.id }).update({ qty: line.qty });
  });

  it('refuses orders that are not open, and pickers', async () => {
    const cartProfileId = (await t.deps.db('cart_profiles').where({ site_id: t.siteId }).first<{ id: number }>('id'))!.id;
    expect(
      (
        await t.as.picker
          .post(`/api/sites/${t.siteId}/wave-previews`)
          .set(csrf)
          .send({ orderIds: [1], cartProfileId })
      ).status,
    ).toBe(403);
    expect(
      (
        await t.as.supervisor
          .post(`/api/sites/${t.siteId}/wave-previews`)
          .set(csrf)
          .send({ orderIds: [999999], cartProfileId })
      ).status,
    ).toBe(400);
  });
});

describe('release', () => {
  it('creates one wave for a double-clicked release, with numbered stops and pick lines', async () => {
    const job = await previewWave(t, { orders: 16 });
    const body = { previewId: job.id, releaseKey: `double-${job.id}` };
    const [a, b] = await Promise.all([
      t.as.supervisor.post(`/api/sites/${t.siteId}/waves`).set(csrf).send(body),
      t.as.supervisor.post(`/api/sites/${t.siteId}/waves`).set(csrf).send(body),
    ]);
    expect(a.status).toBe(201);
    expect(b.status).toBe(201);
    expect(a.body.id).toBe(b.body.id);
    expect(Number((await t.deps.db('waves').where({ release_key: body.releaseKey }).count({ n: '*' }))[0]!.n)).toBe(1);
    const wave = a.body;
    expect(wave.tripList.length).toBe(job.preview!.trips.length);
    const refs = job.preview!.trips.flatMap((tr) => tr.orders.map((o) => o.ref));
    const statuses = await t.deps.db('orders').whereIn('ref', refs).pluck('status');
    expect(new Set(statuses)).toEqual(new Set(['planned']));
    // Every order line is on exactly one pick line.
    const lines = await t.deps.db('order_lines').join('orders', 'orders.id', 'order_lines.order_id').whereIn('orders.ref', refs).pluck('order_lines.id');
    const picks = await t.deps
      .db('pick_lines')
      .whereIn(
        'trip_id',
        wave.tripList.map((x: { id: number }) => x.id),
      )
      .pluck('order_line_id');
    expect([...picks].sort()).toEqual([...lines].sort());
    const trip = (await t.as.supervisor.get(`/api/sites/${t.siteId}/trips/${wave.tripList[0].id}`)).body;
    expect(trip.stopList.map((s: { n: number }) => s.n)).toEqual(trip.stopList.map((_s: unknown, i: number) => i + 1));
    expect(trip.stopList.every((s: { lines: { bin: string }[]; bins: string[] }) => s.lines.every((l) => s.bins.includes(l.bin)))).toBe(true);
    // A summary went to the site's supervisors.
    const mails = await t.deps.db('mail_outbox').where('subject', 'like', 'Released:%');
    expect(mails.length).toBeGreaterThan(0);
    expect(mails[0].text).toMatch(/walking suggestions/);
  });

  it('refuses a second release of orders already taken by another wave', async () => {
    const first = await previewWave(t, { orders: 5 });
    const second = await previewWave(t, { orders: 5 });
    expect(
      (
        await t.as.supervisor
          .post(`/api/sites/${t.siteId}/waves`)
          .set(csrf)
          .send({ previewId: first.id, releaseKey: `k1-${first.id}` })
      ).status,
    ).toBe(201);
    const clash = await t.as.supervisor
      .post(`/api/sites/${t.siteId}/waves`)
      .set(csrf)
      .send({ previewId: second.id, releaseKey: `k2-${second.id}` });
    expect(clash.status).toBe(409);
    expect(clash.body.error.code).toBe('orders_not_open');
  });

  it('cancelling an untouched wave returns its orders to the open pool', async () => {
    const job = await previewWave(t, { orders: 4 });
    const wave = (
      await t.as.supervisor
        .post(`/api/sites/${t.siteId}/waves`)
        .set(csrf)
        .send({ previewId: job.id, releaseKey: `c-${job.id}` })
    ).body;
    const cancelled = await t.as.supervisor.post(`/api/sites/${t.siteId}/waves/${wave.id}/cancel`).set(csrf);
    expect(cancelled.body.status).toBe('cancelled');
    const refs = job.preview!.trips.flatMap((tr) => tr.orders.map((o) => o.ref));
    expect(new Set(await t.deps.db('orders').whereIn('ref', refs).pluck('status'))).toEqual(new Set(['open']));
  });
});
