import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { importSkus } from '../../server/orders/orders.service';
import { csrf, makeTestApp, type TestApp } from '../helpers/app';

let t: TestApp;
let token: string;
let tokenId: number;

const skuRows = ['SKU-RED', 'SKU-BLUE', 'SKU-GREEN'].map((sku, i) => ({
  row: i + 2,
  values: { sku, description: `${sku} widget`, bin: `A-01-0${i + 1}-1`, unit_weight_kg: 0.5 + i, unit_volume_l: 1 + i },
}));

beforeAll(async () => {
  t = await makeTestApp();
  const r = await importSkus(t.deps.db, t.siteId, null, 'skus', skuRows, async (bins) => new Set(bins));
  expect(r.ok).toBe(true);
  const created = await t.as.admin.post(`/api/sites/${t.siteId}/integration-tokens`).set(csrf).send({ name: 'Host' });
  token = created.body.token;
  tokenId = created.body.id;
});
afterAll(() => t.close());

const push = (body: object, siteId = t.siteId, bearer = token) =>
  request(t.app).post(`/api/sites/${siteId}/orders/push`).set('Authorization', `Bearer ${bearer}`).send(body);

describe('orders pushed by the host system', () => {
  it('creates orders with totals from the SKU master', async () => {
    const res = await push({
      orders: [
        {
          order: 'SO-1',
          due: '2026-12-03T14:00:00Z',
          priority: 2,
          lines: [
            { sku: 'SKU-RED', qty: 2 },
            { sku: 'SKU-BLUE', qty: 1 },
          ],
        },
      ],
    });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ ok: true, created: 1, unchanged: 0 });
    const page = await t.as.supervisor.get(`/api/sites/${t.siteId}/orders`);
    const o = page.body.rows.find((r: { ref: string }) => r.ref === 'SO-1');
    // 2 × 0.5 kg + 1 × 1.5 kg
    expect(o).toMatchObject({ lines: 2, units: 3, weightKg: 2.5, volumeL: 4, status: 'open', priority: 2 });
  });

  it('does not duplicate a re-sent order reference', async () => {
    const body = { orders: [{ order: 'SO-2', lines: [{ sku: 'SKU-GREEN', qty: 1 }] }] };
    expect((await push(body)).body.created).toBe(1);
    const again = await push(body);
    expect(again.body).toMatchObject({ created: 0, unchanged: 1 });
    const n = await t.deps.db('orders').where({ site_id: t.siteId, ref: 'SO-2' }).count({ n: '*' });
    expect(Number(n[0]!.n)).toBe(1);
  });

  it('updates an open order whose content changed', async () => {
    const res = await push({ orders: [{ order: 'SO-2', lines: [{ sku: 'SKU-GREEN', qty: 4 }] }] });
    expect(res.body).toMatchObject({ created: 0, updated: 1 });
  });

  it('refuses unknown SKUs with 422 naming the order and field, and saves nothing', async () => {
    const before = await t.deps.db('orders').count({ n: '*' });
    const res = await push({
      orders: [
        { order: 'SO-3', lines: [{ sku: 'SKU-RED', qty: 1 }] },
        { order: 'SO-4', lines: [{ sku: 'NOPE', qty: 1 }] },
      ],
    });
    expect(res.status).toBe(422);
    expect(res.body.error.code).toBe('unknown_sku');
    expect(res.body.error.details).toEqual([
      { order: 'SO-4', field: 'orders.1.lines.0.sku', value: 'NOPE', message: 'SKU NOPE is not in the SKU master; import it first' },
    ]);
    expect(await t.deps.db('orders').count({ n: '*' })).toEqual(before);
  });

  it('refuses a token for another site, a revoked token, and no token', async () => {
    const other = await t.as.admin.post('/api/sites').set(csrf).send({ code: 'SITEB', name: 'Site B' });
    expect((await push({ orders: [{ order: 'X', lines: [{ sku: 'SKU-RED', qty: 1 }] }] }, other.body.id)).status).toBe(403);
    expect((await request(t.app).post(`/api/sites/${t.siteId}/orders/push`).send({ orders: [] })).status).toBe(401);
    await t.as.admin.delete(`/api/sites/${t.siteId}/integration-tokens/${tokenId}`).set(csrf);
    expect((await push({ orders: [{ order: 'SO-9', lines: [{ sku: 'SKU-RED', qty: 1 }] }] })).status).toBe(401);
  });
});

describe('the orders table', () => {
  it('pages, sorts and filters on the server', async () => {
    const page = await t.as.supervisor.get(`/api/sites/${t.siteId}/orders?sort=ref&dir=desc&pageSize=1`);
    expect(page.body.total).toBe(2);
    expect(page.body.rows.map((r: { ref: string }) => r.ref)).toEqual(['SO-2']);
    const filtered = await t.as.supervisor.get(`/api/sites/${t.siteId}/orders?search=SO-1`);
    expect(filtered.body.rows.map((r: { ref: string }) => r.ref)).toEqual(['SO-1']);
    expect((await t.as.supervisor.get(`/api/sites/${t.siteId}/orders?sort=bogus`)).status).toBe(400);
    expect((await t.as.picker.get(`/api/sites/${t.siteId}/orders`)).status).toBe(403);
  });
});
